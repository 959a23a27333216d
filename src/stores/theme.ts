import { defineStore } from 'pinia'
import { ref, watch } from 'vue'

const KEY = 'ringdown.theme'

export const useThemeStore = defineStore('theme', () => {
  const saved = typeof localStorage !== 'undefined' ? localStorage.getItem(KEY) : null
  const prefersDark =
    typeof matchMedia !== 'undefined' && matchMedia('(prefers-color-scheme: dark)').matches
  const dark = ref(saved ? saved === 'dark' : prefersDark)
  watch(dark, (d) => localStorage.setItem(KEY, d ? 'dark' : 'light'))
  return { dark, toggle: () => (dark.value = !dark.value) }
})

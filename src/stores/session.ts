import { defineStore } from 'pinia'
import { computed, ref } from 'vue'
import type { Me } from '@shared/types/api'
import type { Role } from '@shared/constants'
import { authApi, type Features } from '@/api/auth'

export const useSessionStore = defineStore('session', () => {
  const user = ref<Me | null>(null)
  const features = ref<Features>({ mailbox: false })
  const loaded = ref(false)

  const role = computed<Role | null>(() => user.value?.role ?? null)
  const can = (roles: readonly Role[] | undefined) =>
    !roles || (role.value !== null && roles.includes(role.value))

  /** Asks the server once per page load who is signed in. */
  async function load(force = false) {
    if (loaded.value && !force) return
    const me = await authApi.me()
    user.value = me.user
    features.value = me.features
    loaded.value = true
  }

  async function signIn(email: string, password: string) {
    await authApi.login({ email, password })
    await load(true)
  }

  async function signOut() {
    await authApi.logout()
    forget()
  }

  function forget() {
    user.value = null
  }

  return { user, features, loaded, role, can, load, signIn, signOut, forget }
})

import { watch, type WatchSource } from 'vue'

/**
 * Runs `fn` once typing or picking has paused: filters reload their table a quarter second
 * after the last change instead of on every key press.
 */
export function watchDebounced(source: WatchSource, fn: () => unknown, ms = 250) {
  let timer: ReturnType<typeof setTimeout> | undefined
  watch(source, () => {
    clearTimeout(timer)
    timer = setTimeout(fn, ms)
  })
}

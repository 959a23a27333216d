import { onBeforeUnmount, ref, watch, type Ref } from 'vue'

/**
 * Whole seconds left of a wait the server set, counted on this device's clock from the moment
 * the figure arrived, so a device whose clock is wrong still waits the right time. Each new
 * figure starts the count again.
 */
export function useCountdown(seconds: () => number | null | undefined): Ref<number> {
  const left = ref(0)
  let until = 0
  let timer: ReturnType<typeof setInterval> | null = null

  const stop = () => {
    if (timer !== null) clearInterval(timer)
    timer = null
  }
  const tick = () => {
    left.value = Math.max(0, Math.ceil((until - Date.now()) / 1000))
    if (left.value === 0) stop()
  }
  watch(
    seconds,
    (s) => {
      stop()
      until = Date.now() + Math.max(0, s ?? 0) * 1000
      tick()
      if (left.value > 0) timer = setInterval(tick, 250)
    },
    { immediate: true },
  )
  onBeforeUnmount(stop)
  return left
}

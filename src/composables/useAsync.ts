import { ref, shallowRef } from 'vue'
import { ApiError } from '@/api/client'

/**
 * Owns the loading flag and the error of one async action, so views do not repeat try/catch.
 * `run` resolves to undefined when the action failed; the error is in `error`.
 */
export function useAsync<A extends unknown[], T>(fn: (...args: A) => Promise<T>) {
  const loading = ref(false)
  const error = shallowRef<ApiError | null>(null)
  async function run(...args: A): Promise<T | undefined> {
    loading.value = true
    error.value = null
    try {
      return await fn(...args)
    } catch (err) {
      error.value =
        err instanceof ApiError ? err : new ApiError(0, 'internal', (err as Error).message)
      return undefined
    } finally {
      loading.value = false
    }
  }
  return { loading, error, run }
}

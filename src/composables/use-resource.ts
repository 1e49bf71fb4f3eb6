import { ref, shallowRef, watch } from 'vue'
import type { Ref, WatchSource } from 'vue'
import { asApiError } from '@/api/http'
import type { ApiError } from '@/api/http'

export type LoadState = 'idle' | 'loading' | 'done' | 'error'

export interface Resource<T> {
  state: Ref<LoadState>
  data: Ref<T | null>
  error: Ref<ApiError | null>
  reload: () => Promise<void>
  /** Loads again without passing through 'loading' (the page keeps showing what it has). */
  refresh: () => Promise<void>
}

/**
 * Loads something from the API and exposes `state`, `data` and `error` so every view shows the
 * same loading, empty and error states. Re-runs when `source` changes; a stale answer from an
 * earlier run is dropped.
 */
export function useResource<T>(load: () => Promise<T>, source?: WatchSource): Resource<T> {
  const state = ref<LoadState>('idle')
  const data = shallowRef<T | null>(null) as Ref<T | null>
  const error = shallowRef<ApiError | null>(null)
  let run = 0

  async function reload(quiet = false) {
    const mine = ++run
    if (!quiet) {
      state.value = 'loading'
      error.value = null
    }
    try {
      const value = await load()
      if (mine !== run) return
      data.value = value
      state.value = 'done'
    } catch (err) {
      if (mine !== run) return
      error.value = asApiError(err)
      state.value = 'error'
    }
  }

  if (source) watch(source, () => void reload(), { immediate: true })
  else void reload()
  return { state, data, error, reload: () => reload(), refresh: () => reload(true) }
}

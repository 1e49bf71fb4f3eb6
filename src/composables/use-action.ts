import { ref, shallowRef } from 'vue'
import type { Ref } from 'vue'
import { useToast } from 'primevue/usetoast'
import { asApiError } from '@/api/http'
import type { ApiError } from '@/api/http'

export { asApiError }

/** What a finished action says to the person, as a toast. A function receives the action's result. */
export interface ActionMessages<T> {
  /** Toast on success; omit for a quiet action (the page shows the change itself). */
  success?: string | ((result: T) => { summary: string; detail?: string; severity?: 'success' | 'warn' | 'info' })
  /** Toast summary on failure, e.g. "Not saved"; the detail is the server's own message. Omit to only set `error`. */
  failure?: string
  /** Errors the caller shows in place (a conflict banner, a field message): no toast, only `error`. */
  inPlace?: (err: ApiError) => boolean
}

export interface Action<A extends unknown[], T> {
  busy: Ref<boolean>
  error: Ref<ApiError | null>
  /** Runs the write; resolves to its result, or `undefined` when it failed (the error is in `error`). */
  run: (...args: A) => Promise<T | undefined>
}

/**
 * One write from a page (save, publish, send): `busy` while it runs, the failure in `error`, and
 * a success or failure toast, so views do not each hand-write busy/try/finally. A second call while
 * one is running is ignored, so a double click sends one request.
 */
export function useAction<A extends unknown[], T>(
  write: (...args: A) => Promise<T>,
  messages: ActionMessages<T> = {},
): Action<A, T> {
  const toast = useToast()
  const busy = ref(false)
  const error = shallowRef<ApiError | null>(null)

  async function run(...args: A): Promise<T | undefined> {
    if (busy.value) return undefined
    busy.value = true
    error.value = null
    try {
      const result = await write(...args)
      const ok = messages.success
      if (ok) {
        const m = typeof ok === 'string' ? { summary: ok } : ok(result)
        toast.add({ severity: m.severity ?? 'success', summary: m.summary, detail: m.detail, life: 5000 })
      }
      return result
    } catch (err) {
      const e = asApiError(err)
      error.value = e
      if (messages.failure && !messages.inPlace?.(e)) {
        toast.add({ severity: 'error', summary: messages.failure, detail: e.message, life: 8000 })
      }
      return undefined
    } finally {
      busy.value = false
    }
  }

  return { busy, error, run }
}

import { createApp } from 'vue'
import ToastService from 'primevue/toastservice'
import type { ToastMessageOptions } from 'primevue/toast'
import { describe, expect, it } from 'vitest'
import { ApiError } from '@/api/http'
import { useAction } from '@/composables/use-action'
import type { ActionMessages } from '@/composables/use-action'

/** useAction inside an app that records its toasts instead of showing them. */
function setUp<A extends unknown[], T>(write: (...args: A) => Promise<T>, messages?: ActionMessages<T>) {
  const toasts: ToastMessageOptions[] = []
  const app = createApp({})
  app.use(ToastService)
  // The service the app provides to useToast(): keep its messages here instead of showing them.
  app.config.globalProperties.$toast.add = (m: ToastMessageOptions) => void toasts.push(m)
  const action = app.runWithContext(() => useAction(write, messages))
  return { action, toasts }
}

/** A write that waits until the test lets it finish (every call still waiting finishes together). */
function gate<T>() {
  let waiting: ((v: T) => void)[] = []
  const calls: unknown[][] = []
  const write = (...args: unknown[]) => {
    calls.push(args)
    return new Promise<T>((res) => waiting.push(res))
  }
  const open = (v: T) => {
    for (const res of waiting) res(v)
    waiting = []
  }
  return { write, calls, open }
}

describe('useAction', () => {
  it('is busy while the write runs and not after it', async () => {
    const g = gate<number>()
    const { action } = setUp(g.write)
    expect(action.busy.value).toBe(false)
    const done = action.run('a')
    expect(action.busy.value).toBe(true)
    g.open(7)
    expect(await done).toBe(7)
    expect(action.busy.value).toBe(false)
    expect(g.calls).toEqual([['a']])
  })

  it('sends one request for a double click: a second run while the first is busy is ignored', async () => {
    const g = gate<string>()
    const { action } = setUp(g.write)
    const first = action.run(1)
    const second = action.run(2)
    g.open('saved')
    expect(await second).toBeUndefined()
    expect(await first).toBe('saved')
    expect(g.calls).toEqual([[1]])
    // Once the first finished, the next click goes through.
    const third = action.run(3)
    g.open('again')
    expect(await third).toBe('again')
    expect(g.calls).toEqual([[1], [3]])
  })

  it('shows the success toast, worded from the result', async () => {
    const { action, toasts } = setUp(async (n: number) => ({ emailed: n }), {
      success: (r) => ({ summary: 'Published', detail: `E-mail queued for ${r.emailed}.` }),
    })
    await action.run(3)
    expect(toasts).toHaveLength(1)
    expect(toasts[0]).toMatchObject({ severity: 'success', summary: 'Published', detail: 'E-mail queued for 3.' })
  })

  it('keeps the server’s error, shows it in a failure toast and clears it on the next run', async () => {
    let fail = true
    const { action, toasts } = setUp(
      async () => {
        if (fail) throw new ApiError(409, 'already_published', 'Version 2 is already published.')
        return 'ok'
      },
      { success: 'Saved', failure: 'Not saved' },
    )
    expect(await action.run()).toBeUndefined()
    expect(action.busy.value).toBe(false)
    expect(action.error.value?.code).toBe('already_published')
    expect(toasts).toEqual([
      expect.objectContaining({ severity: 'error', summary: 'Not saved', detail: 'Version 2 is already published.' }),
    ])
    fail = false
    expect(await action.run()).toBe('ok')
    expect(action.error.value).toBeNull()
    expect(toasts.map((t) => t.summary)).toEqual(['Not saved', 'Saved'])
  })

  it('leaves an error the page shows in place out of the toasts', async () => {
    const { action, toasts } = setUp(
      async () => {
        throw new ApiError(409, 'edit_conflict', 'The module changed since you opened it.')
      },
      { failure: 'Not saved', inPlace: (e) => e.code === 'edit_conflict' },
    )
    await action.run()
    expect(action.error.value?.message).toBe('The module changed since you opened it.')
    expect(toasts).toEqual([])
  })

  it('turns anything else thrown into an ApiError the page can show', async () => {
    const { action } = setUp(async () => {
      throw new TypeError('x is undefined')
    })
    await action.run()
    expect(action.error.value).toBeInstanceOf(ApiError)
    expect(action.error.value).toMatchObject({ code: 'client_error', message: 'TypeError: x is undefined' })
  })
})

/**
 * InnoDB errors after which the whole transaction may simply be run again: a deadlock (1213, the
 * transaction was rolled back) and a lock wait timeout (1205).
 * https://mariadb.com/kb/en/mariadb-error-code-reference/
 */
const RETRYABLE_ERRNO = new Set([1213, 1205])

/** Walks the `cause` chain (Drizzle wraps driver errors) for a deadlock or lock-wait timeout. */
export function isRetryableLockError(err: unknown): boolean {
  let e: unknown = err
  for (let depth = 0; e && depth < 5; depth++) {
    const o = e as { errno?: unknown; code?: unknown; cause?: unknown }
    if (typeof o.errno === 'number' && RETRYABLE_ERRNO.has(o.errno)) return true
    if (o.code === 'ER_LOCK_DEADLOCK' || o.code === 'ER_LOCK_WAIT_TIMEOUT') return true
    e = o.cause
  }
  return false
}

/**
 * Runs `fn` (a whole transaction) and runs it again when InnoDB chose it as a deadlock victim or
 * its lock wait timed out, with a short jittered back-off. Other errors pass through at once.
 */
export async function retryOnLockConflict<T>(fn: () => Promise<T>, attempts = 6): Promise<T> {
  for (let i = 1; ; i++) {
    try {
      return await fn()
    } catch (err) {
      if (i >= attempts || !isRetryableLockError(err)) throw err
      const delay = Math.min(1000, 20 * 2 ** i) * (0.5 + Math.random())
      await new Promise((r) => setTimeout(r, delay))
    }
  }
}

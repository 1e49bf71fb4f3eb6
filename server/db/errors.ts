/** mysql2 error codes that mean "the database cannot be reached", not "the query is wrong". */
const UNAVAILABLE = new Set([
  'ECONNREFUSED',
  'ECONNRESET',
  'ETIMEDOUT',
  'EHOSTUNREACH',
  'ENOTFOUND',
  'EPIPE',
  'PROTOCOL_CONNECTION_LOST',
  'PROTOCOL_SEQUENCE_TIMEOUT',
  'ER_CON_COUNT_ERROR',
  'ER_SERVER_SHUTDOWN',
  'POOL_CLOSED',
  'POOL_ACQUIRE_TIMEOUT',
])

/** mysql2's message when a command is sent on a connection the server already dropped (no code). */
const CLOSED_CONNECTION = /connection is in closed state|Connection lost|Pool is closed/i

/** Walks the `cause` chain (Drizzle wraps driver errors) looking for a connection failure. */
export function isDatabaseUnavailable(err: unknown): boolean {
  let e: unknown = err
  for (let depth = 0; e && depth < 5; depth++) {
    const o = e as { code?: unknown; fatal?: unknown; cause?: unknown; errors?: unknown }
    if (typeof o.code === 'string' && UNAVAILABLE.has(o.code)) return true
    if (e instanceof Error && CLOSED_CONNECTION.test(e.message)) return true
    if (o.fatal === true && typeof o.code === 'string' && !o.code.startsWith('ER_PARSE')) return true
    // AggregateError from net when every address failed.
    if (Array.isArray(o.errors) && o.errors.some((x) => isDatabaseUnavailable(x))) return true
    e = o.cause
  }
  return false
}

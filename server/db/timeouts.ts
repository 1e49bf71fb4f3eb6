import type { Pool, PoolConnection } from 'mysql2/promise'

export interface DbTimeouts {
  /** Longest wait for a pooled connection, in ms. */
  acquireMs: number
  /** Longest time one statement may take, in ms (0: no limit). */
  queryMs: number
}

/** Thrown when no pooled connection came within `acquireMs` (a stalled or saturated database). */
export class PoolAcquireTimeoutError extends Error {
  readonly code = 'POOL_ACQUIRE_TIMEOUT'
  constructor(ms: number) {
    super(`no database connection became free within ${ms} ms`)
  }
}

type QueryArg = string | { sql: string; timeout?: number; [k: string]: unknown }

function timed(q: QueryArg, ms: number): QueryArg {
  if (!ms) return q
  return typeof q === 'string' ? { sql: q, timeout: ms } : { ...q, timeout: q.timeout ?? ms }
}

const isTimeout = (err: unknown) => (err as { code?: unknown } | null)?.code === 'PROTOCOL_SEQUENCE_TIMEOUT'

/**
 * A connection whose statements carry the query timeout. One that timed out is destroyed, not
 * returned to the pool: its late answer would arrive in the middle of someone else's query.
 */
function wrapConnection(conn: PoolConnection, ms: number): PoolConnection {
  let destroyed = false
  const guard = async <T>(p: Promise<T>): Promise<T> => {
    try {
      return await p
    } catch (err) {
      if (isTimeout(err) && !destroyed) {
        destroyed = true
        conn.destroy()
      }
      throw err
    }
  }
  return new Proxy(conn, {
    get(target, prop, receiver) {
      if (prop === 'query')
        return (q: QueryArg, values?: unknown) => guard(target.query(timed(q, ms) as never, values as never))
      if (prop === 'execute')
        return (q: QueryArg, values?: unknown) => guard(target.execute(timed(q, ms) as never, values as never))
      if (prop === 'release') return () => (destroyed ? undefined : target.release())
      const v: unknown = Reflect.get(target, prop, receiver)
      return typeof v === 'function' ? (v as (...a: unknown[]) => unknown).bind(target) : v
    },
  })
}

/**
 * The pool as Drizzle sees it, failing fast when the database stalls: waiting for a connection
 * and every statement are bounded, so a request gets a 503 in seconds instead of hanging.
 * (mysql2 has a per-query `timeout` but no pool-acquire timeout.)
 * https://sidorares.github.io/node-mysql2/docs#using-connection-pools
 */
export function withTimeouts(pool: Pool, t: DbTimeouts): Pool {
  const acquire = async (): Promise<PoolConnection> => {
    let timer: NodeJS.Timeout | undefined
    let timedOut = false
    const pending = pool.getConnection()
    try {
      const conn = await Promise.race([
        pending,
        new Promise<never>((_, reject) => {
          timer = setTimeout(() => {
            timedOut = true
            reject(new PoolAcquireTimeoutError(t.acquireMs))
          }, t.acquireMs)
        }),
      ])
      return wrapConnection(conn, t.queryMs)
    } finally {
      clearTimeout(timer)
      // A connection that arrives after we gave up goes straight back.
      if (timedOut)
        pending.then(
          (c) => c.release(),
          () => undefined,
        )
    }
  }
  const run = async (method: 'query' | 'execute', q: QueryArg, values?: unknown) => {
    const conn = await acquire()
    try {
      return method === 'query'
        ? await conn.query(q as never, values as never)
        : await conn.execute(q as never, values as never)
    } finally {
      conn.release()
    }
  }
  return new Proxy(pool, {
    get(target, prop, receiver) {
      if (prop === 'getConnection') return acquire
      if (prop === 'query') return (q: QueryArg, values?: unknown) => run('query', q, values)
      if (prop === 'execute') return (q: QueryArg, values?: unknown) => run('execute', q, values)
      const v: unknown = Reflect.get(target, prop, receiver)
      return typeof v === 'function' ? (v as (...a: unknown[]) => unknown).bind(target) : v
    },
  })
}

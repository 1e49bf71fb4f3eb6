import { and, eq, gt, lt, or, sql } from 'drizzle-orm'
import type { Database, Executor, Transaction } from '../db/client'
import { signInThrottles } from '../db/schema'
import type { SignInScope } from '../db/schema'

export interface CounterKey {
  scope: SignInScope
  /** '' when the scope does not use it. */
  email: string
  address: string
}

export interface LockedCounter extends CounterKey {
  failures: number
  /** Milliseconds since `last_failed_at`, on the database's clock (the one clock all replicas share). */
  sinceLastMs: number
  /** `last_failed_at` exactly as the database wrote it, so a success can put it back. */
  lastFailedAt: string
}

const byKey = (k: CounterKey) =>
  and(eq(signInThrottles.scope, k.scope), eq(signInThrottles.email, k.email), eq(signInThrottles.address, k.address))

/**
 * Locks one counter row per key (creating missing rows with no failures) and reads them.
 * Call inside a transaction: the rows stay locked until it ends, so concurrent sign-ins for
 * the same counter wait here one after another instead of all reading the same count.
 *
 * Rows are locked in the order given; every caller passes the scopes in the same order, so two
 * sign-ins that share rows always take them in the same order and cannot deadlock on them.
 */
export async function lockCounters(
  tx: Transaction,
  keys: CounterKey[],
): Promise<{ now: string; counters: LockedCounter[] }> {
  // The no-op update makes the duplicate-key path take the row's exclusive lock at once
  // (INSERT IGNORE would take a shared lock, and two shared locks upgrading deadlock).
  await tx
    .insert(signInThrottles)
    .values(keys.map((k) => ({ ...k, failures: 0 })))
    .onDuplicateKeyUpdate({ set: { failures: sql`${signInThrottles.failures}` } })
  const rows = await tx
    .select({
      scope: signInThrottles.scope,
      email: signInThrottles.email,
      address: signInThrottles.address,
      failures: signInThrottles.failures,
      sinceLastMs: sql<number>`TIMESTAMPDIFF(MICROSECOND, ${signInThrottles.lastFailedAt}, NOW(3)) DIV 1000`.mapWith(
        Number,
      ),
      lastFailedAt: sql<string>`${signInThrottles.lastFailedAt}`,
      now: sql<string>`NOW(3)`,
    })
    .from(signInThrottles)
    .where(or(...keys.map(byKey)))
    .for('update')
  const counters = keys.map((k) => {
    const row = rows.find((r) => r.scope === k.scope && r.email === k.email && r.address === k.address)
    if (!row) throw new Error(`sign-in counter ${k.scope} was not created`)
    return {
      scope: row.scope,
      email: row.email,
      address: row.address,
      failures: row.failures,
      sinceLastMs: row.sinceLastMs,
      lastFailedAt: row.lastFailedAt,
    }
  })
  const now = rows[0]?.now
  if (!now) throw new Error('sign-in counters: no rows read')
  return { now, counters }
}

/** Writes a locked counter's new failure count, stamped with the time read in the same transaction. */
export async function setCounter(tx: Transaction, key: CounterKey, failures: number, at: string): Promise<void> {
  await tx
    .update(signInThrottles)
    .set({ failures, lastFailedAt: sql`${at}` })
    .where(byKey(key))
}

/**
 * Takes back one counted attempt (it turned out to be the right password). The time of the last
 * failure goes back to what it was, unless another attempt has been counted since ours.
 */
export async function takeBackAttempt(
  db: Executor,
  key: CounterKey,
  countedAt: string,
  previousAt: string,
): Promise<void> {
  await db
    .update(signInThrottles)
    .set({
      failures: sql`${signInThrottles.failures} - 1`,
      lastFailedAt: sql`IF(${signInThrottles.lastFailedAt} = ${countedAt}, ${previousAt}, ${signInThrottles.lastFailedAt})`,
    })
    .where(and(byKey(key), gt(signInThrottles.failures, 0)))
}

export async function deleteCounter(db: Executor, key: CounterKey): Promise<void> {
  await db.delete(signInThrottles).where(byKey(key))
}

/**
 * Deletes up to `limit` counters with no failure for `windowMs`. Rows another sign-in holds
 * are skipped (SKIP LOCKED), so pruning never waits for, nor deadlocks with, a sign-in.
 */
export async function pruneCounters(db: Database, windowMs: number, limit = 200): Promise<number> {
  const cutoff = sql`NOW(3) - INTERVAL ${Math.round(windowMs * 1000)} MICROSECOND`
  return db.transaction(
    async (tx) => {
      const stale = await tx
        .select({ scope: signInThrottles.scope, email: signInThrottles.email, address: signInThrottles.address })
        .from(signInThrottles)
        .where(lt(signInThrottles.lastFailedAt, cutoff))
        .limit(limit)
        .for('update', { skipLocked: true })
      if (stale.length === 0) return 0
      await tx.delete(signInThrottles).where(and(or(...stale.map(byKey)), lt(signInThrottles.lastFailedAt, cutoff)))
      return stale.length
    },
    { isolationLevel: 'read committed' },
  )
}

/** True when MariaDB gave up on a statement because of a lock conflict, so it can be retried. */
export function isLockConflict(err: unknown): boolean {
  let e: unknown = err
  for (let depth = 0; e && depth < 5; depth++) {
    const code = (e as { code?: unknown }).code
    if (code === 'ER_LOCK_DEADLOCK' || code === 'ER_LOCK_WAIT_TIMEOUT') return true
    e = (e as { cause?: unknown }).cause
  }
  return false
}

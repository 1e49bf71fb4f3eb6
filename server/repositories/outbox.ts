import { and, asc, eq, inArray, lt, lte, sql } from 'drizzle-orm'
import type { Database, Executor } from '../db/client'
import { mailOutbox } from '../db/schema'

export interface NewMail {
  dedupeKey: string
  toAddress: string
  toName: string
  subject: string
  textBody: string
  htmlBody: string
}

export interface ClaimedMail extends NewMail {
  id: number
  attempts: number
}

/** Queues messages; a (dedupe key, recipient) pair already queued is left as it is. */
export async function enqueueMail(db: Executor, mails: NewMail[]): Promise<void> {
  if (mails.length === 0) return
  await db
    .insert(mailOutbox)
    .values(mails)
    .onDuplicateKeyUpdate({ set: { dedupeKey: sql`${mailOutbox.dedupeKey}` } })
}

/**
 * Claims up to `limit` due messages for this worker: rows locked by another worker's open
 * transaction are skipped (SKIP LOCKED, MariaDB ≥ 10.6), and claimed rows are marked 'sending'
 * before the transaction ends, so no other worker can pick them up afterwards either.
 */
export async function claimDueMail(db: Database, limit: number): Promise<ClaimedMail[]> {
  return db.transaction(async (tx) => {
    const rows = await tx
      .select({
        id: mailOutbox.id,
        dedupeKey: mailOutbox.dedupeKey,
        toAddress: mailOutbox.toAddress,
        toName: mailOutbox.toName,
        subject: mailOutbox.subject,
        textBody: mailOutbox.textBody,
        htmlBody: mailOutbox.htmlBody,
        attempts: mailOutbox.attempts,
      })
      .from(mailOutbox)
      .where(and(eq(mailOutbox.status, 'pending'), lte(mailOutbox.nextAttemptAt, sql`CURRENT_TIMESTAMP(3)`)))
      .orderBy(asc(mailOutbox.id))
      .limit(limit)
      .for('update', { skipLocked: true })
    if (rows.length === 0) return []
    await tx
      .update(mailOutbox)
      .set({ status: 'sending', attempts: sql`${mailOutbox.attempts} + 1`, claimedAt: sql`CURRENT_TIMESTAMP(3)` })
      .where(
        inArray(
          mailOutbox.id,
          rows.map((r) => r.id),
        ),
      )
    return rows.map((r) => ({ ...r, attempts: r.attempts + 1 }))
  })
}

export async function markSent(db: Executor, id: number): Promise<void> {
  await db
    .update(mailOutbox)
    .set({ status: 'sent', sentAt: sql`CURRENT_TIMESTAMP(3)`, lastError: null })
    .where(eq(mailOutbox.id, id))
}

export async function markFailed(db: Executor, id: number, error: string, retryAt: Date | null): Promise<void> {
  await db
    .update(mailOutbox)
    .set(
      retryAt
        ? { status: 'pending', lastError: error.slice(0, 1000), nextAttemptAt: retryAt }
        : { status: 'failed', lastError: error.slice(0, 1000) },
    )
    .where(eq(mailOutbox.id, id))
}

/**
 * Rows left in 'sending' by a worker that died mid-send go back to 'pending' after `staleMs`.
 * (The message may then be sent again: at-least-once only in that crash case.)
 */
export async function releaseStaleClaims(db: Executor, staleMs: number): Promise<number> {
  const [res] = await db
    .update(mailOutbox)
    .set({ status: 'pending' })
    .where(and(eq(mailOutbox.status, 'sending'), lt(mailOutbox.claimedAt, new Date(Date.now() - staleMs))))
  return (res as { affectedRows?: number }).affectedRows ?? 0
}

import { and, asc, eq, inArray, isNull, lt, lte, or, sql } from 'drizzle-orm'
import type { Database, Executor } from '../db/client'
import { submissions } from '../db/schema'

/** A claimed grading job: the hand-in and the claim's token (its grade_attempts after the claim). */
export interface GradingClaim {
  submissionId: number
  token: number
}

const due = or(isNull(submissions.gradeAfter), lte(submissions.gradeAfter, sql`CURRENT_TIMESTAMP(3)`))

/**
 * Claims up to `limit` hand-ins waiting to be graded (or just `onlyId`). Rows another worker's
 * open transaction holds are skipped (SKIP LOCKED, MariaDB ≥ 10.6), and claimed rows are marked
 * 'grading' before the transaction ends, so no other worker picks them up afterwards either.
 */
export async function claimGradingJobs(db: Database, limit: number, onlyId?: number): Promise<GradingClaim[]> {
  return db.transaction(async (tx) => {
    const rows = await tx
      .select({ id: submissions.id, attempts: submissions.gradeAttempts })
      .from(submissions)
      .where(and(eq(submissions.status, 'received'), onlyId === undefined ? due : eq(submissions.id, onlyId)))
      .orderBy(asc(submissions.id))
      .limit(limit)
      .for('update', { skipLocked: true })
    if (rows.length === 0) return []
    await tx
      .update(submissions)
      .set({
        status: 'grading',
        gradeAttempts: sql`${submissions.gradeAttempts} + 1`,
        gradeClaimedAt: sql`CURRENT_TIMESTAMP(3)`,
      })
      .where(
        inArray(
          submissions.id,
          rows.map((r) => r.id),
        ),
      )
    return rows.map((r) => ({ submissionId: r.id, token: r.attempts + 1 }))
  })
}

/** A claim that failed for a passing reason goes back to the queue, to be tried after `retryAt`. */
export async function requeueGradingJob(db: Executor, claim: GradingClaim, retryAt: Date): Promise<void> {
  await db
    .update(submissions)
    .set({ status: 'received', gradeAfter: retryAt, gradeClaimedAt: null })
    .where(
      and(
        eq(submissions.id, claim.submissionId),
        eq(submissions.status, 'grading'),
        eq(submissions.gradeAttempts, claim.token),
      ),
    )
}

/**
 * Claims left in 'grading' longer than `staleMs` belong to a worker that died (or lost its
 * database) mid-job: they go back to the queue. The claim's token keeps the old worker, should it
 * come back, from writing over the new one's grade.
 */
export async function releaseStaleGradingClaims(db: Executor, staleMs: number): Promise<number> {
  const [res] = await db
    .update(submissions)
    .set({ status: 'received', gradeClaimedAt: null })
    .where(and(eq(submissions.status, 'grading'), lt(submissions.gradeClaimedAt, new Date(Date.now() - staleMs))))
  return (res as { affectedRows?: number }).affectedRows ?? 0
}

import { and, asc, count, desc, eq, inArray, isNull, ne, sql } from 'drizzle-orm'
import type { SQL } from 'drizzle-orm'
import { RECHECK_REASON } from '../../shared/schemas/grades'
import type { FlagStatus, ReviewQuery, ReviewRow, SettableReviewState } from '../../shared/schemas/review'
import type { Executor } from '../db/client'
import {
  enrollments,
  gradeChanges,
  labGroups,
  moduleVersions,
  recheckRequests,
  sections,
  submissionChecks,
  submissionComments,
  submissionFlags,
  submissions,
  users,
} from '../db/schema'

/** The flag reasons that occur on the course's hand-ins, each with one flag's message. */
export async function listFlagReasons(db: Executor, courseId: number): Promise<{ code: string; example: string }[]> {
  return db
    .select({ code: submissionFlags.code, example: sql<string>`MIN(${submissionFlags.message})` })
    .from(submissionFlags)
    .innerJoin(submissions, eq(submissions.id, submissionFlags.submissionId))
    .where(eq(submissions.courseId, courseId))
    .groupBy(submissionFlags.code)
    .orderBy(asc(submissionFlags.code))
}

/** The review queue of a course; `sectionId` limits it to one section (a TA's own). */
export async function listQueue(
  db: Executor,
  courseId: number,
  q: ReviewQuery,
): Promise<{ rows: ReviewRow[]; total: number }> {
  const where: SQL[] = [eq(submissions.courseId, courseId)]
  if (q.status === 'all') where.push(ne(submissions.reviewStatus, 'none'))
  else where.push(eq(submissions.reviewStatus, q.status))
  if (q.moduleId) where.push(eq(submissions.moduleId, q.moduleId))
  if (q.sectionId) where.push(eq(enrollments.sectionId, q.sectionId))
  // An open re-check request is a reason of its own, listed with the flag codes.
  const recheckOpen = sql`EXISTS (SELECT 1 FROM ${recheckRequests} rr WHERE rr.submission_id = ${submissions.id} AND rr.status = 'open')`
  if (q.reason === RECHECK_REASON) where.push(recheckOpen)
  else if (q.reason)
    where.push(
      sql`EXISTS (SELECT 1 FROM ${submissionFlags} f WHERE f.submission_id = ${submissions.id} AND f.code = ${q.reason})`,
    )
  const filter = and(...where)
  const sortCol = {
    submittedAt: submissions.submittedAt,
    score: submissions.score,
    module: moduleVersions.title,
    student: users.displayName,
  }[q.sort]
  const base = db
    .select({
      submissionId: submissions.id,
      moduleId: submissions.moduleId,
      moduleTitle: moduleVersions.title,
      submittedBy: users.displayName,
      labGroupName: labGroups.name,
      sectionName: sections.name,
      submittedAt: submissions.submittedAt,
      isLate: submissions.isLate,
      score: sql<number | null>`COALESCE(${submissions.scoreOverride}, ${submissions.score})`,
      maxScore: submissions.maxScore,
      reviewStatus: submissions.reviewStatus,
      flagCodes: sql<
        string | null
      >`CONCAT_WS(',', (SELECT GROUP_CONCAT(DISTINCT f.code ORDER BY f.code SEPARATOR ',') FROM ${submissionFlags} f WHERE f.submission_id = ${submissions.id}), IF(${recheckOpen}, ${RECHECK_REASON}, NULL))`,
    })
    .from(submissions)
    .innerJoin(users, eq(users.id, submissions.userId))
    .innerJoin(moduleVersions, eq(moduleVersions.id, submissions.moduleVersionId))
    .leftJoin(
      enrollments,
      and(eq(enrollments.userId, submissions.userId), eq(enrollments.courseId, submissions.courseId)),
    )
    .leftJoin(sections, eq(sections.id, enrollments.sectionId))
    .leftJoin(labGroups, eq(labGroups.id, submissions.labGroupId))
    .where(filter)
  const rows = await base
    .orderBy(q.order === 'asc' ? asc(sortCol) : desc(sortCol), desc(submissions.id))
    .limit(q.pageSize)
    .offset((q.page - 1) * q.pageSize)
  const [totalRow] = await db
    .select({ n: count() })
    .from(submissions)
    .innerJoin(users, eq(users.id, submissions.userId))
    .innerJoin(moduleVersions, eq(moduleVersions.id, submissions.moduleVersionId))
    .leftJoin(
      enrollments,
      and(eq(enrollments.userId, submissions.userId), eq(enrollments.courseId, submissions.courseId)),
    )
    .where(filter)
  return {
    rows: rows.map((r) => ({
      ...r,
      submittedAt: r.submittedAt.toISOString(),
      score: r.score === null ? null : Number(r.score),
      flagCodes: r.flagCodes ? r.flagCodes.split(',') : [],
    })),
    total: totalRow?.n ?? 0,
  }
}

/** The section of a submission's submitter (for a TA's section scope). */
export async function submitterSection(db: Executor, submissionId: number): Promise<number | null> {
  const [row] = await db
    .select({ sectionId: enrollments.sectionId })
    .from(submissions)
    .innerJoin(
      enrollments,
      and(eq(enrollments.userId, submissions.userId), eq(enrollments.courseId, submissions.courseId)),
    )
    .where(eq(submissions.id, submissionId))
  return row?.sectionId ?? null
}

/**
 * Takes the submission for a staff edit: locks its row and checks the revision the editor saw.
 * @returns the current revision, or null when another edit came first
 */
export async function lockRevision(tx: Executor, submissionId: number, seen: number): Promise<boolean> {
  const [row] = await tx
    .select({ revision: submissions.revision })
    .from(submissions)
    .where(eq(submissions.id, submissionId))
    .for('update')
  return row !== undefined && row.revision === seen
}

export async function bumpRevision(
  tx: Executor,
  submissionId: number,
  set: Partial<{
    reviewStatus: SettableReviewState
    scoreOverride: number | null
    rawScore: number
    score: number
  }> = {},
) {
  await tx
    .update(submissions)
    .set({ ...set, revision: sql`${submissions.revision} + 1` })
    .where(eq(submissions.id, submissionId))
}

export async function findCheck(tx: Executor, submissionId: number, checkId: number) {
  const [row] = await tx
    .select()
    .from(submissionChecks)
    .where(and(eq(submissionChecks.id, checkId), eq(submissionChecks.submissionId, submissionId)))
  return row ?? null
}

export async function setCheckPoints(tx: Executor, checkId: number, points: number) {
  await tx
    .update(submissionChecks)
    .set({ pointsAwarded: points, overridden: true })
    .where(eq(submissionChecks.id, checkId))
}

export async function sumAwarded(tx: Executor, submissionId: number): Promise<number> {
  const [row] = await tx
    .select({ s: sql<number>`COALESCE(SUM(${submissionChecks.pointsAwarded}), 0)` })
    .from(submissionChecks)
    .where(eq(submissionChecks.submissionId, submissionId))
  return Number(row?.s ?? 0)
}

export async function insertGradeChange(
  tx: Executor,
  c: {
    submissionId: number
    checkId: number | null
    target: string
    changedBy: number
    oldPoints: number | null
    newPoints: number
    reason: string
  },
) {
  await tx.insert(gradeChanges).values(c)
}

export async function listGradeChanges(db: Executor, submissionId: number) {
  return db
    .select({
      id: gradeChanges.id,
      target: gradeChanges.target,
      changedBy: users.displayName,
      at: gradeChanges.createdAt,
      oldPoints: gradeChanges.oldPoints,
      newPoints: gradeChanges.newPoints,
      reason: gradeChanges.reason,
    })
    .from(gradeChanges)
    .innerJoin(users, eq(users.id, gradeChanges.changedBy))
    .where(eq(gradeChanges.submissionId, submissionId))
    .orderBy(asc(gradeChanges.id))
}

export async function insertComment(tx: Executor, submissionId: number, authorId: number, body: string) {
  await tx.insert(submissionComments).values({ submissionId, authorId, body })
}

export async function listComments(db: Executor, submissionId: number) {
  return db
    .select({
      id: submissionComments.id,
      author: users.displayName,
      at: submissionComments.createdAt,
      body: submissionComments.body,
    })
    .from(submissionComments)
    .innerJoin(users, eq(users.id, submissionComments.authorId))
    .where(eq(submissionComments.submissionId, submissionId))
    .orderBy(asc(submissionComments.id))
}

export async function setFlagStatus(
  tx: Executor,
  submissionId: number,
  flagId: number,
  status: FlagStatus,
  userId: number,
): Promise<boolean> {
  const [res] = await tx
    .update(submissionFlags)
    .set(
      status === 'resolved'
        ? { status, resolvedBy: userId, resolvedAt: new Date() }
        : { status, resolvedBy: null, resolvedAt: null },
    )
    .where(and(eq(submissionFlags.id, flagId), eq(submissionFlags.submissionId, submissionId)))
  return ((res as { affectedRows?: number }).affectedRows ?? 0) > 0
}

/** A flag not yet in any staff digest, with what the digest line says about it. */
export interface UndigestedFlag {
  id: number
  message: string
  submissionId: number
  courseId: number
  moduleTitle: string
  student: string
  /** The student's section in the course (null: none, or no longer enrolled). */
  sectionId: number | null
}

/**
 * The oldest flags no digest has listed yet, locked for this transaction. SKIP LOCKED lets a second
 * server process take the next flags instead of waiting for (and then repeating) these.
 */
export async function claimUndigestedFlags(tx: Executor, batch: number): Promise<UndigestedFlag[]> {
  return tx
    .select({
      id: submissionFlags.id,
      message: submissionFlags.message,
      submissionId: submissions.id,
      courseId: submissions.courseId,
      moduleTitle: moduleVersions.title,
      student: users.displayName,
      sectionId: enrollments.sectionId,
    })
    .from(submissionFlags)
    .innerJoin(submissions, eq(submissions.id, submissionFlags.submissionId))
    .innerJoin(moduleVersions, eq(moduleVersions.id, submissions.moduleVersionId))
    .innerJoin(users, eq(users.id, submissions.userId))
    .leftJoin(
      enrollments,
      and(eq(enrollments.userId, submissions.userId), eq(enrollments.courseId, submissions.courseId)),
    )
    .where(isNull(submissionFlags.digestedAt))
    .orderBy(asc(submissionFlags.id))
    .limit(batch)
    .for('update', { skipLocked: true })
}

/** Marks flags as listed in a digest, so no later digest lists them again. */
export async function markFlagsDigested(tx: Executor, flagIds: number[]): Promise<void> {
  if (flagIds.length === 0) return
  await tx
    .update(submissionFlags)
    .set({ digestedAt: sql`CURRENT_TIMESTAMP(3)` })
    .where(inArray(submissionFlags.id, flagIds))
}

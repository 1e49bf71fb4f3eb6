import type { SubmissionStatus } from '../../shared/schemas/submissions'
import { and, asc, desc, eq, inArray, sql } from 'drizzle-orm'
import type { SQL } from 'drizzle-orm'
import type { Executor } from '../db/client'
import {
  enrollments,
  labGroups,
  mailOutbox,
  modules,
  recheckRequests,
  sections,
  submissionChecks,
  submissions,
  users,
} from '../db/schema'
import type { ReviewState } from '../../shared/schemas/review'

export interface StudentRow {
  userId: number
  name: string
  email: string
  sectionId: number | null
  sectionName: string | null
  labGroupId: number | null
  labGroupName: string | null
}

/** The students of a course, by name; `sectionId` / `labGroupId` narrow the list. */
export async function listStudents(
  db: Executor,
  courseId: number,
  f: { sectionId?: number | undefined; labGroupId?: number | undefined } = {},
): Promise<StudentRow[]> {
  const where: SQL[] = [eq(enrollments.courseId, courseId), eq(enrollments.role, 'student')]
  if (f.sectionId !== undefined) where.push(eq(enrollments.sectionId, f.sectionId))
  if (f.labGroupId !== undefined) where.push(eq(enrollments.labGroupId, f.labGroupId))
  return db
    .select({
      userId: users.id,
      name: users.displayName,
      email: users.email,
      sectionId: enrollments.sectionId,
      sectionName: sections.name,
      labGroupId: enrollments.labGroupId,
      labGroupName: labGroups.name,
    })
    .from(enrollments)
    .innerJoin(users, eq(users.id, enrollments.userId))
    .leftJoin(sections, eq(sections.id, enrollments.sectionId))
    .leftJoin(labGroups, eq(labGroups.id, enrollments.labGroupId))
    .where(and(...where))
    .orderBy(asc(users.displayName), asc(users.id))
}

export async function listSectionOptions(db: Executor, courseId: number) {
  return db
    .select({ id: sections.id, name: sections.name })
    .from(sections)
    .where(eq(sections.courseId, courseId))
    .orderBy(asc(sections.name))
}

export async function listLabGroupOptions(db: Executor, courseId: number) {
  return db
    .select({ id: labGroups.id, name: labGroups.name, sectionId: labGroups.sectionId })
    .from(labGroups)
    .where(eq(labGroups.courseId, courseId))
    .orderBy(asc(labGroups.name))
}

export interface GradedRow {
  id: number
  moduleId: number
  userId: number
  labGroupId: number | null
  attempt: number
  score: number | null
  scoreOverride: number | null
  maxScore: number | null
  isLate: boolean
  daysLate: number
  reviewStatus: ReviewState
  recheckOpen: boolean
}

/** Every graded hand-in of these modules, newest attempt first. */
export async function listGraded(db: Executor, courseId: number, moduleIds: number[]): Promise<GradedRow[]> {
  if (moduleIds.length === 0) return []
  const rows = await db
    .select({
      id: submissions.id,
      moduleId: submissions.moduleId,
      userId: submissions.userId,
      labGroupId: submissions.labGroupId,
      attempt: submissions.attempt,
      score: submissions.score,
      scoreOverride: submissions.scoreOverride,
      maxScore: submissions.maxScore,
      isLate: submissions.isLate,
      daysLate: submissions.daysLate,
      reviewStatus: submissions.reviewStatus,
      recheckOpen:
        sql<number>`EXISTS (SELECT 1 FROM ${recheckRequests} rr WHERE rr.submission_id = ${submissions.id} AND rr.status = 'open')`.mapWith(
          Number,
        ),
    })
    .from(submissions)
    .where(
      and(
        eq(submissions.courseId, courseId),
        inArray(submissions.moduleId, moduleIds),
        eq(submissions.status, 'graded'),
      ),
    )
    .orderBy(desc(submissions.attempt), desc(submissions.id))
  return rows.map((r) => ({ ...r, recheckOpen: r.recheckOpen === 1 }))
}

export interface AnyAttemptRow {
  id: number
  moduleId: number
  userId: number
  labGroupId: number | null
  attempt: number
  status: SubmissionStatus
}

/** Every hand-in (graded or not) of one student or lab group for these modules, newest first. */
export async function listAttemptsOf(
  db: Executor,
  courseId: number,
  userId: number,
  labGroupId: number | null,
): Promise<AnyAttemptRow[]> {
  return db
    .select({
      id: submissions.id,
      moduleId: submissions.moduleId,
      userId: submissions.userId,
      labGroupId: submissions.labGroupId,
      attempt: submissions.attempt,
      status: submissions.status,
    })
    .from(submissions)
    .where(
      and(
        eq(submissions.courseId, courseId),
        labGroupId === null
          ? eq(submissions.userId, userId)
          : sql`(${submissions.userId} = ${userId} OR ${submissions.labGroupId} = ${labGroupId})`,
      ),
    )
    .orderBy(desc(submissions.attempt), desc(submissions.id))
}

/** Pass/fail of every check of these hand-ins. */
export async function listCheckOutcomes(db: Executor, submissionIds: number[]) {
  if (submissionIds.length === 0) return []
  return db
    .select({
      submissionId: submissionChecks.submissionId,
      key: submissionChecks.resultKey,
      label: submissionChecks.label,
      pass: submissionChecks.pass,
    })
    .from(submissionChecks)
    .where(inArray(submissionChecks.submissionId, submissionIds))
}

export async function setModuleWeight(db: Executor, moduleId: number, weight: number): Promise<void> {
  await db.update(modules).set({ weight }).where(eq(modules.id, moduleId))
}

export async function moduleWeights(db: Executor, courseId: number): Promise<Map<number, number>> {
  const rows = await db
    .select({ id: modules.id, weight: modules.weight })
    .from(modules)
    .where(eq(modules.courseId, courseId))
  return new Map(rows.map((r) => [r.id, r.weight]))
}

export async function setGradesReleased(db: Executor, moduleId: number, at: Date | null): Promise<void> {
  await db.update(modules).set({ gradesReleasedAt: at }).where(eq(modules.id, moduleId))
}

export interface RecheckRow {
  id: number
  submissionId: number
  requestedById: number
  requestedBy: string
  requesterEmail: string
  message: string
  status: 'open' | 'answered'
  answer: string | null
  answeredBy: string | null
  answeredAt: Date | null
  createdAt: Date
}

/** Re-check requests of these hand-ins, oldest first. */
export async function listRechecks(db: Executor, submissionIds: number[]): Promise<RecheckRow[]> {
  if (submissionIds.length === 0) return []
  const rows = await db
    .select({
      id: recheckRequests.id,
      submissionId: recheckRequests.submissionId,
      requestedById: recheckRequests.requestedBy,
      requestedBy: users.displayName,
      requesterEmail: users.email,
      message: recheckRequests.message,
      status: recheckRequests.status,
      answer: recheckRequests.answer,
      answeredById: recheckRequests.answeredBy,
      answeredAt: recheckRequests.answeredAt,
      createdAt: recheckRequests.createdAt,
    })
    .from(recheckRequests)
    .innerJoin(users, eq(users.id, recheckRequests.requestedBy))
    .where(inArray(recheckRequests.submissionId, submissionIds))
    .orderBy(asc(recheckRequests.id))
  const answerIds = [...new Set(rows.map((r) => r.answeredById).filter((x): x is number => x !== null))]
  const names = answerIds.length
    ? new Map(
        (
          await db.select({ id: users.id, name: users.displayName }).from(users).where(inArray(users.id, answerIds))
        ).map((r) => [r.id, r.name]),
      )
    : new Map<number, string>()
  return rows.map(({ answeredById, ...r }) => ({
    ...r,
    answeredBy: answeredById === null ? null : (names.get(answeredById) ?? null),
  }))
}

/** Locks the hand-in's row so two requests for it cannot both find "none open". */
export async function lockSubmission(tx: Executor, submissionId: number): Promise<void> {
  await tx.select({ id: submissions.id }).from(submissions).where(eq(submissions.id, submissionId)).for('update')
}

export async function hasOpenRecheck(tx: Executor, submissionId: number): Promise<boolean> {
  const rows = await tx
    .select({ id: recheckRequests.id })
    .from(recheckRequests)
    .where(and(eq(recheckRequests.submissionId, submissionId), eq(recheckRequests.status, 'open')))
    .limit(1)
  return rows.length > 0
}

export async function insertRecheck(
  tx: Executor,
  r: { courseId: number; submissionId: number; requestedBy: number; message: string },
): Promise<number> {
  const [row] = await tx.insert(recheckRequests).values(r).$returningId()
  return row!.id
}

/** The request, locked for the answer. */
export async function findRecheckForUpdate(tx: Executor, submissionId: number, requestId: number) {
  const [row] = await tx
    .select({
      id: recheckRequests.id,
      status: recheckRequests.status,
      requestedBy: recheckRequests.requestedBy,
      message: recheckRequests.message,
    })
    .from(recheckRequests)
    .where(and(eq(recheckRequests.id, requestId), eq(recheckRequests.submissionId, submissionId)))
    .for('update')
  return row ?? null
}

export async function saveRecheckAnswer(
  tx: Executor,
  requestId: number,
  answer: string,
  answeredBy: number,
): Promise<void> {
  await tx
    .update(recheckRequests)
    .set({ status: 'answered', answer, answeredBy, answeredAt: new Date() })
    .where(eq(recheckRequests.id, requestId))
}

/** Puts a hand-in (back) in the review queue and moves its revision on, so open editors reload. */
export async function reopenForReview(tx: Executor, submissionId: number): Promise<void> {
  await tx
    .update(submissions)
    .set({ reviewStatus: 'open', revision: sql`${submissions.revision} + 1` })
    .where(eq(submissions.id, submissionId))
}

/** Addresses that already have mail with this dedupe key (queued or sent). */
export async function queuedAddresses(tx: Executor, dedupeKey: string): Promise<Set<string>> {
  const rows = await tx.select({ to: mailOutbox.toAddress }).from(mailOutbox).where(eq(mailOutbox.dedupeKey, dedupeKey))
  return new Set(rows.map((r) => r.to))
}

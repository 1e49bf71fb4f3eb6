import type { LogFingerprint } from '../../shared/grading/fingerprint'
import type { SubmissionStatus } from '../../shared/schemas/submissions'
import type { UncertaintyContribution } from '../../shared/grading/uncertainty'
import { and, asc, count, desc, eq, ne, or, sql } from 'drizzle-orm'
import type { Executor } from '../db/client'
import {
  enrollments,
  labGroups,
  submissionChecks,
  submissionFiles,
  submissionFlags,
  submissions,
  users,
} from '../db/schema'
import type { ColumnMappingRow, SubmissionInputs } from '../db/schema'
import type { ReviewState } from '../../shared/schemas/review'

export interface SubmissionRow {
  id: number
  courseId: number
  moduleId: number
  moduleVersionId: number
  userId: number
  labGroupId: number | null
  attempt: number
  status: SubmissionStatus
  gradingError: string | null
  inputs: SubmissionInputs
  isLate: boolean
  daysLate: number
  latePenalty: number
  rawScore: number | null
  score: number | null
  scoreOverride: number | null
  maxScore: number | null
  reviewStatus: ReviewState
  revision: number
  submittedAt: Date
  gradedAt: Date | null
  submittedBy: string
  /** The signed-off stand run the hand-in was made against, if any. */
  runRecordId: number | null
}

const cols = {
  id: submissions.id,
  courseId: submissions.courseId,
  moduleId: submissions.moduleId,
  moduleVersionId: submissions.moduleVersionId,
  userId: submissions.userId,
  labGroupId: submissions.labGroupId,
  attempt: submissions.attempt,
  status: submissions.status,
  gradingError: submissions.gradingError,
  inputs: submissions.inputs,
  isLate: submissions.isLate,
  daysLate: submissions.daysLate,
  latePenalty: submissions.latePenalty,
  rawScore: submissions.rawScore,
  score: submissions.score,
  scoreOverride: submissions.scoreOverride,
  maxScore: submissions.maxScore,
  reviewStatus: submissions.reviewStatus,
  revision: submissions.revision,
  submittedAt: submissions.submittedAt,
  gradedAt: submissions.gradedAt,
  submittedBy: users.displayName,
  runRecordId: submissions.runRecordId,
}

/** Whose attempts count together: the lab group's when the module takes group hand-ins. */
export type Owner = { userId: number } | { labGroupId: number }

const ownerWhere = (moduleId: number, owner: Owner) =>
  'labGroupId' in owner
    ? and(eq(submissions.moduleId, moduleId), eq(submissions.labGroupId, owner.labGroupId))
    : and(eq(submissions.moduleId, moduleId), eq(submissions.userId, owner.userId))

/**
 * Serialises hand-ins of one student (or one lab group) so two at once cannot both take the last
 * attempt: the enrollment or lab-group row is locked until the transaction ends.
 */
export async function lockOwner(tx: Executor, courseId: number, owner: Owner): Promise<void> {
  if ('labGroupId' in owner) {
    await tx.select({ id: labGroups.id }).from(labGroups).where(eq(labGroups.id, owner.labGroupId)).for('update')
  } else {
    await tx
      .select({ id: enrollments.id })
      .from(enrollments)
      .where(and(eq(enrollments.userId, owner.userId), eq(enrollments.courseId, courseId)))
      .for('update')
  }
}

export async function countAttempts(db: Executor, moduleId: number, owner: Owner): Promise<number> {
  const [row] = await db.select({ n: count() }).from(submissions).where(ownerWhere(moduleId, owner))
  return row?.n ?? 0
}

export async function insertSubmission(
  tx: Executor,
  s: {
    courseId: number
    moduleId: number
    moduleVersionId: number
    userId: number
    labGroupId: number | null
    attempt: number
    inputs: SubmissionInputs
    isLate: boolean
    daysLate: number
    latePenalty: number
    runRecordId?: number | null
  },
): Promise<number> {
  const [row] = await tx
    .insert(submissions)
    .values({ ...s, status: 'received' })
    .$returningId()
  return row!.id
}

export async function insertFile(
  tx: Executor,
  f: {
    submissionId: number
    courseId: number
    tableKey: string
    filename: string
    contentType: string
    size: number
    sha256: string
    bytes: Buffer
    mapping: Record<string, ColumnMappingRow>
    parsed: Record<string, number[]>
    rowCount: number
    /** See shared/grading/fingerprint.ts; null (or left out) for a log that has none. */
    fingerprint?: LogFingerprint | null
  },
): Promise<number> {
  const [row] = await tx.insert(submissionFiles).values(f).$returningId()
  return row!.id
}

export interface CheckWrite {
  resultKey: string
  label: string
  unit: string
  reported: number | null
  expected: number | null
  absError: number | null
  relError: number | null
  tolerance: number | null
  standardUncertainty: number | null
  coverageFactor: number | null
  uncertaintyContributions: UncertaintyContribution[] | null
  pointsPossible: number
  pointsAwarded: number
  pass: boolean
  outcome: 'pass' | 'partial' | 'fail' | 'error'
  error: string | null
}

export interface FlagWrite {
  code: string
  message: string
  detail: Record<string, number | string> | null
}

/**
 * Writes a grade in one short transaction with a fixed lock order: the submission row first (FOR
 * UPDATE), then its checks and flags. It writes only for the claim that holds the job (status
 * 'grading' with this token), so a retried, duplicated or stale job never writes a grade twice.
 * Checks are written by key (one per result, insert-or-update), never deleted and re-inserted:
 * deleting takes gap locks that concurrent hand-ins' inserts deadlock on.
 *
 * @returns false when the claim no longer holds the job (nothing was written)
 */
export async function saveGrade(
  tx: Executor,
  claim: { submissionId: number; token: number },
  g: {
    status: 'graded' | 'grading-failed'
    gradingError: string | null
    rawScore: number | null
    score: number | null
    maxScore: number | null
  },
  checks: CheckWrite[],
  flags: FlagWrite[],
): Promise<boolean> {
  const submissionId = claim.submissionId
  const [row] = await tx
    .select({ status: submissions.status, token: submissions.gradeAttempts })
    .from(submissions)
    .where(eq(submissions.id, submissionId))
    .for('update')
  if (!row || row.status !== 'grading' || row.token !== claim.token) return false
  if (checks.length) {
    const c = submissionChecks
    await tx
      .insert(c)
      .values(checks.map((x) => ({ ...x, submissionId })))
      .onDuplicateKeyUpdate({
        set: {
          label: sql`VALUES(${c.label})`,
          unit: sql`VALUES(${c.unit})`,
          reported: sql`VALUES(${c.reported})`,
          expected: sql`VALUES(${c.expected})`,
          absError: sql`VALUES(${c.absError})`,
          relError: sql`VALUES(${c.relError})`,
          tolerance: sql`VALUES(${c.tolerance})`,
          standardUncertainty: sql`VALUES(${c.standardUncertainty})`,
          coverageFactor: sql`VALUES(${c.coverageFactor})`,
          uncertaintyContributions: sql`VALUES(${c.uncertaintyContributions})`,
          pointsPossible: sql`VALUES(${c.pointsPossible})`,
          pointsAwarded: sql`VALUES(${c.pointsAwarded})`,
          pass: sql`VALUES(${c.pass})`,
          outcome: sql`VALUES(${c.outcome})`,
          error: sql`VALUES(${c.error})`,
        },
      })
  }
  if (flags.length) await tx.insert(submissionFlags).values(flags.map((f) => ({ ...f, submissionId })))
  await tx
    .update(submissions)
    .set({
      ...g,
      gradedAt: sql`CURRENT_TIMESTAMP(3)`,
      gradeClaimedAt: null,
      ...(flags.length ? { reviewStatus: 'open' as const } : {}),
    })
    .where(eq(submissions.id, submissionId))
  return true
}

/** Files in the course with these bytes that belong to someone else (another person and group). */
/** Hand-ins of someone else: another person, and not the same lab group. */
export function notOwnedBy(owner: { userId: number; labGroupId: number | null }) {
  return owner.labGroupId !== null
    ? and(
        ne(submissions.userId, owner.userId),
        or(ne(submissions.labGroupId, owner.labGroupId), sql`${submissions.labGroupId} IS NULL`),
      )
    : ne(submissions.userId, owner.userId)
}

export async function findIdenticalFiles(
  db: Executor,
  courseId: number,
  sha256: string,
  owner: { userId: number; labGroupId: number | null },
): Promise<{ submissionId: number; submittedBy: string; labGroupName: string | null }[]> {
  const notMine = notOwnedBy(owner)
  return db
    .select({ submissionId: submissions.id, submittedBy: users.displayName, labGroupName: labGroups.name })
    .from(submissionFiles)
    .innerJoin(submissions, eq(submissions.id, submissionFiles.submissionId))
    .innerJoin(users, eq(users.id, submissions.userId))
    .leftJoin(labGroups, eq(labGroups.id, submissions.labGroupId))
    .where(and(eq(submissionFiles.courseId, courseId), eq(submissionFiles.sha256, sha256), notMine))
    .orderBy(asc(submissions.id))
    .limit(5)
}

/** Most fingerprints one near-copy check reads: the newest hand-ins of the module first. */
export const MAX_NEAR_COPY_CANDIDATES = 500

/**
 * The fingerprints of the module's other logs of one table that belong to someone else (another
 * person and group), newest first. A null fingerprint is a file stored before fingerprints existed.
 */
export async function findFingerprintsInModule(
  db: Executor,
  moduleId: number,
  tableKey: string,
  owner: { userId: number; labGroupId: number | null },
): Promise<
  {
    fileId: number
    submissionId: number
    submittedBy: string
    labGroupName: string | null
    sha256: string
    fingerprint: LogFingerprint | null
  }[]
> {
  const notMine = notOwnedBy(owner)
  return db
    .select({
      fileId: submissionFiles.id,
      submissionId: submissions.id,
      submittedBy: users.displayName,
      labGroupName: labGroups.name,
      sha256: submissionFiles.sha256,
      fingerprint: submissionFiles.fingerprint,
    })
    .from(submissionFiles)
    .innerJoin(submissions, eq(submissions.id, submissionFiles.submissionId))
    .innerJoin(users, eq(users.id, submissions.userId))
    .leftJoin(labGroups, eq(labGroups.id, submissions.labGroupId))
    .where(and(eq(submissions.moduleId, moduleId), eq(submissionFiles.tableKey, tableKey), notMine))
    .orderBy(desc(submissions.id))
    .limit(MAX_NEAR_COPY_CANDIDATES)
}

/** The parsed columns of one stored file (to fingerprint a file stored before fingerprints existed). */
export async function findParsedColumns(db: Executor, fileId: number): Promise<Record<string, number[]> | null> {
  const rows = await db
    .select({ parsed: submissionFiles.parsed })
    .from(submissionFiles)
    .where(eq(submissionFiles.id, fileId))
    .limit(1)
  return rows[0]?.parsed ?? null
}

export async function setFingerprint(db: Executor, fileId: number, fingerprint: LogFingerprint): Promise<void> {
  await db.update(submissionFiles).set({ fingerprint }).where(eq(submissionFiles.id, fileId))
}

export async function listOwnerSubmissions(
  db: Executor,
  moduleId: number,
  owner: Owner,
): Promise<(SubmissionRow & { flagCount: number })[]> {
  const rows = await db
    .select({
      ...cols,
      flagCount:
        sql<number>`(SELECT COUNT(*) FROM ${submissionFlags} f WHERE f.submission_id = ${submissions.id})`.mapWith(
          Number,
        ),
    })
    .from(submissions)
    .innerJoin(users, eq(users.id, submissions.userId))
    .where(ownerWhere(moduleId, owner))
    .orderBy(desc(submissions.attempt))
  return rows
}

export async function findSubmission(db: Executor, courseId: number, id: number): Promise<SubmissionRow | null> {
  const rows = await db
    .select(cols)
    .from(submissions)
    .innerJoin(users, eq(users.id, submissions.userId))
    .where(and(eq(submissions.id, id), eq(submissions.courseId, courseId)))
    .limit(1)
  return rows[0] ?? null
}

/** A submission by id alone (the grading worker's view, not a person's). */
export async function findSubmissionById(db: Executor, id: number): Promise<SubmissionRow | null> {
  const rows = await db
    .select(cols)
    .from(submissions)
    .innerJoin(users, eq(users.id, submissions.userId))
    .where(eq(submissions.id, id))
    .limit(1)
  return rows[0] ?? null
}

export async function listChecks(db: Executor, submissionId: number) {
  return db
    .select()
    .from(submissionChecks)
    .where(eq(submissionChecks.submissionId, submissionId))
    .orderBy(asc(submissionChecks.id))
}

export async function listFlags(db: Executor, submissionId: number) {
  return db
    .select()
    .from(submissionFlags)
    .where(eq(submissionFlags.submissionId, submissionId))
    .orderBy(asc(submissionFlags.id))
}

export async function listFiles(db: Executor, submissionId: number) {
  return db
    .select({
      id: submissionFiles.id,
      tableKey: submissionFiles.tableKey,
      filename: submissionFiles.filename,
      size: submissionFiles.size,
      rowCount: submissionFiles.rowCount,
      sha256: submissionFiles.sha256,
      mapping: submissionFiles.mapping,
      parsed: submissionFiles.parsed,
      fingerprint: submissionFiles.fingerprint,
    })
    .from(submissionFiles)
    .where(eq(submissionFiles.submissionId, submissionId))
    .orderBy(asc(submissionFiles.id))
}

export async function findFileBytes(db: Executor, submissionId: number, fileId: number) {
  const rows = await db
    .select({
      filename: submissionFiles.filename,
      contentType: submissionFiles.contentType,
      bytes: submissionFiles.bytes,
    })
    .from(submissionFiles)
    .where(and(eq(submissionFiles.id, fileId), eq(submissionFiles.submissionId, submissionId)))
    .limit(1)
  return rows[0] ?? null
}

export async function labGroupName(db: Executor, id: number | null): Promise<string | null> {
  if (id === null) return null
  const [row] = await db.select({ name: labGroups.name }).from(labGroups).where(eq(labGroups.id, id))
  return row?.name ?? null
}

export async function groupMemberEmails(
  db: Executor,
  labGroupId: number,
): Promise<{ email: string; displayName: string }[]> {
  return db
    .select({ email: users.email, displayName: users.displayName })
    .from(enrollments)
    .innerJoin(users, eq(users.id, enrollments.userId))
    .where(and(eq(enrollments.labGroupId, labGroupId), eq(enrollments.role, 'student')))
}

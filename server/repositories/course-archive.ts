import { and, asc, eq, gt } from 'drizzle-orm'
import { alias } from 'drizzle-orm/mysql-core'
import type { Executor } from '../db/client'
import {
  gradeChanges,
  labGroups,
  moduleVersions,
  modules,
  recheckRequests,
  submissionChecks,
  submissionComments,
  submissionFiles,
  submissionImages,
  submissionFlags,
  submissions,
  users,
} from '../db/schema'

/**
 * Everything of one course that the end-of-term archive writes, read in pages by id (keyset: each
 * page starts after the last id of the one before), so a course of any size is read with a small,
 * flat amount of memory. Raw file bytes are read one file at a time.
 */

export const ARCHIVE_PAGE_SIZE = 200

export async function pageSubmissions(db: Executor, courseId: number, afterId: number, limit = ARCHIVE_PAGE_SIZE) {
  return db
    .select({
      id: submissions.id,
      module: modules.slug,
      moduleVersion: moduleVersions.number,
      moduleTitle: moduleVersions.title,
      submittedByEmail: users.email,
      submittedBy: users.displayName,
      labGroup: labGroups.name,
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
      submittedAt: submissions.submittedAt,
      gradedAt: submissions.gradedAt,
    })
    .from(submissions)
    .innerJoin(modules, eq(modules.id, submissions.moduleId))
    .innerJoin(moduleVersions, eq(moduleVersions.id, submissions.moduleVersionId))
    .innerJoin(users, eq(users.id, submissions.userId))
    .leftJoin(labGroups, eq(labGroups.id, submissions.labGroupId))
    .where(and(eq(submissions.courseId, courseId), gt(submissions.id, afterId)))
    .orderBy(asc(submissions.id))
    .limit(limit)
}

/** The files' descriptions, without their bytes or parsed values. */
export async function pageFiles(db: Executor, courseId: number, afterId: number, limit = ARCHIVE_PAGE_SIZE) {
  return db
    .select({
      id: submissionFiles.id,
      submissionId: submissionFiles.submissionId,
      tableKey: submissionFiles.tableKey,
      filename: submissionFiles.filename,
      contentType: submissionFiles.contentType,
      size: submissionFiles.size,
      sha256: submissionFiles.sha256,
      mapping: submissionFiles.mapping,
      rowCount: submissionFiles.rowCount,
      createdAt: submissionFiles.createdAt,
    })
    .from(submissionFiles)
    .where(and(eq(submissionFiles.courseId, courseId), gt(submissionFiles.id, afterId)))
    .orderBy(asc(submissionFiles.id))
    .limit(limit)
}

/**
 * The files' parsed columns (SI values). A parsed log can run to many thousand samples per column,
 * so these pages are small.
 */
export async function pageParsedValues(db: Executor, courseId: number, afterId: number, limit = 10) {
  return db
    .select({
      id: submissionFiles.id,
      submissionId: submissionFiles.submissionId,
      tableKey: submissionFiles.tableKey,
      parsed: submissionFiles.parsed,
    })
    .from(submissionFiles)
    .where(and(eq(submissionFiles.courseId, courseId), gt(submissionFiles.id, afterId)))
    .orderBy(asc(submissionFiles.id))
    .limit(limit)
}

/** The photographs' descriptions, without their bytes (the marks are in the hand-ins' inputs). */
export async function pagePhotos(db: Executor, courseId: number, afterId: number, limit = ARCHIVE_PAGE_SIZE) {
  return db
    .select({
      id: submissionImages.id,
      submissionId: submissionImages.submissionId,
      imageKey: submissionImages.imageKey,
      contentType: submissionImages.contentType,
      width: submissionImages.width,
      height: submissionImages.height,
      size: submissionImages.size,
      sha256: submissionImages.sha256,
      originalSha256: submissionImages.originalSha256,
      originalSize: submissionImages.originalSize,
      createdAt: submissionImages.createdAt,
    })
    .from(submissionImages)
    .where(and(eq(submissionImages.courseId, courseId), gt(submissionImages.id, afterId)))
    .orderBy(asc(submissionImages.id))
    .limit(limit)
}

/** One stored photograph's bytes (as stored: re-encoded, without metadata). */
export async function photoBytes(db: Executor, courseId: number, photoId: number): Promise<Buffer | null> {
  const rows = await db
    .select({ bytes: submissionImages.bytes })
    .from(submissionImages)
    .where(and(eq(submissionImages.courseId, courseId), eq(submissionImages.id, photoId)))
    .limit(1)
  return rows[0]?.bytes ?? null
}

/** One stored file's raw bytes. */
export async function fileBytes(db: Executor, courseId: number, fileId: number): Promise<Buffer | null> {
  const rows = await db
    .select({ bytes: submissionFiles.bytes })
    .from(submissionFiles)
    .where(and(eq(submissionFiles.courseId, courseId), eq(submissionFiles.id, fileId)))
    .limit(1)
  return rows[0]?.bytes ?? null
}

export async function pageChecks(db: Executor, courseId: number, afterId: number, limit = ARCHIVE_PAGE_SIZE) {
  return db
    .select({
      id: submissionChecks.id,
      submissionId: submissionChecks.submissionId,
      resultKey: submissionChecks.resultKey,
      label: submissionChecks.label,
      unit: submissionChecks.unit,
      reported: submissionChecks.reported,
      expected: submissionChecks.expected,
      absError: submissionChecks.absError,
      relError: submissionChecks.relError,
      tolerance: submissionChecks.tolerance,
      standardUncertainty: submissionChecks.standardUncertainty,
      coverageFactor: submissionChecks.coverageFactor,
      pointsPossible: submissionChecks.pointsPossible,
      pointsAwarded: submissionChecks.pointsAwarded,
      overridden: submissionChecks.overridden,
      pass: submissionChecks.pass,
      outcome: submissionChecks.outcome,
      error: submissionChecks.error,
    })
    .from(submissionChecks)
    .innerJoin(submissions, eq(submissions.id, submissionChecks.submissionId))
    .where(and(eq(submissions.courseId, courseId), gt(submissionChecks.id, afterId)))
    .orderBy(asc(submissionChecks.id))
    .limit(limit)
}

export async function pageFlags(db: Executor, courseId: number, afterId: number, limit = ARCHIVE_PAGE_SIZE) {
  const resolver = alias(users, 'resolver')
  return db
    .select({
      id: submissionFlags.id,
      submissionId: submissionFlags.submissionId,
      code: submissionFlags.code,
      message: submissionFlags.message,
      detail: submissionFlags.detail,
      status: submissionFlags.status,
      resolvedBy: resolver.email,
      resolvedAt: submissionFlags.resolvedAt,
      createdAt: submissionFlags.createdAt,
    })
    .from(submissionFlags)
    .innerJoin(submissions, eq(submissions.id, submissionFlags.submissionId))
    .leftJoin(resolver, eq(resolver.id, submissionFlags.resolvedBy))
    .where(and(eq(submissions.courseId, courseId), gt(submissionFlags.id, afterId)))
    .orderBy(asc(submissionFlags.id))
    .limit(limit)
}

/** The audit of staff changes to points. */
export async function pageGradeChanges(db: Executor, courseId: number, afterId: number, limit = ARCHIVE_PAGE_SIZE) {
  return db
    .select({
      id: gradeChanges.id,
      submissionId: gradeChanges.submissionId,
      checkId: gradeChanges.checkId,
      target: gradeChanges.target,
      changedBy: users.email,
      oldPoints: gradeChanges.oldPoints,
      newPoints: gradeChanges.newPoints,
      reason: gradeChanges.reason,
      at: gradeChanges.createdAt,
    })
    .from(gradeChanges)
    .innerJoin(submissions, eq(submissions.id, gradeChanges.submissionId))
    .innerJoin(users, eq(users.id, gradeChanges.changedBy))
    .where(and(eq(submissions.courseId, courseId), gt(gradeChanges.id, afterId)))
    .orderBy(asc(gradeChanges.id))
    .limit(limit)
}

export async function pageComments(db: Executor, courseId: number, afterId: number, limit = ARCHIVE_PAGE_SIZE) {
  return db
    .select({
      id: submissionComments.id,
      submissionId: submissionComments.submissionId,
      author: users.email,
      body: submissionComments.body,
      at: submissionComments.createdAt,
    })
    .from(submissionComments)
    .innerJoin(submissions, eq(submissions.id, submissionComments.submissionId))
    .innerJoin(users, eq(users.id, submissionComments.authorId))
    .where(and(eq(submissions.courseId, courseId), gt(submissionComments.id, afterId)))
    .orderBy(asc(submissionComments.id))
    .limit(limit)
}

export async function pageRechecks(db: Executor, courseId: number, afterId: number, limit = ARCHIVE_PAGE_SIZE) {
  const requester = alias(users, 'requester')
  const answerer = alias(users, 'answerer')
  return db
    .select({
      id: recheckRequests.id,
      submissionId: recheckRequests.submissionId,
      requestedBy: requester.email,
      message: recheckRequests.message,
      status: recheckRequests.status,
      answer: recheckRequests.answer,
      answeredBy: answerer.email,
      answeredAt: recheckRequests.answeredAt,
      at: recheckRequests.createdAt,
    })
    .from(recheckRequests)
    .innerJoin(requester, eq(requester.id, recheckRequests.requestedBy))
    .leftJoin(answerer, eq(answerer.id, recheckRequests.answeredBy))
    .where(and(eq(recheckRequests.courseId, courseId), gt(recheckRequests.id, afterId)))
    .orderBy(asc(recheckRequests.id))
    .limit(limit)
}

/** The graded hand-ins of the course, by id: the ones with a feedback report. */
export async function pageGradedSubmissionIds(
  db: Executor,
  courseId: number,
  afterId: number,
  limit = ARCHIVE_PAGE_SIZE,
): Promise<number[]> {
  const rows = await db
    .select({ id: submissions.id })
    .from(submissions)
    .where(and(eq(submissions.courseId, courseId), eq(submissions.status, 'graded'), gt(submissions.id, afterId)))
    .orderBy(asc(submissions.id))
    .limit(limit)
  return rows.map((r) => r.id)
}

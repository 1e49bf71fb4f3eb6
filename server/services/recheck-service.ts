import { renderModule } from '../../shared/modules/render'
import type { ModuleFrontMatter } from '../../shared/modules/schema'
import type { RecheckStatus, RecheckView } from '../../shared/schemas/grades'
import type { Database, Executor } from '../db/client'
import { AppError, forbidden, notFound } from '../errors'
import type { CourseEnrollment } from '../repositories/enrollments'
import {
  findRecheckForUpdate,
  hasOpenRecheck,
  insertRecheck,
  listRechecks,
  lockSubmission,
  reopenForReview,
  saveRecheckAnswer,
} from '../repositories/grades'
import { courseTimeZone, findModule, findVersion } from '../repositories/modules'
import { pageLinks, recheckAnsweredMail } from '../mail/templates'
import { enqueueMail } from '../repositories/outbox'
import type { SubmissionRow } from '../repositories/submissions'
import { findSubmission } from '../repositories/submissions'
import { findUserById } from '../repositories/users'
import { inScope } from './review-service'

/** Re-check requests of these hand-ins as the API shows them (the answer rendered and sanitised). */
export async function recheckViews(db: Database, submissionIds: number[]): Promise<RecheckView[]> {
  const rows = await listRechecks(db, submissionIds)
  return rows.map((r) => ({
    id: r.id,
    submissionId: r.submissionId,
    requestedBy: r.requestedBy,
    message: r.message,
    status: r.status,
    createdAt: r.createdAt.toISOString(),
    answerHtml: r.answer === null ? null : renderModule(r.answer),
    answeredBy: r.answeredBy,
    answeredAt: r.answeredAt?.toISOString() ?? null,
  }))
}

/**
 * A student's own hand-in: they made it, or it is their lab group's hand-in of a module handed in
 * by group. Anything else does not exist for them (404).
 */
async function ownSubmission(
  db: Database,
  e: CourseEnrollment,
  submissionId: number,
): Promise<{ s: SubmissionRow; fm: ModuleFrontMatter | null }> {
  const s = await findSubmission(db, e.courseId, submissionId)
  if (!s) throw notFound('That submission')
  const v = await findVersion(db, s.moduleVersionId)
  const fm = (v?.frontMatter ?? null) as unknown as ModuleFrontMatter | null
  const mine =
    s.userId === e.userId || (!!fm?.groupSubmission && s.labGroupId !== null && s.labGroupId === e.labGroupId)
  if (!mine) throw notFound('That submission')
  return { s, fm }
}

/** Why a re-check cannot be asked for now, or null when it can. */
async function refusal(db: Executor, s: SubmissionRow): Promise<AppError | null> {
  const m = await findModule(db, s.courseId, s.moduleId)
  if (!m?.gradesReleasedAt) {
    return new AppError('not_released', 'You can ask for a re-check once the marks of this module are final.', 409)
  }
  if (s.status !== 'graded') return new AppError('not_graded', 'This hand-in has no grade to look at again.', 409)
  if (await hasOpenRecheck(db, s.id)) {
    return new AppError(
      'recheck_open',
      'A re-check request for this hand-in is already open; the staff will answer it first.',
      409,
    )
  }
  return null
}

/**
 * The re-check requests of a hand-in and whether the caller may ask for one. Students: their own
 * (or their lab group's) hand-ins; staff: as the review routes (a TA, their own section).
 */
export async function recheckStatus(db: Database, e: CourseEnrollment, submissionId: number): Promise<RecheckStatus> {
  const s = e.role === 'student' ? (await ownSubmission(db, e, submissionId)).s : await inScope(db, e, submissionId)
  const requests = await recheckViews(db, [s.id])
  if (e.role !== 'student') return { canRequest: false, reason: 'Only students ask for a re-check.', requests }
  const no = await refusal(db, s)
  return { canRequest: no === null, reason: no?.message ?? null, requests }
}

/**
 * A student asks the staff to look at a released grade again. The hand-in goes (back) into the
 * review queue, where "re-check requested" finds it.
 */
export async function requestRecheck(
  db: Database,
  e: CourseEnrollment,
  submissionId: number,
  message: string,
): Promise<RecheckStatus> {
  if (e.role !== 'student') throw forbidden('Only students ask for a re-check; staff can change points in the review.')
  const { s } = await ownSubmission(db, e, submissionId)
  await db.transaction(async (tx) => {
    // Serialises two requests for the same hand-in; the checks run again under the lock.
    await lockSubmission(tx, s.id)
    const no = await refusal(tx, s)
    if (no) throw no
    await insertRecheck(tx, { courseId: e.courseId, submissionId: s.id, requestedBy: e.userId, message })
    await reopenForReview(tx, s.id)
  })
  return recheckStatus(db, e, submissionId)
}

/** Staff answer a re-check request (Markdown); the answer is e-mailed to the student who asked. */
export async function answerRecheck(
  db: Database,
  e: CourseEnrollment,
  submissionId: number,
  requestId: number,
  answer: string,
  appUrl: string,
): Promise<RecheckStatus> {
  const s = await inScope(db, e, submissionId)
  const course = await courseTimeZone(db, e.courseId)
  const staff = await findUserById(db, e.userId)
  const version = await findVersion(db, s.moduleVersionId)
  await db.transaction(async (tx) => {
    const r = await findRecheckForUpdate(tx, submissionId, requestId)
    if (!r) throw notFound('That re-check request')
    if (r.status !== 'open')
      throw new AppError('recheck_answered', 'This re-check request has already been answered.', 409)
    await saveRecheckAnswer(tx, requestId, answer, e.userId)
    const student = await findUserById(tx, r.requestedBy)
    if (!student) return
    const link = pageLinks(appUrl, course.slug).handInResult(submissionId)
    const title = version?.title ?? 'your hand-in'
    await enqueueMail(tx, [
      {
        dedupeKey: `recheck-answer:${requestId}`,
        toAddress: student.email,
        toName: student.displayName,
        ...recheckAnsweredMail({
          name: student.displayName,
          courseCode: course.code,
          sheetTitle: title,
          attempt: s.attempt,
          by: staff?.displayName ?? 'The course staff',
          answer,
          answerHtml: renderModule(answer),
          link,
        }),
      },
    ])
  })
  return recheckStatus(db, e, submissionId)
}

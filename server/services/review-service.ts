import { renderModule } from '../../shared/modules/render'
import type {
  CommentView,
  Override,
  ReviewExtras,
  ReviewPage,
  ReviewQuery,
  SettableReviewState,
} from '../../shared/schemas/review'
import type { Database } from '../db/client'
import { AppError, notFound } from '../errors'
import type { CourseEnrollment } from '../repositories/enrollments'
import {
  bumpRevision,
  findCheck,
  insertComment,
  insertGradeChange,
  listComments,
  listGradeChanges,
  listFlagReasons,
  listQueue,
  lockRevision,
  setCheckPoints,
  setFlagStatus,
  submitterSection,
  sumAwarded,
} from '../repositories/review'
import { listSectionOptions } from '../repositories/grades'
import { findSubmission } from '../repositories/submissions'
import { linkedRun } from './run-service'
import { RECHECK_REASON } from '../../shared/schemas/grades'

/**
 * A TA works the submissions of their own section; the instructor sees every section. A
 * submission outside the caller's scope does not exist for them (404).
 */
export async function inScope(db: Database, e: CourseEnrollment, submissionId: number) {
  const s = await findSubmission(db, e.courseId, submissionId)
  if (!s) throw notFound('That submission')
  if (e.role === 'ta') {
    const section = await submitterSection(db, submissionId)
    if (e.sectionId === null || section !== e.sectionId) throw notFound('That submission')
  }
  return s
}

export async function reviewQueue(db: Database, e: CourseEnrollment, q: ReviewQuery): Promise<ReviewPage> {
  if (e.role === 'ta') {
    if (q.sectionId !== undefined && q.sectionId !== e.sectionId) {
      throw new AppError('forbidden', 'You review the submissions of your own section only.', 403)
    }
  }
  const [allSections, reasons] = await Promise.all([
    listSectionOptions(db, e.courseId),
    listFlagReasons(db, e.courseId),
  ])
  const sections = e.role === 'ta' ? allSections.filter((s) => s.id === e.sectionId) : allSections
  const facets = {
    sections,
    reasons: [...reasons, { code: RECHECK_REASON, example: 'A student asked for a re-check' }],
  }
  if (e.role === 'ta') {
    if (e.sectionId === null) return { rows: [], total: 0, page: q.page, pageSize: q.pageSize, facets }
    q = { ...q, sectionId: e.sectionId }
  }
  const { rows, total } = await listQueue(db, e.courseId, q)
  return { rows, total, page: q.page, pageSize: q.pageSize, facets }
}

const conflict = () =>
  new AppError(
    'edit_conflict',
    'Someone else changed this submission while you had it open. Reload it to see their change, then apply yours again.',
    409,
  )

/**
 * Overrides the points of one check (or the total) with a written reason. The change is audited,
 * and a stale `revision` (another staff member saved first) is refused instead of overwriting.
 */
export async function overridePoints(
  db: Database,
  e: CourseEnrollment,
  submissionId: number,
  o: Override,
): Promise<void> {
  const s = await inScope(db, e, submissionId)
  await db.transaction(async (tx) => {
    if (!(await lockRevision(tx, submissionId, o.revision))) throw conflict()
    if (o.checkId === null) {
      const max = s.maxScore ?? 0
      if (o.points < 0 || o.points > max) {
        throw new AppError('points_out_of_range', `points: the total must be between 0 and ${max}.`, 400, {
          field: 'points',
        })
      }
      await insertGradeChange(tx, {
        submissionId,
        checkId: null,
        target: 'total',
        changedBy: e.userId,
        oldPoints: s.score,
        newPoints: o.points,
        reason: o.reason,
      })
      await bumpRevision(tx, submissionId, { scoreOverride: o.points, reviewStatus: 'in-review' })
      return
    }
    const c = await findCheck(tx, submissionId, o.checkId)
    if (!c) throw notFound('That check')
    if (o.points < 0 || o.points > c.pointsPossible) {
      throw new AppError(
        'points_out_of_range',
        `points: ${c.label} is worth between 0 and ${c.pointsPossible} points.`,
        400,
        { field: 'points' },
      )
    }
    await setCheckPoints(tx, c.id, o.points)
    await insertGradeChange(tx, {
      submissionId,
      checkId: c.id,
      target: c.label,
      changedBy: e.userId,
      oldPoints: c.pointsAwarded,
      newPoints: o.points,
      reason: o.reason,
    })
    const raw = await sumAwarded(tx, submissionId)
    await bumpRevision(tx, submissionId, { rawScore: raw, score: raw * (1 - s.latePenalty), reviewStatus: 'in-review' })
  })
}

export async function addComment(
  db: Database,
  e: CourseEnrollment,
  submissionId: number,
  body: string,
  revision: number,
): Promise<void> {
  await inScope(db, e, submissionId)
  await db.transaction(async (tx) => {
    if (!(await lockRevision(tx, submissionId, revision))) throw conflict()
    await insertComment(tx, submissionId, e.userId, body)
    await bumpRevision(tx, submissionId)
  })
}

export async function changeFlag(
  db: Database,
  e: CourseEnrollment,
  submissionId: number,
  flagId: number,
  action: 'resolve' | 'reopen',
  revision: number,
) {
  await inScope(db, e, submissionId)
  await db.transaction(async (tx) => {
    if (!(await lockRevision(tx, submissionId, revision))) throw conflict()
    if (!(await setFlagStatus(tx, submissionId, flagId, action === 'resolve' ? 'resolved' : 'open', e.userId)))
      throw notFound('That flag')
    await bumpRevision(tx, submissionId, action === 'reopen' ? { reviewStatus: 'open' } : {})
  })
}

export async function setReviewStatus(
  db: Database,
  e: CourseEnrollment,
  submissionId: number,
  status: SettableReviewState,
  revision: number,
) {
  await inScope(db, e, submissionId)
  await db.transaction(async (tx) => {
    if (!(await lockRevision(tx, submissionId, revision))) throw conflict()
    await bumpRevision(tx, submissionId, { reviewStatus: status })
  })
}

/** What staff see beside the submission detail: the audit, the comments and the revision to edit. */
export async function reviewExtras(db: Database, e: CourseEnrollment, submissionId: number): Promise<ReviewExtras> {
  const s = await inScope(db, e, submissionId)
  const [changes, comments, run] = await Promise.all([
    listGradeChanges(db, submissionId),
    listComments(db, submissionId),
    linkedRun(db, s.runRecordId),
  ])
  return {
    revision: s.revision,
    reviewStatus: s.reviewStatus,
    scoreOverride: s.scoreOverride,
    gradeChanges: changes.map((c) => ({ ...c, at: c.at.toISOString() })),
    comments: comments.map((c) => ({ id: c.id, author: c.author, at: c.at.toISOString(), html: renderModule(c.body) })),
    run,
  }
}

/** Comments a student may read on their own submission. */
export async function commentsFor(db: Database, submissionId: number): Promise<CommentView[]> {
  const comments = await listComments(db, submissionId)
  return comments.map((c) => ({ id: c.id, author: c.author, at: c.at.toISOString(), html: renderModule(c.body) }))
}

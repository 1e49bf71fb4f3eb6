import { createHash } from 'node:crypto'
import { logFingerprint } from '../../shared/grading/fingerprint'
import { chartSeries } from '../../shared/grading/grade'
import type { JetMarks } from '../../shared/images/jet-marks'
import { resultsVisibility, type ModuleFrontMatter } from '../../shared/modules/schema'
import { GRADING_FAILED_MESSAGE } from '../../shared/schemas/submissions'
import type {
  CheckUncertaintyView,
  CheckView,
  MySubmissions,
  SubmissionDetail,
  SubmissionImageView,
  SubmissionPayload,
  SubmissionSummary,
} from '../../shared/schemas/submissions'
import { formatInZone, zonedTimeToUtc } from '../../shared/time'
import type { Database } from '../db/client'
import { retryOnLockConflict } from '../db/retry'
import { AppError, forbidden, notFound } from '../errors'
import type { CourseEnrollment } from '../repositories/enrollments'
import { findEnrollment } from '../repositories/enrollments'
import { courseTimeZone, findModule, findVersion } from '../repositories/modules'
import type { NewMail } from '../repositories/outbox'
import type { Owner, SubmissionRow } from '../repositories/submissions'
import {
  countAttempts,
  findFileBytes,
  findSubmission,
  findSubmissionById,
  groupMemberEmails,
  insertFile,
  insertSubmission,
  labGroupName,
  listChecks,
  listFiles,
  listFlags,
  listOwnerSubmissions,
  lockOwner,
} from '../repositories/submissions'
import { submitterSection } from '../repositories/review'
import { findExtensionDue } from '../repositories/due-extensions'
import { dueFor } from '../../shared/grading/due'
import { findUserById } from '../repositories/users'
import { handInReceivedMail, pageLinks } from '../mail/templates'
import { commentsFor } from './review-service'
import { runForHandIn } from './run-service'
import { handInRefusal, validateHandIn } from './hand-in-validation'
import { prepareHandInPhotos } from './hand-in-photos'
import { findImageBytes, insertImage, listImages } from '../repositories/submission-images'
import type { UploadedTable } from './hand-in-validation'
import { gradeNow, gradingInputOf } from './grading-service'
import type { GradingContext } from './grading-service'

export type { UploadedTable }

const DAY_MS = 86_400_000
const isStaff = (e: CourseEnrollment) => e.role !== 'student'

export interface Published {
  moduleId: number
  moduleStatus: 'draft' | 'published' | 'closed'
  versionId: number
  versionNumber: number
  title: string
  dueAt: Date | null
  fm: ModuleFrontMatter
  gradesReleasedAt: Date | null
}

async function publishedModule(db: Database, courseId: number, moduleId: number): Promise<Published> {
  const m = await findModule(db, courseId, moduleId)
  if (!m || m.status === 'draft' || m.publishedVersionId === null) throw notFound('That module')
  const v = await findVersion(db, m.publishedVersionId)
  if (!v || !v.frontMatter) throw notFound('That module')
  return {
    moduleId: m.id,
    moduleStatus: m.status,
    versionId: v.id,
    versionNumber: v.number,
    title: v.title,
    dueAt: v.dueAt,
    fm: v.frontMatter as unknown as ModuleFrontMatter,
    gradesReleasedAt: m.gradesReleasedAt,
  }
}

function ownerOf(e: CourseEnrollment, fm: ModuleFrontMatter): Owner {
  if (fm.groupSubmission) {
    if (e.labGroupId === null) {
      throw new AppError(
        'no_lab_group',
        'This module is handed in by lab group, and you are not in one yet. Ask your instructor to add you to a group.',
        409,
      )
    }
    return { labGroupId: e.labGroupId }
  }
  return { userId: e.userId }
}

/**
 * Lateness by the module's policy: days late (rounded up) and the fraction taken off. With a
 * per-student extension (`extendedDue`, later than the module's due date) the student is on time
 * until it and days late count from it. The late-acceptance limit moves by the same amount, so an
 * extended student keeps the same late window everyone else had (otherwise an extension past
 * `acceptUntil` would leave no late window at all, and one close to it would shrink it).
 */
function lateness(
  p: Published,
  now: Date,
  timeZone: string,
  extendedDue: Date | null = null,
): { isLate: boolean; daysLate: number; penalty: number } {
  const dueAt = dueFor(p.dueAt, extendedDue)
  const shift = dueAt && p.dueAt ? dueAt.getTime() - p.dueAt.getTime() : 0
  if (!dueAt || now.getTime() <= dueAt.getTime()) return { isLate: false, daysLate: 0, penalty: 0 }
  const late = p.fm.late
  if (!late) {
    throw new AppError(
      'past_due',
      `The due date (${formatInZone(dueAt, timeZone)}) has passed and this module does not accept late hand-ins.`,
      409,
    )
  }
  if (late.acceptUntil) {
    const until = new Date(zonedTimeToUtc(late.acceptUntil, p.fm.due?.timeZone ?? timeZone).getTime() + shift)
    if (now.getTime() > until.getTime()) {
      throw new AppError(
        'past_late_limit',
        `Late hand-ins were accepted until ${formatInZone(until, timeZone)}; that time has passed.`,
        409,
      )
    }
  }
  const daysLate = Math.ceil((now.getTime() - dueAt.getTime()) / DAY_MS)
  return { isLate: true, daysLate, penalty: Math.min(1, daysLate * late.penaltyPerDay) }
}

/** Whether the student may see results now, and if not, why. */
export function visibility(p: Published, now: Date, timeZone: string): { visible: boolean; reason: string | null } {
  switch (resultsVisibility(p.fm.results)) {
    case 'after-due':
      if (p.dueAt && now.getTime() < p.dueAt.getTime()) {
        return { visible: false, reason: `Results are shown after the due date, ${formatInZone(p.dueAt, timeZone)}.` }
      }
      return { visible: true, reason: null }
    case 'when-final':
      return p.gradesReleasedAt
        ? { visible: true, reason: null }
        : { visible: false, reason: 'Results are shown once the course staff make the marks final.' }
    default:
      return { visible: true, reason: null }
  }
}

/**
 * A student's hand-in: validated, stored with its raw files (bytes and sha256) in one transaction,
 * and only then graded from its own data. If grading throws, the submission stays stored as
 * 'grading-failed' with a flag for staff.
 */
export async function submitHandIn(
  db: Database,
  e: CourseEnrollment,
  moduleId: number,
  payload: SubmissionPayload,
  uploads: UploadedTable[],
  opts: { now?: Date; grading?: GradingContext; runRecordId?: number } = {},
): Promise<SubmissionDetail> {
  if (e.role !== 'student')
    throw forbidden('Only students hand in work; staff can see submissions in the review queue.')
  const now = opts.now ?? new Date()
  const p = await publishedModule(db, e.courseId, moduleId)
  if (p.moduleStatus === 'closed') throw new AppError('module_closed', 'This module is closed to hand-ins.', 409)
  if (!p.fm.assignment) throw new AppError('no_assignment', 'This module has nothing to hand in.', 409)
  const course = await courseTimeZone(db, e.courseId)
  const owner = ownerOf(e, p.fm)
  // The submitter's own extension, also for a group hand-in (each member's extension is their own).
  const late = lateness(p, now, course.timeZone, await findExtensionDue(db, p.moduleId, e.userId))
  const runRecordId = await runForHandIn(db, e, p.moduleId, p.fm.requiresSignedRun === true, opts.runRecordId)

  const v = validateHandIn(p.fm, payload, uploads)
  const pictures = await prepareHandInPhotos(p.fm, payload, uploads)
  const refusal = handInRefusal({
    issues: [...v.issues, ...pictures.issues],
    totalIssues: v.totalIssues + pictures.issues.length,
  })
  if (refusal) throw refusal
  const inputs =
    pictures.photos.length === 0
      ? v.inputs
      : { ...v.inputs, images: Object.fromEntries(pictures.photos.map((x) => [x.key, x.marks])) }

  // The whole transaction runs again if InnoDB picks it as a deadlock victim in a burst.
  const stored = await retryOnLockConflict(() =>
    db.transaction(async (tx) => {
      await lockOwner(tx, e.courseId, owner)
      const used = await countAttempts(tx, p.moduleId, owner)
      if (used >= p.fm.attempts) {
        throw new AppError('attempts_used', `All ${p.fm.attempts} attempts for this module have been used.`, 409)
      }
      const id = await insertSubmission(tx, {
        courseId: e.courseId,
        moduleId: p.moduleId,
        moduleVersionId: p.versionId,
        userId: e.userId,
        labGroupId: 'labGroupId' in owner ? owner.labGroupId : e.labGroupId,
        attempt: used + 1,
        inputs,
        isLate: late.isLate,
        daysLate: late.daysLate,
        latePenalty: late.penalty,
        runRecordId,
      })
      for (const f of v.files) {
        await insertFile(tx, {
          submissionId: id,
          courseId: e.courseId,
          tableKey: f.table.key,
          filename: f.upload.filename.slice(0, 255),
          contentType: f.upload.contentType.slice(0, 120),
          size: f.upload.bytes.length,
          sha256: createHash('sha256').update(f.upload.bytes).digest('hex'),
          bytes: f.upload.bytes,
          mapping: f.mapping,
          parsed: f.columns,
          rowCount: f.rowCount,
          fingerprint: logFingerprint(f.table, f.columns),
        })
      }
      for (const { key, photo } of pictures.photos) {
        await insertImage(tx, {
          submissionId: id,
          courseId: e.courseId,
          imageKey: key,
          contentType: photo.contentType,
          width: photo.width,
          height: photo.height,
          size: photo.bytes.length,
          sha256: photo.sha256,
          originalSha256: photo.originalSha256,
          originalSize: photo.originalSize,
          bytes: photo.bytes,
        })
      }
      return { id, attempt: used + 1 }
    }),
  )

  // From here the hand-in is stored and acknowledged whatever happens next: grading is a job the
  // background worker finishes if this request cannot (a database hiccup, a full grading pool).
  // When every grading thread is busy (a deadline burst) the answer does not wait in their queue:
  // the background grader takes the job, and the result page shows the grade when it is in.
  try {
    if (opts.grading?.grader.idle()) await gradeNow(db, opts.grading, stored.id)
  } catch (err) {
    opts.grading?.logger.warn({ err, submissionId: stored.id }, 'hand-in stored; grading left to the worker')
  }
  try {
    return await submissionDetail(db, e, stored.id, now)
  } catch (err) {
    opts.grading?.logger.warn({ err, submissionId: stored.id }, 'hand-in stored; its detail could not be read back')
    return {
      id: stored.id,
      attempt: stored.attempt,
      submittedAt: now.toISOString(),
      submittedBy: '',
      status: 'received',
      isLate: late.isLate,
      daysLate: late.daysLate,
      latePenalty: late.penalty,
      score: null,
      maxScore: null,
      flagCount: 0,
      courseId: e.courseId,
      moduleId: p.moduleId,
      moduleTitle: p.title,
      moduleVersion: p.versionNumber,
      labGroupName: null,
      resultsVisible: false,
      resultsHiddenReason: 'Your hand-in is stored and waiting to be graded.',
      rawScore: null,
      checks: [],
      flags: [],
      chart: null,
      files: [],
      images: pictures.photos.map(({ key, photo, marks }) =>
        imageView({ ...photo, imageKey: key, size: photo.bytes.length }, marks),
      ),
      inputs,
      attemptsAllowed: p.fm.attempts,
      attemptsUsed: stored.attempt,
      comments: [],
    }
  }
}

function summary(s: SubmissionRow & { flagCount?: number }, visible: boolean): SubmissionSummary {
  return {
    id: s.id,
    attempt: s.attempt,
    submittedAt: s.submittedAt.toISOString(),
    submittedBy: s.submittedBy,
    status: s.status,
    isLate: s.isLate,
    daysLate: s.daysLate,
    latePenalty: s.latePenalty,
    // A staff override of the total replaces the computed score.
    score: visible ? (s.scoreOverride ?? s.score) : null,
    maxScore: visible ? s.maxScore : null,
    flagCount: s.flagCount ?? 0,
  }
}

/**
 * May this person see this submission? Its submitter, the instructors, the TAs of the submitter's
 * section, and, only on a module handed in by lab group, the submitter's lab-group partners.
 */
async function canSee(db: Database, e: CourseEnrollment, s: SubmissionRow): Promise<boolean> {
  if (e.role === 'instructor') return true
  if (e.role === 'ta') return e.sectionId !== null && (await submitterSection(db, s.id)) === e.sectionId
  if (s.userId === e.userId) return true
  if (s.labGroupId === null || s.labGroupId !== e.labGroupId) return false
  const version = await findVersion(db, s.moduleVersionId)
  return (version?.frontMatter as unknown as ModuleFrontMatter | null)?.groupSubmission === true
}

/**
 * A check's stored uncertainty as the reader may see it: the figures only where the expected value
 * is shown (U = k·u_c would give it away), the contributing inputs and their shares always.
 */
function uncertaintyView(
  c: {
    standardUncertainty: number | null
    coverageFactor: number | null
    uncertaintyContributions: CheckUncertaintyView['contributions'] | null
  },
  showExpected: boolean,
): CheckUncertaintyView | null {
  if (c.standardUncertainty === null || c.coverageFactor === null) return null
  return {
    standard: showExpected ? c.standardUncertainty : null,
    expanded: showExpected ? c.coverageFactor * c.standardUncertainty : null,
    coverage: c.coverageFactor,
    contributions: c.uncertaintyContributions ?? [],
  }
}

function imageView(
  i: {
    imageKey: string
    contentType: SubmissionImageView['contentType']
    width: number
    height: number
    size: number
    sha256: string
    originalSha256: string
  },
  marks: JetMarks,
): SubmissionImageView {
  return {
    key: i.imageKey,
    contentType: i.contentType,
    width: i.width,
    height: i.height,
    size: i.size,
    sha256: i.sha256,
    originalSha256: i.originalSha256,
    marks,
  }
}

export async function submissionDetail(
  db: Database,
  e: CourseEnrollment,
  submissionId: number,
  now = new Date(),
): Promise<SubmissionDetail> {
  const s = await findSubmission(db, e.courseId, submissionId)
  // Someone else's submission does not exist for a student.
  if (!s || !(await canSee(db, e, s))) throw notFound('That submission')
  const p = await publishedModule(db, e.courseId, s.moduleId).catch(() => null)
  const version = await findVersion(db, s.moduleVersionId)
  if (!version) throw notFound('That submission')
  const fm = version.frontMatter as unknown as ModuleFrontMatter
  const course = await courseTimeZone(db, e.courseId)
  const vis = isStaff(e)
    ? { visible: true, reason: null }
    : visibility(
        {
          ...(p ?? {
            moduleId: s.moduleId,
            moduleStatus: 'published',
            versionId: version.id,
            versionNumber: version.number,
            title: version.title,
            gradesReleasedAt: null,
          }),
          dueAt: version.dueAt,
          fm,
        },
        now,
        course.timeZone,
      )
  const [checks, flags, files, groupName, comments, images] = await Promise.all([
    listChecks(db, s.id),
    listFlags(db, s.id),
    listFiles(db, s.id),
    labGroupName(db, s.labGroupId),
    commentsFor(db, s.id),
    listImages(db, s.id),
  ])
  const showExpected = isStaff(e) || fm.showExpected
  const regimeKeys = new Set(fm.assignment?.results.filter((r) => r.regime).map((r) => r.key) ?? [])
  const checkViews: CheckView[] = vis.visible
    ? checks.map((c) => ({
        id: c.id,
        key: c.resultKey,
        label: c.label,
        unit: c.unit,
        reported: c.reported,
        expected: showExpected ? c.expected : null,
        absError: showExpected ? c.absError : null,
        relError: c.relError,
        tolerance: c.tolerance,
        pointsPossible: c.pointsPossible,
        pointsAwarded: c.pointsAwarded,
        pass: c.pass,
        outcome: c.outcome,
        uncertainty: uncertaintyView(c, showExpected),
        regime: regimeKeys.has(c.resultKey),
      }))
    : []
  let chart = null
  const mainFile = files[0]
  if (mainFile && fm.assignment) {
    try {
      const input = gradingInputOf(fm, s.inputs, [mainFile], 0)
      chart = chartSeries(fm.assignment, input.data)
    } catch {
      chart = null
    }
  }
  const owner: Owner = s.labGroupId !== null && fm.groupSubmission ? { labGroupId: s.labGroupId } : { userId: s.userId }
  const used = await countAttempts(db, s.moduleId, owner)
  return {
    ...summary({ ...s, flagCount: flags.length }, vis.visible),
    courseId: s.courseId,
    moduleId: s.moduleId,
    moduleTitle: version.title,
    moduleVersion: version.number,
    labGroupName: groupName,
    resultsVisible: vis.visible,
    resultsHiddenReason: vis.reason,
    rawScore: vis.visible ? s.rawScore : null,
    checks: checkViews,
    flags: flags.map((f) => ({ id: f.id, code: f.code, message: f.message, status: f.status })),
    chart,
    files: files.map((f) => ({
      id: f.id,
      tableKey: f.tableKey,
      filename: f.filename,
      size: f.size,
      rowCount: f.rowCount,
      sha256: f.sha256,
    })),
    images: images.flatMap((i) => {
      const marks = s.inputs.images?.[i.imageKey]
      return marks ? [imageView(i, marks)] : []
    }),
    inputs: s.inputs,
    attemptsAllowed: fm.attempts,
    attemptsUsed: used,
    comments,
  }
}

export async function mySubmissions(
  db: Database,
  e: CourseEnrollment,
  moduleId: number,
  now = new Date(),
): Promise<MySubmissions> {
  const p = await publishedModule(db, e.courseId, moduleId)
  const course = await courseTimeZone(db, e.courseId)
  let owner: Owner = { userId: e.userId }
  let blockedReason: string | null = null
  try {
    owner = ownerOf(e, p.fm)
  } catch (err) {
    blockedReason = err instanceof Error ? err.message : String(err)
  }
  const rows = await listOwnerSubmissions(db, p.moduleId, owner)
  const vis = visibility(p, now, course.timeZone)
  const extendedDue = p.dueAt && e.role === 'student' ? await findExtensionDue(db, p.moduleId, e.userId) : null
  const dueAt = dueFor(p.dueAt, extendedDue)
  const dueExtended = dueAt !== p.dueAt
  const used = rows.length
  if (!blockedReason) {
    if (!p.fm.assignment) blockedReason = 'This module has nothing to hand in.'
    else if (p.moduleStatus === 'closed') blockedReason = 'This module is closed to hand-ins.'
    else if (used >= p.fm.attempts) blockedReason = `All ${p.fm.attempts} attempts have been used.`
    else {
      try {
        lateness(p, now, course.timeZone, extendedDue)
      } catch (err) {
        blockedReason = err instanceof Error ? err.message : String(err)
      }
    }
  }
  return {
    attemptsAllowed: p.fm.attempts,
    attemptsUsed: used,
    canSubmit: blockedReason === null && e.role === 'student',
    blockedReason: e.role === 'student' ? blockedReason : 'Staff do not hand in work.',
    // A student with an extension sees their own due date.
    dueAt: dueAt?.toISOString() ?? null,
    dueExtended,
    groupSubmission: p.fm.groupSubmission,
    labGroupName: await labGroupName(db, e.labGroupId),
    submissions: rows.map((r) => summary(r, vis.visible)),
  }
}

/**
 * A stored part of a hand-in (`what`, e.g. 'That file'), read by `find` only for those who may see the
 * hand-in; anything else is the same 404 as a part that is not there.
 */
async function seenPart<T>(
  db: Database,
  e: CourseEnrollment,
  submissionId: number,
  what: string,
  find: () => Promise<T | null>,
): Promise<T> {
  const s = await findSubmission(db, e.courseId, submissionId)
  if (!s || !(await canSee(db, e, s))) throw notFound(what)
  const part = await find()
  if (!part) throw notFound(what)
  return part
}

/** One photograph of a hand-in, for those who may see the hand-in. */
export function submissionImage(db: Database, e: CourseEnrollment, submissionId: number, imageKey: string) {
  return seenPart(db, e, submissionId, 'That photograph', () => findImageBytes(db, submissionId, imageKey))
}

export function submissionFile(db: Database, e: CourseEnrollment, submissionId: number, fileId: number) {
  return seenPart(db, e, submissionId, 'That file', () => findFileBytes(db, submissionId, fileId))
}

/**
 * The receipt for a hand-in with the grade about to be written (or the news that it could not be
 * graded): to the submitter, and to the lab group on a group module, with the score when results
 * are visible. The grading job queues it in the same transaction as the grade, so it is sent once
 * and never lost.
 */
export async function handInReceipt(
  db: Database,
  submissionId: number,
  appUrl: string,
  outcome: { status: 'graded' | 'grading-failed'; score: number | null; maxScore: number | null },
): Promise<NewMail[]> {
  const s = await findSubmissionById(db, submissionId)
  if (!s) return []
  const e = await findEnrollment(db, s.userId, s.courseId)
  if (!e) return []
  const seen = await submissionDetail(db, e, submissionId)
  const d = {
    ...seen,
    status: outcome.status,
    score: seen.resultsVisible ? outcome.score : null,
    maxScore: seen.resultsVisible ? outcome.maxScore : null,
  }
  const course = await courseTimeZone(db, e.courseId)
  const version = await findVersion(db, s.moduleVersionId)
  const group =
    (version?.frontMatter as unknown as ModuleFrontMatter | null)?.groupSubmission === true && s.labGroupId !== null
  const me = await findUserById(db, s.userId)
  const people = group
    ? await groupMemberEmails(db, s.labGroupId!)
    : me
      ? [{ email: me.email, displayName: me.displayName }]
      : []
  const link = pageLinks(appUrl, course.slug).handInResult(d.id)
  const when = formatInZone(new Date(d.submittedAt), course.timeZone)
  const scoreLine =
    d.status === 'grading-failed'
      ? GRADING_FAILED_MESSAGE
      : d.resultsVisible && d.score !== null && d.maxScore !== null
        ? `Score: ${Number(d.score.toFixed(2))} of ${d.maxScore}${d.latePenalty > 0 ? ` (after a ${Math.round(d.latePenalty * 100)} % late penalty)` : ''}.`
        : (d.resultsHiddenReason ?? 'Results are not shown yet.')
  return people.map((p) => ({
    dedupeKey: `submission-receipt:${d.id}`,
    toAddress: p.email,
    toName: p.displayName,
    ...handInReceivedMail({
      name: p.displayName,
      courseCode: course.code,
      sheetTitle: d.moduleTitle,
      groupName: group && d.labGroupName ? d.labGroupName : null,
      attempt: d.attempt,
      attemptsAllowed: d.attemptsAllowed,
      when,
      daysLate: d.isLate ? d.daysLate : null,
      scoreLine,
      link,
    }),
  }))
}

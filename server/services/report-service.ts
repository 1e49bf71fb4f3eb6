import { GRADING_FAILED_MESSAGE, isAwaitingGrade } from '../../shared/schemas/submissions'
/**
 * Feedback reports: the data of one hand-in's printed report, and the per-module archive of every
 * lab group's or student's counted report.
 *
 * Who may read a report is exactly who may read the hand-in (submissionDetail: its submitter, their
 * lab group, the instructors, the TAs of the submitter's section; everyone else 404). A student
 * gets it only once the hand-in is graded and its results are visible to them (the module's
 * `results` rule as submissionDetail applies it); otherwise 409 with the reason.
 *
 * The report is the student's document whoever downloads it: expected values appear only when
 * the module shows them to students, so a report staff hand on never shows more than the student's
 * own result page. The same holds for the theory's distances beside a photograph (./report-images.ts).
 */
import { PassThrough } from 'node:stream'
import type { Readable } from 'node:stream'
import { ZipArchive } from 'archiver'
import type { ModuleFrontMatter } from '../../shared/modules/schema'
import type { Database } from '../db/client'
import { AppError, forbidden, notFound } from '../errors'
import type { CourseEnrollment } from '../repositories/enrollments'
import { findModule, findVersion, findVersions } from '../repositories/modules'
import { courseHeader, gradedSubmissionsOfModule, groupMemberNames } from '../repositories/reports'
import { listComments } from '../repositories/review'
import { listImagesWithBytes } from '../repositories/submission-images'
import { findSubmission, listChecks, listFlags } from '../repositories/submissions'
import { feedbackPdfBuffer } from '../reports/feedback-pdf'
import type { FeedbackReportData } from '../reports/feedback-pdf'
import { fileSlug } from '../reports/format'
import { markdownToParagraphs } from '../reports/plain-text'
import { reportImages } from './report-images'
import { submissionDetail } from './submission-service'

export interface FeedbackReport {
  /** A safe download name: module, lab group or student, attempt. */
  filename: string
  data: FeedbackReportData
}

/**
 * Everything one hand-in's report prints.
 *
 * @throws AppError 404 when the caller may not see the hand-in; 409 `not_graded` when it is not
 *   graded (still being graded, or automatic grading failed); 409 `results_hidden` when its results
 *   are not yet visible to the student
 */
export async function feedbackReport(
  db: Database,
  e: CourseEnrollment,
  submissionId: number,
  now = new Date(),
): Promise<FeedbackReport> {
  const detail = await submissionDetail(db, e, submissionId, now)
  if (isAwaitingGrade(detail.status)) {
    throw new AppError(
      'not_graded',
      'This hand-in is still being graded. The feedback report can be downloaded once it is graded.',
      409,
    )
  }
  if (detail.status === 'grading-failed') {
    throw new AppError('not_graded', `${GRADING_FAILED_MESSAGE} There is no feedback report for it until then.`, 409)
  }
  if (!detail.resultsVisible || detail.score === null || detail.maxScore === null) {
    throw new AppError(
      'results_hidden',
      `The feedback report is not available yet. ${detail.resultsHiddenReason ?? 'Results are not shown yet.'}`,
      409,
    )
  }
  const row = await findSubmission(db, e.courseId, submissionId)
  const version = row ? await findVersion(db, row.moduleVersionId) : null
  const [course, mod] = await Promise.all([courseHeader(db, e.courseId), findModule(db, e.courseId, detail.moduleId)])
  if (!row || !version || !course || !mod) throw notFound('That submission')
  const fm = version.frontMatter as unknown as ModuleFrontMatter | null

  const [checkRows, flagRows, commentRows, members, pictures] = await Promise.all([
    listChecks(db, submissionId),
    listFlags(db, submissionId),
    listComments(db, submissionId),
    row.labGroupId !== null && fm?.groupSubmission ? groupMemberNames(db, row.labGroupId) : Promise.resolve(null),
    detail.images.length > 0 ? listImagesWithBytes(db, submissionId) : Promise.resolve([]),
  ])
  const adjusted = new Set(checkRows.filter((c) => c.overridden).map((c) => c.id))
  const showExpected = fm?.showExpected ?? false
  const owner: FeedbackReportData['owner'] =
    members !== null && detail.labGroupName !== null
      ? { kind: 'group', name: detail.labGroupName, members }
      : { kind: 'student', name: detail.submittedBy }

  const data: FeedbackReportData = {
    course,
    module: { title: detail.moduleTitle, version: detail.moduleVersion },
    owner,
    attempt: detail.attempt,
    attemptsAllowed: detail.attemptsAllowed,
    submittedAt: new Date(detail.submittedAt),
    submittedBy: detail.submittedBy,
    lateness: { isLate: detail.isLate, daysLate: detail.daysLate, penalty: detail.latePenalty },
    score: {
      score: detail.score,
      maxScore: detail.maxScore,
      rawScore: detail.rawScore,
      computedBeforeOverride: row.scoreOverride !== null ? row.score : null,
    },
    checks: detail.checks.map((c) => ({
      label: c.label,
      unit: c.unit,
      reported: c.reported,
      expected: showExpected ? c.expected : null,
      relError: c.relError,
      tolerance: c.tolerance,
      pointsAwarded: c.pointsAwarded,
      pointsPossible: c.pointsPossible,
      outcome: c.outcome,
      adjusted: adjusted.has(c.id),
      // The student's view: the figures only where the module shows expected values.
      uncertainty:
        c.uncertainty && !showExpected ? { ...c.uncertainty, standard: null, expanded: null } : c.uncertainty,
    })),
    flags: flagRows.map((f) => ({ message: f.message, status: f.status, resolvedAt: f.resolvedAt })),
    comments: commentRows.map((c) => ({ author: c.author, at: c.at, paragraphs: markdownToParagraphs(c.body) })),
    chart: detail.chart,
    images: reportImages(
      detail.images,
      fm?.assignment?.images ?? [],
      detail.checks,
      showExpected,
      new Map(pictures.map((p) => [p.imageKey, p.bytes])),
    ),
    generatedAt: now,
  }
  return { filename: `${fileSlug(mod.slug, 'module')}_${fileSlug(owner.name)}_attempt-${detail.attempt}.pdf`, data }
}

/** One hand-in's report as PDF bytes, with its download name. */
export async function feedbackReportPdf(db: Database, e: CourseEnrollment, submissionId: number, now = new Date()) {
  const report = await feedbackReport(db, e, submissionId, now)
  return { filename: report.filename, pdf: await feedbackPdfBuffer(report.data) }
}

/**
 * The hand-ins that count for a module: each owner's latest graded attempt. The owner is the lab
 * group when the hand-in's module version takes group hand-ins, else the student.
 */
async function countedSubmissionIds(db: Database, courseId: number, moduleId: number): Promise<number[]> {
  const rows = await gradedSubmissionsOfModule(db, courseId, moduleId)
  const versions = await findVersions(db, [...new Set(rows.map((r) => r.moduleVersionId))])
  const seen = new Set<string>()
  const ids: number[] = []
  // Rows come newest attempt first, so the first row of each owner is the one that counts.
  for (const r of rows) {
    const fm = versions.get(r.moduleVersionId)?.frontMatter as unknown as ModuleFrontMatter | null | undefined
    const owner = fm?.groupSubmission && r.labGroupId !== null ? `g${r.labGroupId}` : `u${r.userId}`
    if (seen.has(owner)) continue
    seen.add(owner)
    ids.push(r.id)
  }
  return ids
}

/**
 * A zip of the reports of a module, one PDF per lab group or student (their counted hand-in),
 * and nothing else. The module and the caller are checked before anything is written, so those
 * errors reach the caller as ordinary errors; the archive is then produced entry by entry, each PDF
 * made only when the previous one has gone into the zip stream, so memory holds one report at a time.
 *
 * @returns the zip's download name, the number of reports, and the zip as a stream (errors while
 *   writing end the stream with an error)
 * @throws AppError 403 unless the caller is an instructor; 404 when the module is not in the course
 */
export async function moduleReportsZip(
  db: Database,
  e: CourseEnrollment,
  moduleId: number,
  now = new Date(),
): Promise<{ filename: string; count: number; stream: Readable }> {
  if (e.role !== 'instructor') throw forbidden('Only instructors download every report of a module.')
  const [mod, course] = await Promise.all([findModule(db, e.courseId, moduleId), courseHeader(db, e.courseId)])
  if (!mod || !course) throw notFound('That module')
  const ids = await countedSubmissionIds(db, e.courseId, moduleId)

  // https://www.archiverjs.com/docs/archiver (version 8: one class per format)
  const zip = new ZipArchive({ zlib: { level: 6 } })
  const out = new PassThrough()
  zip.on('warning', (err) => out.destroy(err))
  zip.on('error', (err) => out.destroy(err))
  zip.pipe(out)

  const write = async () => {
    const names = new Set<string>()
    for (const id of ids) {
      if (out.destroyed) return
      const { filename, pdf } = await feedbackReportPdf(db, e, id, now)
      const name = names.has(filename) ? filename.replace(/\.pdf$/, `-${id}.pdf`) : filename
      names.add(name)
      // Settles when the entry is in the zip stream, or when the download was abandoned.
      const written = new Promise<void>((resolve) => {
        const done = () => {
          zip.off('entry', done)
          out.off('close', done)
          resolve()
        }
        zip.on('entry', done)
        out.on('close', done)
      })
      zip.append(pdf, { name, date: now })
      await written
    }
    await zip.finalize()
  }
  write().catch((err: unknown) => {
    zip.abort()
    out.destroy(err instanceof Error ? err : new Error(String(err)))
  })
  return {
    filename: `${fileSlug(course.code, 'course')}_${fileSlug(mod.slug, 'module')}_feedback-reports.zip`,
    count: ids.length,
    stream: out,
  }
}

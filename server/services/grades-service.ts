import { dueFor } from '../../shared/grading/due'
import { histogram, mean, median, percentOf, weightedTotal } from '../../shared/grading/gradebook'
import { resultsVisibility, type ModuleFrontMatter } from '../../shared/modules/schema'
import type {
  CheckFailures,
  Gradebook,
  GradebookCell,
  GradebookModule,
  GradebookQuery,
  GradebookStudent,
  ModuleStats,
  MyGradeRow,
  MyGrades,
  ReleaseResult,
} from '../../shared/schemas/grades'
import { formatInZone } from '../../shared/time'
import type { Database } from '../db/client'
import { AppError, forbidden, notFound } from '../errors'
import type { CourseEnrollment } from '../repositories/enrollments'
import type { GradedRow, StudentRow } from '../repositories/grades'
import {
  listAttemptsOf,
  listCheckOutcomes,
  listGraded,
  listLabGroupOptions,
  listSectionOptions,
  listStudents,
  moduleWeights,
  queuedAddresses,
  setGradesReleased,
  setModuleWeight,
} from '../repositories/grades'
import { listExtensions } from '../repositories/due-extensions'
import { courseTimeZone, findModule, findVersions, listModuleRows } from '../repositories/modules'
import { enqueueMail } from '../repositories/outbox'
import { recheckViews } from './recheck-service'
import { visibility } from './submission-service'
import { marksFinalMail, pageLinks } from '../mail/templates'

/** A module that can carry grades: published or closed, with something to hand in. */
interface GradedModule {
  id: number
  title: string
  status: 'published' | 'closed'
  weight: number
  dueAt: Date | null
  releasedAt: Date | null
  fm: ModuleFrontMatter
  versionId: number
  versionNumber: number
}

async function gradedModules(db: Database, courseId: number): Promise<GradedModule[]> {
  const rows = await listModuleRows(db, courseId, ['published', 'closed'])
  const versions = await findVersions(
    db,
    rows.map((r) => r.publishedVersionId).filter((x): x is number => x !== null),
  )
  const weights = await moduleWeights(db, courseId)
  const out: GradedModule[] = []
  for (const m of rows) {
    const v = m.publishedVersionId === null ? undefined : versions.get(m.publishedVersionId)
    const fm = v?.frontMatter as unknown as ModuleFrontMatter | null | undefined
    if (!v || !fm?.assignment) continue
    out.push({
      id: m.id,
      title: v.title,
      status: m.status as 'published' | 'closed',
      weight: weights.get(m.id) ?? 1,
      dueAt: v.dueAt,
      releasedAt: m.gradesReleasedAt,
      fm,
      versionId: v.id,
      versionNumber: v.number,
    })
  }
  return out
}

/** Each student's extended due dates, keyed by module and person. */
type Extensions = ReadonlyMap<string, Date>
const extensionKey = (moduleId: number, userId: number) => `${moduleId}:${userId}`
const NO_EXTENSIONS: Extensions = new Map()

async function extensionsOf(db: Database, courseId: number): Promise<Extensions> {
  const rows = await listExtensions(db, courseId)
  return new Map(rows.map((r) => [extensionKey(r.moduleId, r.userId), r.dueAt]))
}

/**
 * A closed module, or one whose due date (the student's extended one, if granted) has passed:
 * no hand-in there counts as 0 %.
 */
function isPastDue(m: GradedModule, now: Date, userId: number, ext: Extensions): boolean {
  if (m.status === 'closed') return true
  const due = dueFor(m.dueAt, ext.get(extensionKey(m.id, userId)))
  return due !== null && now.getTime() >= due.getTime()
}

/**
 * The counting rule: the latest graded attempt of the student's own hand-ins, or of their lab
 * group's when the module is handed in by group. `graded` is newest attempt first.
 */
function countedFor(
  student: { userId: number; labGroupId: number | null },
  m: Pick<GradedModule, 'id' | 'fm'>,
  graded: readonly GradedRow[],
): GradedRow | null {
  const byGroup = m.fm.groupSubmission && student.labGroupId !== null
  for (const s of graded) {
    if (s.moduleId !== m.id) continue
    if (byGroup ? s.labGroupId === student.labGroupId : s.userId === student.userId) return s
  }
  return null
}

function cellOf(s: GradedRow): GradebookCell {
  const points = s.scoreOverride ?? s.score ?? 0
  const max = s.maxScore ?? 0
  return {
    submissionId: s.id,
    attempt: s.attempt,
    points,
    maxScore: max,
    percent: percentOf(points, max),
    overridden: s.scoreOverride !== null,
    isLate: s.isLate,
    daysLate: s.daysLate,
    reviewStatus: s.reviewStatus,
    recheckOpen: s.recheckOpen,
  }
}

/** Narrows the filters to what the caller may see: a TA sees their own section only. */
function scopeOf(e: CourseEnrollment, q: GradebookQuery): GradebookQuery | null {
  if (e.role !== 'ta') return q
  if (e.sectionId === null) return null
  if (q.sectionId !== undefined && q.sectionId !== e.sectionId) {
    throw new AppError('forbidden', 'You see the grades of your own section only.', 403)
  }
  return { ...q, sectionId: e.sectionId }
}

/**
 * The staff gradebook: one row per student in scope, one column per module with something to
 * hand in, each student's weighted total, and per-module statistics over the students shown.
 */
export async function gradebook(
  db: Database,
  e: CourseEnrollment,
  q: GradebookQuery,
  now = new Date(),
): Promise<Gradebook> {
  const scope = scopeOf(e, q)
  // The rows in scope are the whole class when nothing narrows them; read the class once then.
  const wholeClass = scope !== null && scope.sectionId === undefined && scope.labGroupId === undefined
  const mods = await gradedModules(db, e.courseId)
  const [students, graded, allSections, allGroups, everyone, ext] = await Promise.all([
    scope ? listStudents(db, e.courseId, scope) : Promise.resolve([] as StudentRow[]),
    listGraded(
      db,
      e.courseId,
      mods.map((m) => m.id),
    ),
    listSectionOptions(db, e.courseId),
    listLabGroupOptions(db, e.courseId),
    wholeClass ? Promise.resolve(null) : listStudents(db, e.courseId),
    extensionsOf(db, e.courseId),
  ])

  const rows: GradebookStudent[] = students.map((st) => {
    const cells: Record<string, GradebookCell> = {}
    for (const m of mods) {
      const s = countedFor(st, m, graded)
      if (s) cells[String(m.id)] = cellOf(s)
    }
    const totalPercent = weightedTotal(
      mods.map((m) => ({
        weight: m.weight,
        percent: cells[String(m.id)]?.percent ?? null,
        pastDue: isPastDue(m, now, st.userId, ext),
      })),
    )
    const extendedOpen = mods
      .filter((m) => isPastDue(m, now, 0, NO_EXTENSIONS) && !isPastDue(m, now, st.userId, ext))
      .map((m) => m.id)
    return { ...st, cells, totalPercent, extendedOpen }
  })

  const countedIds = new Set<number>()
  for (const r of rows) for (const c of Object.values(r.cells)) countedIds.add(c.submissionId)
  const outcomes = await listCheckOutcomes(db, [...countedIds])
  const stats: ModuleStats[] = mods.map((m) => {
    const percents: number[] = []
    const subs = new Set<number>()
    for (const r of rows) {
      const c = r.cells[String(m.id)]
      if (!c) continue
      subs.add(c.submissionId)
      if (c.percent !== null) percents.push(c.percent)
    }
    const perCheck = new Map<string, CheckFailures>()
    for (const o of outcomes) {
      if (!subs.has(o.submissionId)) continue
      const entry = perCheck.get(o.key) ?? { key: o.key, label: o.label, fails: 0, attempts: 0 }
      entry.attempts += 1
      if (!o.pass) entry.fails += 1
      perCheck.set(o.key, entry)
    }
    const hardestChecks = [...perCheck.values()]
      .filter((c) => c.fails > 0)
      .sort(
        (a, b) => b.fails - a.fails || b.fails / b.attempts - a.fails / a.attempts || a.label.localeCompare(b.label),
      )
      .slice(0, 5)
    return {
      moduleId: m.id,
      n: percents.length,
      meanPercent: mean(percents),
      medianPercent: median(percents),
      histogram: histogram(percents),
      hardestChecks,
    }
  })

  const modulesOut: GradebookModule[] = mods.map((m) => ({
    id: m.id,
    title: m.title,
    status: m.status,
    weight: m.weight,
    dueAt: m.dueAt?.toISOString() ?? null,
    // The module's own due date; students with a later extension are listed in `extendedOpen`.
    pastDue: isPastDue(m, now, 0, NO_EXTENSIONS),
    releasedAt: m.releasedAt?.toISOString() ?? null,
    results: resultsVisibility(m.fm.results),
    groupSubmission: m.fm.groupSubmission,
  }))
  const taSection = e.role === 'ta' ? e.sectionId : undefined
  return {
    modules: modulesOut,
    students: rows,
    stats,
    sections: allSections.filter((s) => taSection === undefined || s.id === taSection),
    labGroups: allGroups.filter((g) => taSection === undefined || g.sectionId === taSection),
    canManage: e.role === 'instructor',
    enrolledStudents: (everyone ?? students).length,
  }
}

/** The instructor sets a module's weight in the course total (0 leaves it out). */
export async function changeWeight(db: Database, e: CourseEnrollment, moduleId: number, weight: number): Promise<void> {
  const m = await findModule(db, e.courseId, moduleId)
  if (!m) throw notFound('That module')
  await setModuleWeight(db, moduleId, weight)
}

/**
 * Releases a module's grades: students of `after-release` modules see their results from now on,
 * and every student of the course gets one e-mail, queued in the same transaction as the
 * release. Releasing again changes nothing and sends nothing (the e-mails carry a dedupe key).
 */
export async function releaseGrades(
  db: Database,
  e: CourseEnrollment,
  moduleId: number,
  appUrl: string,
  now = new Date(),
): Promise<ReleaseResult> {
  const course = await courseTimeZone(db, e.courseId)
  return db.transaction(async (tx) => {
    const m = await findModule(tx, e.courseId, moduleId, true)
    if (!m) throw notFound('That module')
    if (m.status === 'draft' || m.publishedVersionId === null) {
      throw new AppError(
        'module_draft',
        'This module is still being prepared: issue it to the class before making its marks final.',
        409,
      )
    }
    if (m.gradesReleasedAt) return { moduleId, releasedAt: m.gradesReleasedAt.toISOString(), emailed: 0 }
    await setGradesReleased(tx, moduleId, now)

    const version = (await findVersions(tx, [m.publishedVersionId])).get(m.publishedVersionId)
    const title = version?.title ?? 'a module'
    const fm = version?.frontMatter as unknown as ModuleFrontMatter | null | undefined
    const students = await listStudents(tx, e.courseId)
    const graded = fm?.assignment ? await listGraded(tx, e.courseId, [moduleId]) : []
    const links = pageLinks(appUrl, course.slug)
    const gm = fm ? { id: moduleId, fm } : null
    const when = formatInZone(now, course.timeZone)
    // A release withdrawn and made again mails nobody twice.
    const dedupeKey = `grades-released:${moduleId}`
    const already = await queuedAddresses(tx, dedupeKey)
    const mails = students
      .filter((st) => !already.has(st.email))
      .map((st) => {
        const counted = gm ? countedFor(st, gm, graded) : null
        const link = counted ? links.handInResult(counted.id) : links.myMarks
        return {
          dedupeKey,
          toAddress: st.email,
          toName: st.name,
          ...marksFinalMail({
            name: st.name,
            courseCode: course.code,
            sheetTitle: title,
            when,
            counted: counted !== null,
            link,
          }),
        }
      })
    await enqueueMail(tx, mails)
    return { moduleId, releasedAt: now.toISOString(), emailed: mails.length }
  })
}

/** Withdraws a release (no e-mail): `after-release` results are hidden again. */
export async function withdrawRelease(db: Database, e: CourseEnrollment, moduleId: number): Promise<ReleaseResult> {
  return db.transaction(async (tx) => {
    const m = await findModule(tx, e.courseId, moduleId, true)
    if (!m) throw notFound('That module')
    if (m.gradesReleasedAt) await setGradesReleased(tx, moduleId, null)
    return { moduleId, releasedAt: null, emailed: 0 }
  })
}

/**
 * A student's own grades: every module with something to hand in, what state its grade is in,
 * the counted score when it may be shown, and the latest re-check request on it.
 */
export async function myGrades(db: Database, e: CourseEnrollment, now = new Date()): Promise<MyGrades> {
  if (e.role !== 'student') throw forbidden('“My marks” is for students; staff see every mark on the Marks page.')
  const course = await courseTimeZone(db, e.courseId)
  const mods = await gradedModules(db, e.courseId)
  const [graded, attempts, ext] = await Promise.all([
    listGraded(
      db,
      e.courseId,
      mods.map((m) => m.id),
    ),
    listAttemptsOf(db, e.courseId, e.userId, e.labGroupId),
    extensionsOf(db, e.courseId),
  ])
  const me = { userId: e.userId, labGroupId: e.labGroupId }
  const counted = new Map<number, GradedRow>()
  for (const m of mods) {
    const s = countedFor(me, m, graded)
    if (s) counted.set(m.id, s)
  }
  const rechecks = await recheckViews(
    db,
    [...counted.values()].map((s) => s.id),
  )

  const rows: MyGradeRow[] = mods.map((m) => {
    const s = counted.get(m.id) ?? null
    const byGroup = m.fm.groupSubmission && e.labGroupId !== null
    const anyAttempt =
      attempts.find((a) => a.moduleId === m.id && (byGroup ? a.labGroupId === e.labGroupId : a.userId === e.userId)) ??
      null
    const vis = visibility(
      {
        moduleId: m.id,
        moduleStatus: m.status,
        versionId: m.versionId,
        versionNumber: m.versionNumber,
        title: m.title,
        dueAt: m.dueAt,
        fm: m.fm,
        gradesReleasedAt: m.releasedAt,
      },
      now,
      course.timeZone,
    )
    const base = {
      moduleId: m.id,
      title: m.title,
      weight: m.weight,
      dueAt: m.dueAt?.toISOString() ?? null,
      hiddenReason: null,
      points: null,
      maxScore: null,
      isLate: false,
      daysLate: 0,
      recheck: null,
    }
    if (!s) {
      if (!anyAttempt) return { ...base, state: 'not-handed-in' as const, submissionId: null, attempt: null }
      return { ...base, state: 'awaiting-grade' as const, submissionId: anyAttempt.id, attempt: anyAttempt.attempt }
    }
    const mine = rechecks.filter((r) => r.submissionId === s.id)
    const recheck = mine.find((r) => r.status === 'open') ?? mine.at(-1) ?? null
    const common = { ...base, submissionId: s.id, attempt: s.attempt, isLate: s.isLate, daysLate: s.daysLate, recheck }
    if (!vis.visible) return { ...common, state: 'hidden' as const, hiddenReason: vis.reason }
    return {
      ...common,
      state: m.releasedAt ? ('released' as const) : ('provisional' as const),
      points: s.scoreOverride ?? s.score ?? 0,
      maxScore: s.maxScore ?? 0,
    }
  })

  // Hidden scores stay out of the total, so the total cannot reveal them.
  const totalPercent = weightedTotal(
    mods.map((m, i) => {
      const r = rows[i]!
      const shown = r.points !== null && r.maxScore !== null
      return {
        weight: m.weight,
        percent: shown ? percentOf(r.points!, r.maxScore!) : null,
        pastDue: r.state === 'not-handed-in' || r.state === 'awaiting-grade' ? isPastDue(m, now, e.userId, ext) : false,
      }
    }),
  )
  return { rows, totalPercent }
}

import type {
  RolloverInput,
  RolloverPlan,
  RolloverResult,
  RolloverSheet,
  RolloverSkippedSheet,
} from '../../shared/schemas/course-rollover'
import { shiftFrontMatterDates } from '../../shared/modules/shift-dates'
import type { Database, Executor } from '../db/client'
import { AppError, notFound } from '../errors'
import type { CourseEnrollment } from '../repositories/enrollments'
import { findCourseSummary, insertCourseWithInstructor } from '../repositories/enrollments'
import { insertModuleWithVersion } from '../repositories/modules'
import type { VersionWrite } from '../repositories/modules'
import {
  courseCodeTermTaken,
  findSourceCourse,
  insertRolloverLabGroup,
  insertRolloverSection,
  insertTaEnrollment,
  listSourceLabGroups,
  listSourceSections,
  listSourceSheets,
  listSourceTas,
  setModuleWeight,
} from '../repositories/course-rollover'
import { toVersion } from './module-service'

/**
 * Starting next term's course from this one. The preview and the confirm build the same plan from
 * what is stored at that moment; the confirm builds it again inside its transaction, so what it
 * writes follows the course as it is then, and a clash found on the way writes nothing.
 *
 * Copied: sections with their meeting times, lab-group names (empty), each lab sheet's latest
 * issued version as a sheet being prepared with its dates moved by whole weeks (its late and
 * attempt rules travel in its front matter), module weights, and the TAs when asked. Never copied:
 * students, hand-ins, marks, comments, re-check requests, extensions. The caller becomes the new
 * course's only instructor.
 */

const NOT_COPIED =
  'Students, hand-ins, marks, comments, re-check requests and extensions stay with this course; the new course starts with none.'

interface SheetWrite {
  slug: string
  position: number
  weight: number
  version: VersionWrite
}

interface Built {
  plan: RolloverPlan
  sheetWrites: SheetWrite[]
  sections: { id: number; name: string; meets: string }[]
  labGroups: { name: string; sectionId: number | null }[]
  tas: { userId: number; sectionId: number | null }[]
}

async function refuseTaken(db: Executor, input: RolloverInput): Promise<void> {
  if (await courseCodeTermTaken(db, input.code, input.term)) throw courseExists(input)
}

function courseExists(input: RolloverInput): AppError {
  return new AppError(
    'course_exists',
    `A course ${input.code} already exists for ${input.term} (or one whose code and term differ only in case or punctuation); choose another code or term.`,
    409,
    { fields: ['code', 'term'] },
  )
}

async function buildPlan(db: Executor, e: CourseEnrollment, input: RolloverInput): Promise<Built> {
  const course = await findSourceCourse(db, e.courseId)
  if (!course) throw notFound('That course')
  await refuseTaken(db, input)
  const [sheets, sections, groups, tas] = await Promise.all([
    listSourceSheets(db, e.courseId),
    listSourceSections(db, e.courseId),
    listSourceLabGroups(db, e.courseId),
    input.copyTas ? listSourceTas(db, e.courseId) : Promise.resolve([]),
  ])
  const sectionName = new Map(sections.map((s) => [s.id, s.name]))

  const planned: RolloverSheet[] = []
  const skipped: RolloverSkippedSheet[] = []
  const sheetWrites: SheetWrite[] = []
  for (const s of sheets) {
    if (!s.issued) {
      skipped.push({ slug: s.slug, title: s.title, reason: 'never issued to the class; not copied' })
      continue
    }
    const shifted = shiftFrontMatterDates(s.issued.source, input.shiftWeeks)
    const version = toVersion(shifted.source, s.slug, course.timeZone)
    const due = shifted.dates.find((d) => d.path === 'due.at')
    const late = shifted.dates.find((d) => d.path === 'late.acceptUntil')
    const fm = version.frontMatter as { due?: { timeZone?: string } } | null
    const problems = [...shifted.problems, ...shifted.dates.flatMap((d) => (d.problem ? [d.problem] : []))]
    if (!version.valid) {
      // The sheet was issued under older rules, or a moved date now breaks one (late limit order).
      const n = version.issues.length
      problems.push(
        `the copy has ${n} problem${n === 1 ? '' : 's'} to fix before it can be issued (first: ${version.issues[0]?.message ?? '?'})`,
      )
    }
    if (due?.to && due.to.slice(0, 10) < input.startDate) {
      problems.push(`the moved due date ${due.to.replace('T', ' ')} is before the new term starts (${input.startDate})`)
    }
    planned.push({
      slug: s.slug,
      title: s.issued.title,
      fromVersion: s.issued.number,
      weight: s.weight,
      oldDue: due?.from ?? null,
      newDue: due?.to ?? null,
      oldAcceptUntil: late?.from ?? null,
      newAcceptUntil: late?.to ?? null,
      timeZone: fm?.due?.timeZone ?? course.timeZone,
      problems,
    })
    sheetWrites.push({ slug: s.slug, position: s.position, weight: s.weight, version })
  }

  return {
    plan: {
      course: {
        code: input.code,
        title: input.title,
        term: input.term,
        institution: course.institution,
        timeZone: course.timeZone,
        startDate: input.startDate,
      },
      shiftWeeks: input.shiftWeeks,
      sheets: planned,
      skippedSheets: skipped,
      sections: sections.map((s) => ({ name: s.name, meets: s.meets })),
      labGroups: groups.map((g) => ({
        name: g.name,
        section: g.sectionId === null ? null : (sectionName.get(g.sectionId) ?? null),
      })),
      tas: tas.map((t) => ({
        name: t.name,
        email: t.email,
        section: t.sectionId === null ? null : (sectionName.get(t.sectionId) ?? null),
      })),
      notCopied: NOT_COPIED,
    },
    sheetWrites,
    sections,
    labGroups: groups,
    tas: tas.map((t) => ({ userId: t.userId, sectionId: t.sectionId })),
  }
}

/** What a roll-over would create; nothing is written. */
export async function previewRollover(db: Database, e: CourseEnrollment, input: RolloverInput): Promise<RolloverPlan> {
  return (await buildPlan(db, e, input)).plan
}

function isDuplicate(err: unknown): boolean {
  let x: unknown = err
  for (let i = 0; x && i < 4; i++) {
    if ((x as { code?: string }).code === 'ER_DUP_ENTRY') return true
    x = (x as { cause?: unknown }).cause
  }
  return false
}

/** Creates next term's course from this one, in one transaction. */
export async function confirmRollover(
  db: Database,
  e: CourseEnrollment,
  input: RolloverInput,
): Promise<RolloverResult> {
  let created: { courseId: number; plan: RolloverPlan }
  try {
    created = await db.transaction(async (tx) => {
      const built = await buildPlan(tx, e, input)
      const { plan } = built
      const courseId = await insertCourseWithInstructor(
        tx,
        {
          code: input.code,
          title: input.title,
          term: input.term,
          institution: plan.course.institution,
          timeZone: plan.course.timeZone,
        },
        e.userId,
      )
      const newSection = new Map<number, number>()
      for (const s of built.sections) newSection.set(s.id, await insertRolloverSection(tx, courseId, s))
      const mapSection = (id: number | null) => (id === null ? null : (newSection.get(id) ?? null))
      for (const g of built.labGroups) {
        await insertRolloverLabGroup(tx, courseId, { name: g.name, sectionId: mapSection(g.sectionId) })
      }
      for (const t of built.tas) await insertTaEnrollment(tx, courseId, t.userId, mapSection(t.sectionId))
      for (const s of built.sheetWrites) {
        const { moduleId } = await insertModuleWithVersion(
          tx,
          { courseId, slug: s.slug, position: s.position, createdBy: e.userId },
          s.version,
        )
        await setModuleWeight(tx, moduleId, s.weight)
      }
      return { courseId, plan }
    })
  } catch (err) {
    // Another roll-over or a new course took the code and term between the check and the insert.
    if (isDuplicate(err)) throw courseExists(input)
    throw err
  }
  const summary = await findCourseSummary(db, e.userId, created.courseId)
  if (!summary) throw new Error('course vanished after the roll-over')
  return { ...created.plan, courseId: created.courseId, slug: summary.slug }
}

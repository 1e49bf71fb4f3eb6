import { and, asc, eq, or, sql } from 'drizzle-orm'
import type { Executor } from '../db/client'
import { courses, enrollments, labGroups, moduleVersions, modules, sections, users } from '../db/schema'

/** What a roll-over reads from the course it starts from. */
export interface RolloverSourceCourse {
  code: string
  title: string
  term: string
  institution: string
  timeZone: string
}

export async function findSourceCourse(db: Executor, courseId: number): Promise<RolloverSourceCourse | null> {
  const rows = await db
    .select({
      code: courses.code,
      title: courses.title,
      term: courses.term,
      institution: courses.institution,
      timeZone: courses.timeZone,
    })
    .from(courses)
    .where(eq(courses.id, courseId))
    .limit(1)
  return rows[0] ?? null
}

/**
 * Whether a course with this code and term exists, or one whose page-address key would be the
 * same (code and term that differ only in case or punctuation): the same expression as the
 * generated column in schema/courses.ts.
 */
export async function courseCodeTermTaken(db: Executor, code: string, term: string): Promise<boolean> {
  const rows = await db
    .select({ id: courses.id })
    .from(courses)
    .where(
      or(
        and(eq(courses.code, code), eq(courses.term, term)),
        eq(
          courses.slug,
          sql`TRIM(BOTH '-' FROM REGEXP_REPLACE(LOWER(CONCAT(${code}, '-', ${term})), '[^a-z0-9]+', '-'))`,
        ),
      ),
    )
    .limit(1)
  return rows.length > 0
}

/** A module of the source course with its latest issued version (null when it was never issued). */
export interface RolloverSourceSheet {
  slug: string
  position: number
  weight: number
  issued: { number: number; title: string; source: string } | null
  /** The title staff see (the version being edited, else the issued one). */
  title: string
}

export async function listSourceSheets(db: Executor, courseId: number): Promise<RolloverSourceSheet[]> {
  const rows = await db
    .select({
      slug: modules.slug,
      position: modules.position,
      weight: modules.weight,
      publishedVersionId: modules.publishedVersionId,
      currentVersionId: modules.currentVersionId,
    })
    .from(modules)
    .where(eq(modules.courseId, courseId))
    .orderBy(asc(modules.position), asc(modules.id))
  const out: RolloverSourceSheet[] = []
  for (const r of rows) {
    const versionId = r.publishedVersionId ?? r.currentVersionId
    const [v] =
      versionId === null
        ? []
        : await db
            .select({ number: moduleVersions.number, title: moduleVersions.title, source: moduleVersions.source })
            .from(moduleVersions)
            .where(eq(moduleVersions.id, versionId))
            .limit(1)
    out.push({
      slug: r.slug,
      position: r.position,
      weight: r.weight,
      issued: r.publishedVersionId !== null && v ? v : null,
      title: v?.title ?? r.slug,
    })
  }
  return out
}

export async function listSourceSections(db: Executor, courseId: number) {
  return db
    .select({ id: sections.id, name: sections.name, meets: sections.meets })
    .from(sections)
    .where(eq(sections.courseId, courseId))
    .orderBy(asc(sections.name))
}

export async function listSourceLabGroups(db: Executor, courseId: number) {
  return db
    .select({ name: labGroups.name, sectionId: labGroups.sectionId })
    .from(labGroups)
    .where(eq(labGroups.courseId, courseId))
    .orderBy(asc(labGroups.name))
}

export async function listSourceTas(db: Executor, courseId: number) {
  return db
    .select({ userId: users.id, name: users.displayName, email: users.email, sectionId: enrollments.sectionId })
    .from(enrollments)
    .innerJoin(users, eq(users.id, enrollments.userId))
    .where(and(eq(enrollments.courseId, courseId), eq(enrollments.role, 'ta')))
    .orderBy(asc(users.displayName))
}

export async function insertRolloverSection(
  db: Executor,
  courseId: number,
  s: { name: string; meets: string },
): Promise<number> {
  const [row] = await db.insert(sections).values({ courseId, name: s.name, meets: s.meets }).$returningId()
  return row!.id
}

export async function insertRolloverLabGroup(
  db: Executor,
  courseId: number,
  g: { name: string; sectionId: number | null },
): Promise<void> {
  await db.insert(labGroups).values({ courseId, name: g.name, sectionId: g.sectionId })
}

export async function insertTaEnrollment(
  db: Executor,
  courseId: number,
  userId: number,
  sectionId: number | null,
): Promise<void> {
  await db.insert(enrollments).values({ courseId, userId, role: 'ta', sectionId })
}

export async function setModuleWeight(db: Executor, moduleId: number, weight: number): Promise<void> {
  await db.update(modules).set({ weight }).where(eq(modules.id, moduleId))
}

import { and, eq, gt, inArray, isNull, sql } from 'drizzle-orm'
import type { CourseRole } from '../../shared/schemas/auth'
import type { Executor } from '../db/client'
import { courses, enrollments, invitations, labGroups, sections, users } from '../db/schema'

/** What a roster import needs to know about the course and the people named in the file. */
export interface CourseSection {
  id: number
  name: string
}
export interface CourseGroup {
  id: number
  name: string
  sectionId: number | null
}
export interface KnownPerson {
  userId: number
  email: string
  displayName: string
  hasPassword: boolean
  /** Has an unused, unexpired invitation (from any course). */
  liveInvitation: boolean
  enrollment: { role: CourseRole; sectionId: number | null; labGroupId: number | null } | null
}

export async function listCourseSections(db: Executor, courseId: number): Promise<CourseSection[]> {
  return db.select({ id: sections.id, name: sections.name }).from(sections).where(eq(sections.courseId, courseId))
}

export async function listCourseGroups(db: Executor, courseId: number): Promise<CourseGroup[]> {
  return db
    .select({ id: labGroups.id, name: labGroups.name, sectionId: labGroups.sectionId })
    .from(labGroups)
    .where(eq(labGroups.courseId, courseId))
}

export async function findCourseTitle(
  db: Executor,
  courseId: number,
): Promise<{ code: string; title: string; timeZone: string; slug: string } | null> {
  const rows = await db
    // The slug is generated from code and term and never NULL (see the schema).
    .select({
      code: courses.code,
      title: courses.title,
      timeZone: courses.timeZone,
      slug: sql<string>`${courses.slug}`,
    })
    .from(courses)
    .where(eq(courses.id, courseId))
    .limit(1)
  return rows[0] ?? null
}

/** The accounts among `emails` (lower-cased), with their enrolment in the course, if any. */
export async function findPeopleByEmail(
  db: Executor,
  courseId: number,
  emails: string[],
  now: Date,
): Promise<KnownPerson[]> {
  if (emails.length === 0) return []
  const rows = await db
    .select({
      userId: users.id,
      email: users.email,
      displayName: users.displayName,
      passwordHash: users.passwordHash,
      role: enrollments.role,
      sectionId: enrollments.sectionId,
      labGroupId: enrollments.labGroupId,
    })
    .from(users)
    .leftJoin(enrollments, and(eq(enrollments.userId, users.id), eq(enrollments.courseId, courseId)))
    .where(inArray(users.email, emails))
  const ids = rows.filter((r) => r.passwordHash === null).map((r) => r.userId)
  const live = new Set(
    ids.length === 0
      ? []
      : (
          await db
            .select({ userId: invitations.userId })
            .from(invitations)
            .where(and(inArray(invitations.userId, ids), isNull(invitations.usedAt), gt(invitations.expiresAt, now)))
        ).map((r) => r.userId),
  )
  return rows.map((r) => ({
    userId: r.userId,
    email: r.email,
    displayName: r.displayName,
    hasPassword: r.passwordHash !== null,
    liveInvitation: live.has(r.userId),
    enrollment: r.role === null ? null : { role: r.role, sectionId: r.sectionId, labGroupId: r.labGroupId },
  }))
}

export async function insertSections(db: Executor, courseId: number, names: string[]): Promise<void> {
  if (names.length === 0) return
  await db.insert(sections).values(names.map((name) => ({ courseId, name })))
}

export async function insertGroups(
  db: Executor,
  courseId: number,
  groups: { name: string; sectionId: number | null }[],
): Promise<void> {
  if (groups.length === 0) return
  await db.insert(labGroups).values(groups.map((g) => ({ courseId, name: g.name, sectionId: g.sectionId })))
}

/** Creates accounts without a password; returns e-mail → id. */
export async function insertPasswordlessUsers(
  db: Executor,
  people: { email: string; displayName: string }[],
): Promise<Map<string, number>> {
  if (people.length === 0) return new Map()
  await db.insert(users).values(people.map((p) => ({ email: p.email, displayName: p.displayName, passwordHash: null })))
  const rows = await db
    .select({ id: users.id, email: users.email })
    .from(users)
    .where(
      inArray(
        users.email,
        people.map((p) => p.email),
      ),
    )
  return new Map(rows.map((r) => [r.email, r.id]))
}

export interface EnrollmentWrite {
  userId: number
  role: 'student' | 'ta'
  sectionId: number | null
  labGroupId: number | null
}

export async function insertEnrollments(db: Executor, courseId: number, rows: EnrollmentWrite[]): Promise<void> {
  if (rows.length === 0) return
  await db.insert(enrollments).values(rows.map((r) => ({ ...r, courseId })))
}

export async function updateEnrollment(db: Executor, courseId: number, row: EnrollmentWrite): Promise<void> {
  await db
    .update(enrollments)
    .set({ role: row.role, sectionId: row.sectionId, labGroupId: row.labGroupId })
    .where(and(eq(enrollments.userId, row.userId), eq(enrollments.courseId, courseId)))
}

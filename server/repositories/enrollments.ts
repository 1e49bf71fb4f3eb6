import { and, asc, count, eq, inArray, sql } from 'drizzle-orm'
import { alias } from 'drizzle-orm/mysql-core'
import type { CourseRole } from '../../shared/schemas/auth'
import type { CourseSummary, RosterEntry, SectionSummary } from '../../shared/schemas/courses'
import type { Executor } from '../db/client'
import { courses, enrollments, labGroups, sections, users } from '../db/schema'

export interface CourseEnrollment {
  courseId: number
  userId: number
  role: CourseRole
  sectionId: number | null
  labGroupId: number | null
}

export async function findEnrollment(db: Executor, userId: number, courseId: number): Promise<CourseEnrollment | null> {
  const rows = await db
    .select({
      courseId: enrollments.courseId,
      userId: enrollments.userId,
      role: enrollments.role,
      sectionId: enrollments.sectionId,
      labGroupId: enrollments.labGroupId,
    })
    .from(enrollments)
    .where(and(eq(enrollments.userId, userId), eq(enrollments.courseId, courseId)))
    .limit(1)
  return rows[0] ?? null
}

const summaryColumns = {
  id: courses.id,
  code: courses.code,
  title: courses.title,
  term: courses.term,
  institution: courses.institution,
  timeZone: courses.timeZone,
  role: enrollments.role,
  sectionName: sections.name,
  labGroupName: labGroups.name,
}

export async function listCoursesForUser(db: Executor, userId: number): Promise<CourseSummary[]> {
  return db
    .select(summaryColumns)
    .from(enrollments)
    .innerJoin(courses, eq(courses.id, enrollments.courseId))
    .leftJoin(sections, eq(sections.id, enrollments.sectionId))
    .leftJoin(labGroups, eq(labGroups.id, enrollments.labGroupId))
    .where(eq(enrollments.userId, userId))
    .orderBy(asc(courses.term), asc(courses.code))
}

export async function findCourseSummary(db: Executor, userId: number, courseId: number): Promise<CourseSummary | null> {
  const rows = await db
    .select(summaryColumns)
    .from(enrollments)
    .innerJoin(courses, eq(courses.id, enrollments.courseId))
    .leftJoin(sections, eq(sections.id, enrollments.sectionId))
    .leftJoin(labGroups, eq(labGroups.id, enrollments.labGroupId))
    .where(and(eq(enrollments.userId, userId), eq(enrollments.courseId, courseId)))
    .limit(1)
  return rows[0] ?? null
}

export async function countByRole(db: Executor, courseId: number): Promise<Record<CourseRole, number>> {
  const rows = await db
    .select({ role: enrollments.role, n: count() })
    .from(enrollments)
    .where(eq(enrollments.courseId, courseId))
    .groupBy(enrollments.role)
  const out: Record<CourseRole, number> = { instructor: 0, ta: 0, student: 0 }
  for (const r of rows) out[r.role] = r.n
  return out
}

export async function listSections(db: Executor, courseId: number): Promise<SectionSummary[]> {
  const taUsers = alias(users, 'ta_users')
  const rows = await db
    .select({
      id: sections.id,
      name: sections.name,
      meets: sections.meets,
      studentCount:
        sql<number>`(SELECT COUNT(*) FROM ${enrollments} e WHERE e.section_id = ${sections.id} AND e.role = 'student')`.mapWith(
          Number,
        ),
      ta: taUsers.displayName,
    })
    .from(sections)
    .leftJoin(enrollments, and(eq(enrollments.sectionId, sections.id), eq(enrollments.role, 'ta')))
    .leftJoin(taUsers, eq(taUsers.id, enrollments.userId))
    .where(eq(sections.courseId, courseId))
    .orderBy(asc(sections.name))
  const byId = new Map<number, SectionSummary>()
  for (const r of rows) {
    const s = byId.get(r.id) ?? { id: r.id, name: r.name, meets: r.meets, studentCount: r.studentCount, tas: [] }
    if (r.ta) s.tas.push(r.ta)
    byId.set(r.id, s)
  }
  return [...byId.values()]
}

export async function listGroupMemberNames(db: Executor, labGroupId: number): Promise<string[]> {
  const rows = await db
    .select({ name: users.displayName })
    .from(enrollments)
    .innerJoin(users, eq(users.id, enrollments.userId))
    .where(and(eq(enrollments.labGroupId, labGroupId), eq(enrollments.role, 'student')))
    .orderBy(asc(users.displayName))
  return rows.map((r) => r.name)
}

export async function listRoster(db: Executor, courseId: number, sectionId?: number): Promise<RosterEntry[]> {
  return db
    .select({
      userId: users.id,
      displayName: users.displayName,
      email: users.email,
      role: enrollments.role,
      sectionName: sections.name,
      labGroupName: labGroups.name,
      sectionId: enrollments.sectionId,
      labGroupId: enrollments.labGroupId,
    })
    .from(enrollments)
    .innerJoin(users, eq(users.id, enrollments.userId))
    .leftJoin(sections, eq(sections.id, enrollments.sectionId))
    .leftJoin(labGroups, eq(labGroups.id, enrollments.labGroupId))
    .where(
      sectionId === undefined
        ? eq(enrollments.courseId, courseId)
        : and(eq(enrollments.courseId, courseId), eq(enrollments.sectionId, sectionId)),
    )
    .orderBy(asc(enrollments.role), asc(users.displayName))
}

export async function insertCourseWithInstructor(
  db: Executor,
  c: { code: string; title: string; term: string; institution: string; timeZone: string },
  instructorId: number,
): Promise<number> {
  const [row] = await db.insert(courses).values(c).$returningId()
  if (!row) throw new Error('insert into courses returned no id')
  await db.insert(enrollments).values({ userId: instructorId, courseId: row.id, role: 'instructor' })
  return row.id
}

/** A TA or instructor of a course, with their section (TAs) and the course code, for staff mail. */
export interface CourseStaffMember {
  courseId: number
  sectionId: number | null
  role: CourseRole
  email: string
  name: string
  code: string
  sectionName: string | null
}

/** The TAs and instructors of these courses. */
export async function listCourseStaff(db: Executor, courseIds: number[]): Promise<CourseStaffMember[]> {
  if (courseIds.length === 0) return []
  return db
    .select({
      courseId: enrollments.courseId,
      sectionId: enrollments.sectionId,
      role: enrollments.role,
      email: users.email,
      name: users.displayName,
      code: courses.code,
      sectionName: sections.name,
    })
    .from(enrollments)
    .innerJoin(users, eq(users.id, enrollments.userId))
    .innerJoin(courses, eq(courses.id, enrollments.courseId))
    .leftJoin(sections, eq(sections.id, enrollments.sectionId))
    .where(and(inArray(enrollments.courseId, courseIds), inArray(enrollments.role, ['ta', 'instructor'])))
}

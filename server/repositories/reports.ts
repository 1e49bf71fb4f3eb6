import { and, asc, desc, eq } from 'drizzle-orm'
import type { Executor } from '../db/client'
import { courses, enrollments, submissions, users } from '../db/schema'

/** What the report's heading prints about the course. */
export async function courseHeader(
  db: Executor,
  courseId: number,
): Promise<{ code: string; title: string; term: string; institution: string; timeZone: string } | null> {
  const [row] = await db
    .select({
      code: courses.code,
      title: courses.title,
      term: courses.term,
      institution: courses.institution,
      timeZone: courses.timeZone,
    })
    .from(courses)
    .where(eq(courses.id, courseId))
  return row ?? null
}

/** The students of a lab group, by name. */
export async function groupMemberNames(db: Executor, labGroupId: number): Promise<string[]> {
  const rows = await db
    .select({ name: users.displayName })
    .from(enrollments)
    .innerJoin(users, eq(users.id, enrollments.userId))
    .where(and(eq(enrollments.labGroupId, labGroupId), eq(enrollments.role, 'student')))
    .orderBy(asc(users.displayName))
  return rows.map((r) => r.name)
}

/** Every graded hand-in of a module, newest attempt first. */
export async function gradedSubmissionsOfModule(db: Executor, courseId: number, moduleId: number) {
  return db
    .select({
      id: submissions.id,
      userId: submissions.userId,
      labGroupId: submissions.labGroupId,
      attempt: submissions.attempt,
      moduleVersionId: submissions.moduleVersionId,
    })
    .from(submissions)
    .where(
      and(eq(submissions.courseId, courseId), eq(submissions.moduleId, moduleId), eq(submissions.status, 'graded')),
    )
    .orderBy(desc(submissions.attempt), desc(submissions.id))
}

import { and, asc, eq, inArray, isNotNull } from 'drizzle-orm'
import type { Executor } from '../db/client'
import { calendarTokens, courses, dueExtensions, enrollments, moduleVersions, modules } from '../db/schema'
import type { CourseRole } from '../../shared/schemas/auth'

/** Calendar feed tokens and what a feed shows. Each function is one query, whatever the number of sheets. */

export async function replaceCalendarToken(db: Executor, userId: number, tokenHash: string): Promise<void> {
  await db
    .insert(calendarTokens)
    .values({ userId, tokenHash })
    .onDuplicateKeyUpdate({ set: { tokenHash, createdAt: new Date() } })
}

export async function findCalendarToken(db: Executor, userId: number): Promise<{ createdAt: Date } | null> {
  const rows = await db
    .select({ createdAt: calendarTokens.createdAt })
    .from(calendarTokens)
    .where(eq(calendarTokens.userId, userId))
    .limit(1)
  return rows[0] ?? null
}

export async function deleteCalendarToken(db: Executor, userId: number): Promise<void> {
  await db.delete(calendarTokens).where(eq(calendarTokens.userId, userId))
}

export async function findUserByCalendarHash(db: Executor, tokenHash: string): Promise<number | null> {
  const rows = await db
    .select({ userId: calendarTokens.userId })
    .from(calendarTokens)
    .where(eq(calendarTokens.tokenHash, tokenHash))
    .limit(1)
  return rows[0]?.userId ?? null
}

export interface FeedCourse {
  courseId: number
  code: string
  slug: string
  timeZone: string
  role: CourseRole
  closed: boolean
  /** A student's section, or the section a TA looks after. */
  sectionId: number | null
  labGroupId: number | null
}

export async function listFeedCourses(db: Executor, userId: number): Promise<FeedCourse[]> {
  const rows = await db
    .select({
      courseId: courses.id,
      code: courses.code,
      slug: courses.slug,
      timeZone: courses.timeZone,
      role: enrollments.role,
      closedAt: courses.closedAt,
      sectionId: enrollments.sectionId,
      labGroupId: enrollments.labGroupId,
    })
    .from(enrollments)
    .innerJoin(courses, eq(courses.id, enrollments.courseId))
    .where(eq(enrollments.userId, userId))
  return rows.map((r) => ({
    courseId: r.courseId,
    code: r.code,
    slug: r.slug ?? '',
    timeZone: r.timeZone,
    role: r.role,
    closed: r.closedAt !== null,
    sectionId: r.sectionId,
    labGroupId: r.labGroupId,
  }))
}

export interface FeedSheet {
  moduleId: number
  courseId: number
  slug: string
  title: string
  dueAt: Date
}

/**
 * Issued sheets (and closed ones, which students still read) with a due date, as the class sees them:
 * the published version's title and due date. Sheets being prepared or withdrawn are left out.
 */
export async function listIssuedSheetsWithDue(db: Executor, courseIds: number[]): Promise<FeedSheet[]> {
  if (courseIds.length === 0) return []
  const rows = await db
    .select({
      moduleId: modules.id,
      courseId: modules.courseId,
      slug: modules.slug,
      title: moduleVersions.title,
      dueAt: moduleVersions.dueAt,
    })
    .from(modules)
    .innerJoin(moduleVersions, eq(moduleVersions.id, modules.publishedVersionId))
    .where(
      and(
        inArray(modules.courseId, courseIds),
        inArray(modules.status, ['published', 'closed']),
        isNotNull(moduleVersions.dueAt),
      ),
    )
    .orderBy(asc(moduleVersions.dueAt), asc(modules.id))
  return rows.flatMap((r) => (r.dueAt ? [{ ...r, dueAt: r.dueAt }] : []))
}

/** One person's extended due dates, by module id. */
export async function listExtensionsOf(db: Executor, userId: number, moduleIds: number[]): Promise<Map<number, Date>> {
  if (moduleIds.length === 0) return new Map()
  const rows = await db
    .select({ moduleId: dueExtensions.moduleId, dueAt: dueExtensions.dueAt })
    .from(dueExtensions)
    .where(and(eq(dueExtensions.userId, userId), inArray(dueExtensions.moduleId, moduleIds)))
  return new Map(rows.map((r) => [r.moduleId, r.dueAt]))
}

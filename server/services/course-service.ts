import type { SessionUser } from '../../shared/schemas/auth'
import type { CourseHome, CourseKeys, CourseSummary, CreateCourse, RosterEntry } from '../../shared/schemas/courses'
import type { Database } from '../db/client'
import { AppError, notFound } from '../errors'
import type { CourseEnrollment } from '../repositories/enrollments'
import { listModuleRows } from '../repositories/modules'
import {
  countByRole,
  findCourseIdBySlug,
  findCourseSummary,
  findEnrollment,
  insertCourseWithInstructor,
  listCoursesForUser,
  listGroupMemberNames,
  listRoster,
  listSections,
} from '../repositories/enrollments'

export function myCourses(db: Database, user: SessionUser): Promise<CourseSummary[]> {
  return listCoursesForUser(db, user.id)
}

export async function courseHome(db: Database, enrollment: CourseEnrollment): Promise<CourseHome> {
  const course = await findCourseSummary(db, enrollment.userId, enrollment.courseId)
  if (!course) throw notFound('That course')
  const staff = enrollment.role !== 'student'
  const [sections, counts, labGroupMembers] = await Promise.all([
    staff ? listSections(db, enrollment.courseId) : Promise.resolve([]),
    countByRole(db, enrollment.courseId),
    enrollment.labGroupId !== null ? listGroupMemberNames(db, enrollment.labGroupId) : Promise.resolve([]),
  ])
  return {
    course,
    sections,
    labGroupMembers,
    counts: { students: counts.student, tas: counts.ta, instructors: counts.instructor },
  }
}

/**
 * The page-address keys of a course this person is enrolled in, found by its slug or its id (old
 * numeric addresses). Not enrolled, or no such course: 404, as for every course route.
 */
export async function courseKeys(
  db: Database,
  user: SessionUser,
  key: { slug: string } | { courseId: number },
): Promise<CourseKeys> {
  const courseId = 'slug' in key ? await findCourseIdBySlug(db, key.slug) : key.courseId
  const enrollment = courseId === null ? null : await findEnrollment(db, user.id, courseId)
  if (!enrollment) throw notFound('That course')
  const course = await findCourseSummary(db, user.id, enrollment.courseId)
  const staff = enrollment.role !== 'student'
  // A closed course is gone from a student's view (as the route guard has it).
  if (!course || (course.closedAt !== null && !staff)) throw notFound('That course')
  // The same sheets the course home lists to this person.
  const rows = await listModuleRows(db, enrollment.courseId, staff ? undefined : ['published', 'closed'])
  return { courseId: course.id, slug: course.slug, sheets: rows.map((m) => ({ id: m.id, slug: m.slug })) }
}

export function roster(db: Database, enrollment: CourseEnrollment): Promise<RosterEntry[]> {
  return listRoster(db, enrollment.courseId)
}

export async function createCourse(db: Database, user: SessionUser, input: CreateCourse): Promise<CourseSummary> {
  if (!user.isSiteAdmin) throw new AppError('forbidden', 'Only site administrators can create courses.', 403)
  try {
    const id = await db.transaction((tx) => insertCourseWithInstructor(tx, input, user.id))
    const summary = await findCourseSummary(db, user.id, id)
    if (!summary) throw new Error('course vanished after insert')
    return summary
  } catch (err) {
    if (isDuplicate(err)) {
      // The page-address key is unique too: code and term that differ only in case or punctuation clash.
      throw new AppError(
        'course_exists',
        `A course ${input.code} already exists for ${input.term} (or one whose code and term differ only in case or punctuation).`,
        409,
        { fields: ['code', 'term'] },
      )
    }
    throw err
  }
}

function isDuplicate(err: unknown): boolean {
  let e: unknown = err
  for (let i = 0; e && i < 4; i++) {
    if ((e as { code?: string }).code === 'ER_DUP_ENTRY') return true
    e = (e as { cause?: unknown }).cause
  }
  return false
}

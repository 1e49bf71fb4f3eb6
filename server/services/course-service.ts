import type { SessionUser } from '../../shared/schemas/auth'
import type { CourseHome, CourseSummary, CreateCourse, RosterEntry } from '../../shared/schemas/courses'
import type { Database } from '../db/client'
import { AppError, notFound } from '../errors'
import type { CourseEnrollment } from '../repositories/enrollments'
import {
  countByRole,
  findCourseSummary,
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
      throw new AppError('course_exists', `A course ${input.code} already exists for ${input.term}.`, 409, {
        fields: ['code', 'term'],
      })
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

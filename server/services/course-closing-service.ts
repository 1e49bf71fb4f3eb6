import type { CloseCourse, CourseClosedState } from '../../shared/schemas/course-closing'
import type { Database } from '../db/client'
import { AppError, forbidden, notFound } from '../errors'
import type { CourseEnrollment } from '../repositories/enrollments'
import { findCourseState, setCourseClosedAt } from '../repositories/enrollments'
import { courseHeader } from '../repositories/reports'

/**
 * Closes a course at the end of its term: from then on every write to it answers 409 (the route
 * guard refuses them), students no longer see it, and staff still list and read it.
 *
 * @throws AppError 403 unless an instructor; 400 `confirmation_mismatch` when the typed code is not
 *   the course's; 409 `course_closed` when it is closed already
 */
export async function closeCourse(db: Database, e: CourseEnrollment, input: CloseCourse): Promise<CourseClosedState> {
  if (e.role !== 'instructor') throw forbidden('Only the course’s instructors close it.')
  const [course, state] = await Promise.all([courseHeader(db, e.courseId), findCourseState(db, e.courseId)])
  if (!course || !state) throw notFound('That course')
  if (input.confirmCode.toLowerCase() !== course.code.toLowerCase()) {
    throw new AppError(
      'confirmation_mismatch',
      `confirmCode: type the course code, ${course.code}, to confirm closing the course.`,
      400,
      { fields: ['confirmCode'] },
    )
  }
  if (state.closedAt) throw new AppError('course_closed', `${course.code} is closed already.`, 409)
  const closedAt = new Date()
  await setCourseClosedAt(db, e.courseId, closedAt)
  return { courseId: e.courseId, closedAt: closedAt.toISOString() }
}

/**
 * Opens a closed course again, so it can be changed and students see it.
 *
 * @throws AppError 403 unless an instructor; 409 `course_not_closed` when it is open
 */
export async function reopenCourse(db: Database, e: CourseEnrollment): Promise<CourseClosedState> {
  if (e.role !== 'instructor') throw forbidden('Only the course’s instructors reopen it.')
  const state = await findCourseState(db, e.courseId)
  if (!state) throw notFound('That course')
  if (!state.closedAt) throw new AppError('course_not_closed', 'This course is open; there is nothing to reopen.', 409)
  await setCourseClosedAt(db, e.courseId, null)
  return { courseId: e.courseId, closedAt: null }
}

import type { NextFunction, Request, Response } from 'express'
import type { CourseRole } from '../../shared/schemas/auth'
import { CourseIdParamsSchema } from '../../shared/schemas/courses'
import type { Database } from '../db/client'
import { AppError, forbidden, notFound, unauthenticated } from '../errors'
import { findCourseState, findEnrollmentAndCourseState } from '../repositories/enrollments'
import type { CourseEnrollment } from '../repositories/enrollments'

/**
 * Route guards. Every route states one of these; the server enforces them, the client's
 * navigation only mirrors them.
 *
 * - `signedIn`: any signed-in person.
 * - `courseMember(db, roles)`: enrolled in `:courseId` with one of `roles`. Not enrolled → 404
 *   (a course you are not in does not exist for you); enrolled with another role → 403.
 *   A closed course is read-only: this guard is the one place that refuses every write to it
 *   (any method but GET/HEAD → 409 `course_closed`, after the role check), and students no longer
 *   read it (404). A route
 *   that must still work on a closed course (reopening it) passes `{ whenClosed: 'allow' }`.
 * - `courseArchiver(db)`: the course's instructor, or a site administrator (who need not be enrolled).
 */
export function signedIn(req: Request, _res: Response, next: NextFunction): void {
  if (!req.user) throw unauthenticated()
  next()
}

export const ANY_MEMBER: readonly CourseRole[] = ['instructor', 'ta', 'student']
export const STAFF: readonly CourseRole[] = ['instructor', 'ta']
export const INSTRUCTOR: readonly CourseRole[] = ['instructor']

const READS = new Set(['GET', 'HEAD', 'OPTIONS'])

export const courseClosed = () =>
  new AppError(
    'course_closed',
    'This course is closed at the end of its term and can no longer be changed. Its instructor can reopen it.',
    409,
  )

export function courseMember(
  db: Database,
  roles: readonly CourseRole[],
  opts: { whenClosed?: 'refuse-writes' | 'allow' } = {},
) {
  return async (req: Request, res: Response, next: NextFunction): Promise<void> => {
    if (!req.user) throw unauthenticated()
    const { courseId } = CourseIdParamsSchema.parse(req.params)
    const found = await findEnrollmentAndCourseState(db, req.user.id, courseId)
    if (!found) throw notFound('That course')
    const { enrollment, closedAt } = found
    if (!roles.includes(enrollment.role)) {
      throw forbidden(`This needs the ${roles.join(' or ')} role in this course.`)
    }
    if (closedAt !== null) {
      // Every write says why it is refused, a student's hand-in or re-check request too.
      if (opts.whenClosed !== 'allow' && !READS.has(req.method)) throw courseClosed()
      // A closed course is gone from a student's view, as a course they are not in.
      if (enrollment.role === 'student') throw notFound('That course')
    }
    res.locals.enrollment = enrollment
    next()
  }
}

/**
 * The instructor of `:courseId`, or a site administrator. A site administrator who is not enrolled
 * acts with an instructor's view of the course (`res.locals.enrollment` is made for them); anyone
 * else not enrolled gets 404, enrolled with another role 403.
 */
export function courseArchiver(db: Database) {
  return async (req: Request, res: Response, next: NextFunction): Promise<void> => {
    if (!req.user) throw unauthenticated()
    const { courseId } = CourseIdParamsSchema.parse(req.params)
    const found = await findEnrollmentAndCourseState(db, req.user.id, courseId)
    if (found?.enrollment.role === 'instructor') {
      res.locals.enrollment = found.enrollment
      return next()
    }
    if (req.user.isSiteAdmin) {
      if (!(await findCourseState(db, courseId))) throw notFound('That course')
      const asAdmin: CourseEnrollment = {
        courseId,
        userId: req.user.id,
        role: 'instructor',
        sectionId: null,
        labGroupId: null,
      }
      res.locals.enrollment = asAdmin
      return next()
    }
    if (!found || (found.closedAt !== null && found.enrollment.role === 'student')) throw notFound('That course')
    throw forbidden('Only the course’s instructors or a site administrator download its archive.')
  }
}

/** The enrollment `courseMember` stored; throws if the guard is missing (a programming error). */
export function enrollmentOf(res: Response) {
  const e = res.locals.enrollment
  if (!e) throw new Error('courseMember guard missing on this route')
  return e
}

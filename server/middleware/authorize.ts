import type { NextFunction, Request, Response } from 'express'
import type { CourseRole } from '../../shared/schemas/auth'
import { CourseIdParamsSchema } from '../../shared/schemas/courses'
import type { Database } from '../db/client'
import { forbidden, notFound, unauthenticated } from '../errors'
import { findEnrollment } from '../repositories/enrollments'

/**
 * Route guards. Every route states one of these; the server enforces them, the client's
 * navigation only mirrors them.
 *
 * - `signedIn`: any signed-in person.
 * - `courseMember(db, roles)`: enrolled in `:courseId` with one of `roles`. Not enrolled → 404
 *   (a course you are not in does not exist for you); enrolled with another role → 403.
 */
export function signedIn(req: Request, _res: Response, next: NextFunction): void {
  if (!req.user) throw unauthenticated()
  next()
}

export const ANY_MEMBER: readonly CourseRole[] = ['instructor', 'ta', 'student']
export const STAFF: readonly CourseRole[] = ['instructor', 'ta']
export const INSTRUCTOR: readonly CourseRole[] = ['instructor']

export function courseMember(db: Database, roles: readonly CourseRole[]) {
  return async (req: Request, res: Response, next: NextFunction): Promise<void> => {
    if (!req.user) throw unauthenticated()
    const { courseId } = CourseIdParamsSchema.parse(req.params)
    const enrollment = await findEnrollment(db, req.user.id, courseId)
    if (!enrollment) throw notFound('That course')
    if (!roles.includes(enrollment.role)) {
      throw forbidden(`This needs the ${roles.join(' or ')} role in this course.`)
    }
    res.locals.enrollment = enrollment
    next()
  }
}

/** The enrollment `courseMember` stored; throws if the guard is missing (a programming error). */
export function enrollmentOf(res: Response) {
  const e = res.locals.enrollment
  if (!e) throw new Error('courseMember guard missing on this route')
  return e
}

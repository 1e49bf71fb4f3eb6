import type { SessionUser } from '../shared/schemas/auth'
import type { CourseEnrollment } from './repositories/enrollments'

declare global {
  namespace Express {
    // passport puts the signed-in person here.
    // eslint-disable-next-line @typescript-eslint/no-empty-object-type
    interface User extends SessionUser {}
    interface Locals {
      /** Set by requireCourseRole: the caller's enrollment in the course of the route. */
      enrollment?: CourseEnrollment
    }
  }
}

export {}

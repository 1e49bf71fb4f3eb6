import { Router } from 'express'
import { CreateCourseSchema } from '../../shared/schemas/courses'
import type { Database } from '../db/client'
import { ANY_MEMBER, STAFF, courseMember, enrollmentOf, signedIn } from '../middleware/authorize'
import { valid, validate } from '../middleware/validate'
import { courseHome, createCourse, myCourses, roster } from '../services/course-service'

/**
 * Who may call:
 * - GET  /api/courses                     signed in (their own enrollments only)
 * - POST /api/courses                     signed in + site administrator (checked in the service)
 * - GET  /api/courses/:courseId           enrolled in the course (any role)
 * - GET  /api/courses/:courseId/roster    staff of the course (instructor or TA)
 */
export function courseRoutes(db: Database): Router {
  const r = Router()

  r.get('/', signedIn, async (req, res) => {
    res.json(await myCourses(db, req.user!))
  })

  r.post('/', signedIn, validate('body', CreateCourseSchema), async (req, res) => {
    const course = await createCourse(db, req.user!, valid(res, 'body', CreateCourseSchema))
    res.status(201).json(course)
  })

  r.get('/:courseId', courseMember(db, ANY_MEMBER), async (_req, res) => {
    res.json(await courseHome(db, enrollmentOf(res)))
  })

  r.get('/:courseId/roster', courseMember(db, STAFF), async (_req, res) => {
    res.json(await roster(db, enrollmentOf(res)))
  })

  return r
}

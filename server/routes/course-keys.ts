import { Router } from 'express'
import { CourseIdParamsSchema, CourseSlugParamsSchema } from '../../shared/schemas/courses'
import type { Database } from '../db/client'
import { signedIn } from '../middleware/authorize'
import { valid, validate } from '../middleware/validate'
import { courseKeys } from '../services/course-service'

/**
 * How page addresses map to ids. The client's router asks here before it opens a course page.
 *
 * Who may call:
 * - GET /api/course-keys/:courseSlug          enrolled in the course (any role); otherwise 404
 * - GET /api/course-keys/by-id/:courseId      enrolled in the course (any role); otherwise 404 (old addresses)
 */
export function courseKeyRoutes(db: Database): Router {
  const r = Router()

  r.get('/by-id/:courseId', signedIn, validate('params', CourseIdParamsSchema), async (req, res) => {
    res.json(await courseKeys(db, req.user!, { courseId: valid(res, 'params', CourseIdParamsSchema).courseId }))
  })

  r.get('/:courseSlug', signedIn, validate('params', CourseSlugParamsSchema), async (req, res) => {
    res.json(await courseKeys(db, req.user!, { slug: valid(res, 'params', CourseSlugParamsSchema).courseSlug }))
  })

  return r
}

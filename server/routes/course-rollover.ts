import { Router } from 'express'
import { RolloverRequestSchema } from '../../shared/schemas/course-rollover'
import type { Database } from '../db/client'
import { INSTRUCTOR, courseMember, enrollmentOf } from '../middleware/authorize'
import { valid, validate } from '../middleware/validate'
import { confirmRollover, previewRollover } from '../services/course-rollover-service'

/**
 * Starting next term's course from this one, mounted at /api/courses/:courseId. Not enrolled → 404;
 * a TA or student → 403. A code and term that exist already → 409, nothing written.
 * Who may call:
 * - POST /rollover/preview   instructor: what would be created (nothing is written)
 * - POST /rollover           instructor: creates it (checks everything again); the caller is its instructor
 */
export function courseRolloverRoutes(db: Database): Router {
  const r = Router({ mergeParams: true })
  // A course closed at the end of its term is the usual one to start the next term from: rolling
  // over only reads it, so its closed state does not refuse this.
  const instructor = courseMember(db, INSTRUCTOR, { whenClosed: 'allow' })

  r.post('/rollover/preview', instructor, validate('body', RolloverRequestSchema), async (_req, res) => {
    res.json(await previewRollover(db, enrollmentOf(res), valid(res, 'body', RolloverRequestSchema)))
  })

  r.post('/rollover', instructor, validate('body', RolloverRequestSchema), async (_req, res) => {
    res.status(201).json(await confirmRollover(db, enrollmentOf(res), valid(res, 'body', RolloverRequestSchema)))
  })

  return r
}

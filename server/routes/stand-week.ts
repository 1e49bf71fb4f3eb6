import { Router } from 'express'
import { StandWeekQuerySchema } from '../../shared/schemas/stand-week'
import type { Database } from '../db/client'
import { ANY_MEMBER, courseMember, enrollmentOf } from '../middleware/authorize'
import { valid, validate } from '../middleware/validate'
import { standWeek } from '../services/stand-week-service'

/**
 * Mounted at /api/courses/:courseId. Who may call:
 * - GET /week?start=YYYY-MM-DD   enrolled (any role): the week's stand sessions as the caller may see
 *                                them (students their section's, TAs their section's, instructors all)
 */
export function standWeekRoutes(db: Database): Router {
  const r = Router({ mergeParams: true })
  r.get('/week', courseMember(db, ANY_MEMBER), validate('query', StandWeekQuerySchema), async (_req, res) => {
    res.json(await standWeek(db, enrollmentOf(res), valid(res, 'query', StandWeekQuerySchema)))
  })
  return r
}

import { Router } from 'express'
import { ModuleParamsSchema } from '../../shared/schemas/modules'
import { BookingRunParamsSchema, RunEntryInputSchema, RunParamsSchema, SignOffSchema } from '../../shared/schemas/runs'
import type { Database } from '../db/client'
import { ANY_MEMBER, STAFF, courseMember, enrollmentOf } from '../middleware/authorize'
import { valid, validate } from '../middleware/validate'
import { addEntry, getRun, openRun, signOff, signedRuns } from '../services/run-service'

/**
 * Mounted at /api/courses/:courseId. Who may call (a booking or run outside the caller's reach
 * answers 404: staff of another section, students of another group):
 * - GET  /bookings/:bookingId/run        staff of the booking's section, instructors, students of the booked group
 *                                        (404 `run_not_opened` with the booking when the run is not open yet)
 * - POST /bookings/:bookingId/run        staff of the booking's section, instructors (open the run)
 * - POST /runs/:runId/entries            as GET; students tick only items that are not staff-only, and
 *                                        write notes; corrections are staff's
 * - POST /runs/:runId/sign-off           staff of the booking's section, instructors
 * - GET  /modules/:moduleId/signed-runs  any member (a student's own group's signed-off runs; empty for staff)
 */
export function runRoutes(db: Database): Router {
  const r = Router({ mergeParams: true })
  const booking = validate('params', BookingRunParamsSchema)
  const run = validate('params', RunParamsSchema)

  r.get('/bookings/:bookingId/run', courseMember(db, ANY_MEMBER), booking, async (_req, res) => {
    res.json(await getRun(db, enrollmentOf(res), valid(res, 'params', BookingRunParamsSchema).bookingId))
  })

  r.post('/bookings/:bookingId/run', courseMember(db, STAFF), booking, async (_req, res) => {
    res.status(201).json(await openRun(db, enrollmentOf(res), valid(res, 'params', BookingRunParamsSchema).bookingId))
  })

  r.post(
    '/runs/:runId/entries',
    courseMember(db, ANY_MEMBER),
    run,
    validate('body', RunEntryInputSchema),
    async (_req, res) => {
      const { runId } = valid(res, 'params', RunParamsSchema)
      res.status(201).json(await addEntry(db, enrollmentOf(res), runId, valid(res, 'body', RunEntryInputSchema)))
    },
  )

  r.post('/runs/:runId/sign-off', courseMember(db, STAFF), run, validate('body', SignOffSchema), async (_req, res) => {
    const { runId } = valid(res, 'params', RunParamsSchema)
    res.json(await signOff(db, enrollmentOf(res), runId, valid(res, 'body', SignOffSchema)))
  })

  r.get(
    '/modules/:moduleId/signed-runs',
    courseMember(db, ANY_MEMBER),
    validate('params', ModuleParamsSchema),
    async (_req, res) => {
      res.json(await signedRuns(db, enrollmentOf(res), valid(res, 'params', ModuleParamsSchema).moduleId))
    },
  )

  return r
}

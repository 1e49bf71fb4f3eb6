import { Router } from 'express'
import {
  BookSchema,
  BookingCancelSchema,
  BookingMoveSchema,
  BookingParamsSchema,
  BookingSettingsSchema,
  SlotCancelSchema,
  SlotCreateSchema,
  SlotParamsSchema,
  SlotsQuerySchema,
  StandCreateSchema,
  StandParamsSchema,
  StandUpdateSchema,
} from '../../shared/schemas/stands'
import type { Database } from '../db/client'
import { ANY_MEMBER, INSTRUCTOR, STAFF, courseMember, enrollmentOf } from '../middleware/authorize'
import { valid, validate } from '../middleware/validate'
import {
  bookSlot,
  bookingList,
  cancelBooking,
  cancelSlot,
  joinWaitlist,
  leaveWaitlist,
  moveBooking,
} from '../services/booking-service'
import {
  changeBookingSettings,
  changeStand,
  createStand,
  openSlots,
  slotList,
  standsOverview,
} from '../services/stand-service'

/**
 * Test stands, slots and bookings, mounted at /api/courses/:courseId. Not enrolled → 404; enrolled
 * with another role → 403. Students act for their own lab group only; TAs on their own section's
 * slots and bookings (others answer 404); instructors on the whole course.
 * Who may call:
 * - GET    /stands                            staff: stands, stand sheets, sections, cut-off
 * - POST   /stands                            instructor: new stand { name, location, maxPressureNote, moduleIds }
 * - PATCH  /stands/:standId                   instructor: change a stand
 * - POST   /stands/:standId/slots             staff (TA: own section): one slot or a weekly pattern, all or nothing
 * - DELETE /slots/:slotId                     staff: cancel a slot { reason }; its booking is cancelled and e-mailed
 * - GET    /slots?from=&to=                   any member: the slots of the caller's section (instructor: all)
 * - POST   /slots/:slotId/bookings            student: book for the own group { moduleId }
 * - POST   /slots/:slotId/waitlist            student: the own group waits for a taken slot { moduleId }
 * - DELETE /slots/:slotId/waitlist            student: the own group leaves the waiting list
 * - GET    /bookings                          any member: the group's / section's / course's bookings
 * - POST   /bookings/:bookingId/cancel        student (own group, before the cut-off) or staff (with a reason)
 * - POST   /bookings/:bookingId/move          staff: move to another slot { slotId, reason }
 * - PATCH  /booking-settings                  instructor: { cutoffHours }
 */
export function standRoutes(db: Database, deps: { appUrl: string; onMailQueued?: () => void }): Router {
  const r = Router({ mergeParams: true })
  const member = courseMember(db, ANY_MEMBER)
  const staff = courseMember(db, STAFF)
  const student = courseMember(db, ['student'])
  const instructor = courseMember(db, INSTRUCTOR)
  const mailed = () => deps.onMailQueued?.()

  r.get('/stands', staff, async (_req, res) => {
    res.json(await standsOverview(db, enrollmentOf(res)))
  })

  r.post('/stands', instructor, validate('body', StandCreateSchema), async (_req, res) => {
    res.status(201).json(await createStand(db, enrollmentOf(res), valid(res, 'body', StandCreateSchema)))
  })

  r.patch(
    '/stands/:standId',
    instructor,
    validate('params', StandParamsSchema),
    validate('body', StandUpdateSchema),
    async (_req, res) => {
      const { standId } = valid(res, 'params', StandParamsSchema)
      res.json(await changeStand(db, enrollmentOf(res), standId, valid(res, 'body', StandUpdateSchema)))
    },
  )

  r.post(
    '/stands/:standId/slots',
    staff,
    validate('params', StandParamsSchema),
    validate('body', SlotCreateSchema),
    async (_req, res) => {
      const { standId } = valid(res, 'params', StandParamsSchema)
      res.status(201).json(await openSlots(db, enrollmentOf(res), standId, valid(res, 'body', SlotCreateSchema)))
    },
  )

  r.delete(
    '/slots/:slotId',
    staff,
    validate('params', SlotParamsSchema),
    validate('body', SlotCancelSchema),
    async (_req, res) => {
      const { slotId } = valid(res, 'params', SlotParamsSchema)
      const { reason } = valid(res, 'body', SlotCancelSchema)
      const out = await cancelSlot(db, enrollmentOf(res), slotId, reason, deps)
      mailed()
      res.json(out)
    },
  )

  r.get('/slots', member, validate('query', SlotsQuerySchema), async (_req, res) => {
    res.json(await slotList(db, enrollmentOf(res), valid(res, 'query', SlotsQuerySchema)))
  })

  r.post(
    '/slots/:slotId/bookings',
    student,
    validate('params', SlotParamsSchema),
    validate('body', BookSchema),
    async (_req, res) => {
      const { slotId } = valid(res, 'params', SlotParamsSchema)
      res.status(201).json(await bookSlot(db, enrollmentOf(res), slotId, valid(res, 'body', BookSchema).moduleId))
    },
  )

  r.post(
    '/slots/:slotId/waitlist',
    student,
    validate('params', SlotParamsSchema),
    validate('body', BookSchema),
    async (_req, res) => {
      const { slotId } = valid(res, 'params', SlotParamsSchema)
      res.status(201).json(await joinWaitlist(db, enrollmentOf(res), slotId, valid(res, 'body', BookSchema).moduleId))
    },
  )

  r.delete('/slots/:slotId/waitlist', student, validate('params', SlotParamsSchema), async (_req, res) => {
    await leaveWaitlist(db, enrollmentOf(res), valid(res, 'params', SlotParamsSchema).slotId)
    res.status(204).end()
  })

  r.get('/bookings', member, async (_req, res) => {
    res.json(await bookingList(db, enrollmentOf(res)))
  })

  r.post(
    '/bookings/:bookingId/cancel',
    member,
    validate('params', BookingParamsSchema),
    validate('body', BookingCancelSchema),
    async (_req, res) => {
      const { bookingId } = valid(res, 'params', BookingParamsSchema)
      const out = await cancelBooking(db, enrollmentOf(res), bookingId, valid(res, 'body', BookingCancelSchema), deps)
      mailed()
      res.json(out)
    },
  )

  r.post(
    '/bookings/:bookingId/move',
    staff,
    validate('params', BookingParamsSchema),
    validate('body', BookingMoveSchema),
    async (_req, res) => {
      const { bookingId } = valid(res, 'params', BookingParamsSchema)
      const out = await moveBooking(db, enrollmentOf(res), bookingId, valid(res, 'body', BookingMoveSchema), deps)
      mailed()
      res.json(out)
    },
  )

  r.patch('/booking-settings', instructor, validate('body', BookingSettingsSchema), async (_req, res) => {
    res.json(await changeBookingSettings(db, enrollmentOf(res), valid(res, 'body', BookingSettingsSchema)))
  })

  return r
}

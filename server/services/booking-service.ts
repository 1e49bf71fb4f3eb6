import type { BookingCancel, BookingList, BookingMove, BookingView } from '../../shared/schemas/stands'
import { STAFF_REASON_MIN } from '../../shared/schemas/stands'
import type { Database, Executor } from '../db/client'
import { retryOnLockConflict } from '../db/retry'
import { AppError, notFound } from '../errors'
import type { BookingRow } from '../repositories/bookings'
import {
  activeBookingOf,
  clearWaitlist,
  deleteWait,
  endBooking,
  findBooking,
  insertBooking,
  insertWait,
  listBookings,
  lockGroups,
  waitlistOf,
} from '../repositories/bookings'
import type { CourseEnrollment } from '../repositories/enrollments'
import { cancelSlotRow, courseBookingSettings, findSlot, lockSlots } from '../repositories/stands'
import { findUserById } from '../repositories/users'
import { mailChange, promote } from './booking-handover'
import type { BookingDeps } from './booking-rules'
import {
  HOUR,
  bookingRefusal,
  cutOff,
  isDuplicate,
  myGroup,
  noGroup,
  notActive,
  slotTaken,
  view,
} from './booking-rules'
import { fieldError, staffActsOn, staffSection } from './stand-service'

export type { BookingDeps } from './booking-rules'

/**
 * Booking stand time. Every write runs in one transaction that first locks the lab-group rows it
 * touches and then the slot rows, each in id order: the group lock keeps two members of one group
 * from booking past the sheet's stand runs, the slot lock makes racing groups take turns, and the
 * unique key on the active slot refuses a second holder whatever happens above it.
 */

/** A group books a slot for one run of a sheet. */
export async function bookSlot(
  db: Database,
  e: CourseEnrollment,
  slotId: number,
  moduleId: number,
  now = new Date(),
): Promise<BookingView> {
  if (e.labGroupId === null) throw noGroup()
  const course = await courseBookingSettings(db, e.courseId)
  const id = await retryOnLockConflict(() =>
    db.transaction(async (tx) => {
      await lockGroups(tx, [e.labGroupId!])
      const group = await myGroup(tx, e)
      const slot = await findSlot(tx, e.courseId, slotId, true)
      if (!slot) throw notFound('That slot')
      const no = await bookingRefusal(tx, course, e.courseId, group, slot, moduleId, { boundByCutoff: true, now })
      if (no) throw no
      const holder = await activeBookingOf(tx, slotId)
      if (holder) throw slotTaken(holder.labGroupId === group.id)
      const bookingId = await insertBooking(tx, { slotId, labGroupId: group.id, moduleId, bookedBy: e.userId })
      await deleteWait(tx, slotId, group.id)
      return bookingId
    }),
  ).catch((err: unknown) => {
    // The unique key on the active slot: another request won between our check and our insert.
    if (isDuplicate(err)) throw slotTaken(false)
    throw err
  })
  return view((await findBooking(db, e.courseId, id))!)
}

/** A group joins a taken slot's waiting list for a run of a sheet. */
export async function joinWaitlist(
  db: Database,
  e: CourseEnrollment,
  slotId: number,
  moduleId: number,
  now = new Date(),
): Promise<{ place: number }> {
  if (e.labGroupId === null) throw noGroup()
  const course = await courseBookingSettings(db, e.courseId)
  return retryOnLockConflict(() =>
    db.transaction(async (tx) => {
      await lockGroups(tx, [e.labGroupId!])
      const group = await myGroup(tx, e)
      const slot = await findSlot(tx, e.courseId, slotId, true)
      if (!slot) throw notFound('That slot')
      const no = await bookingRefusal(tx, course, e.courseId, group, slot, moduleId, { boundByCutoff: true, now })
      if (no) throw no
      const holder = await activeBookingOf(tx, slotId)
      if (!holder) throw new AppError('slot_free', 'This slot is free: book it instead of waiting.', 409)
      if (holder.labGroupId === group.id) throw slotTaken(true)
      const list = await waitlistOf(tx, slotId)
      if (list.some((w) => w.labGroupId === group.id))
        throw new AppError('already_waiting', 'Your group is already on this slot’s waiting list.', 409)
      await insertWait(tx, { slotId, labGroupId: group.id, moduleId, addedBy: e.userId })
      return { place: list.length + 1 }
    }),
  )
}

/** A group leaves a slot's waiting list. */
export async function leaveWaitlist(db: Database, e: CourseEnrollment, slotId: number): Promise<void> {
  if (e.labGroupId === null) throw noGroup()
  const slot = await findSlot(db, e.courseId, slotId)
  if (!slot) throw notFound('That slot')
  if (!(await deleteWait(db, slotId, e.labGroupId))) throw notFound('Your group’s place on this waiting list')
}

/** Bookings the caller may see: their group's, their section's (TA) or the course's (instructor). */
export async function bookingList(db: Database, e: CourseEnrollment): Promise<BookingList> {
  const { timeZone } = await courseBookingSettings(db, e.courseId)
  if (e.role === 'student') {
    if (e.labGroupId === null) return { bookings: [], timeZone }
    return { bookings: (await listBookings(db, e.courseId, { labGroupId: e.labGroupId })).map(view), timeZone }
  }
  const section = staffSection(e)
  if (section === null) return { bookings: [], timeZone }
  return {
    bookings: (await listBookings(db, e.courseId, section === undefined ? {} : { sectionId: section })).map(view),
    timeZone,
  }
}

/** The booking if the caller may act on it: their group's (students), their section's (TAs). */
async function bookingInScope(db: Executor, e: CourseEnrollment, bookingId: number): Promise<BookingRow> {
  const b = await findBooking(db, e.courseId, bookingId)
  const visible =
    b && (e.role === 'student' ? e.labGroupId !== null && b.labGroupId === e.labGroupId : staffActsOn(e, b.sectionId))
  if (!b || !visible) throw notFound('That booking')
  return b
}

function staffReason(reason: string | undefined): string {
  const r = reason?.trim() ?? ''
  if (r.length < STAFF_REASON_MIN)
    throw fieldError('reason', 'reason: say why the booking is cancelled (the group is e-mailed the reason).')
  return r
}

/**
 * Cancels a booking. The group cancels its own until the cut-off; staff cancel any in their scope with
 * a reason, e-mailed to the group. The slot then goes to the first waiting group that can still book it.
 */
export async function cancelBooking(
  db: Database,
  e: CourseEnrollment,
  bookingId: number,
  input: BookingCancel,
  deps: BookingDeps,
  now = new Date(),
): Promise<BookingView> {
  const b = await bookingInScope(db, e, bookingId)
  const isStaff = e.role !== 'student'
  const reason = isStaff ? staffReason(input.reason) : input.reason?.trim() || null
  const course = await courseBookingSettings(db, e.courseId)
  if (b.status !== 'active') throw notActive(b)
  if (!isStaff && b.startsAt.getTime() - course.cutoffHours * HOUR < now.getTime())
    throw cutOff(course, b.startsAt, 'cancel')
  const by = isStaff ? ((await findUserById(db, e.userId))?.displayName ?? 'The course staff') : ''
  await retryOnLockConflict(() =>
    db.transaction(async (tx) => {
      const waiting = await waitlistOf(tx, b.slotId)
      const locked = [b.labGroupId, ...waiting.map((w) => w.labGroupId)]
      await lockGroups(tx, locked)
      await lockSlots(tx, [b.slotId])
      if (!(await endBooking(tx, b.id, { status: 'cancelled', endedBy: e.userId, reason })))
        throw notActive({ ...b, status: 'cancelled' })
      if (isStaff)
        await mailChange(tx, e.courseId, course, b, { by, reason: reason!, dedupe: `booking-cancelled:${b.id}` }, deps)
      await promote(tx, e.courseId, course, b.slotId, new Set(locked), deps, now)
    }),
  )
  return view((await findBooking(db, e.courseId, b.id))!)
}

/** Staff move a booking to another slot (same section, the sheet allowed there), with a reason e-mailed. */
export async function moveBooking(
  db: Database,
  e: CourseEnrollment,
  bookingId: number,
  input: BookingMove,
  deps: BookingDeps,
  now = new Date(),
): Promise<BookingView> {
  const b = await bookingInScope(db, e, bookingId)
  if (b.status !== 'active') throw notActive(b)
  if (input.slotId === b.slotId) throw fieldError('slotId', 'slotId: that is the slot the booking already has.')
  const course = await courseBookingSettings(db, e.courseId)
  const target = await findSlot(db, e.courseId, input.slotId)
  if (!target) throw fieldError('slotId', `slotId: slot ${input.slotId} is not a slot of this course.`)
  if (!staffActsOn(e, target.sectionId))
    throw new AppError('wrong_section', 'slotId: a TA moves bookings within their own section only.', 403)
  const by = (await findUserById(db, e.userId))?.displayName ?? 'The course staff'
  const newId = await retryOnLockConflict(() =>
    db.transaction(async (tx) => {
      const waiting = await waitlistOf(tx, b.slotId)
      const locked = [b.labGroupId, ...waiting.map((w) => w.labGroupId)]
      await lockGroups(tx, locked)
      await lockSlots(tx, [b.slotId, target.id])
      const slot = (await findSlot(tx, e.courseId, target.id))!
      const group = { id: b.labGroupId, sectionId: b.sectionId }
      const no = await bookingRefusal(tx, course, e.courseId, group, slot, b.moduleId, { boundByCutoff: false, now })
      // The group's own booking being moved still counts against its runs; the move does not add one.
      if (no && no.code !== 'stand_runs_used') throw no
      if (await activeBookingOf(tx, target.id)) throw slotTaken(false)
      const id = await insertBooking(tx, {
        slotId: target.id,
        labGroupId: b.labGroupId,
        moduleId: b.moduleId,
        bookedBy: e.userId,
      })
      if (!(await endBooking(tx, b.id, { status: 'moved', endedBy: e.userId, reason: input.reason, movedToId: id })))
        throw notActive({ status: 'changed' })
      await deleteWait(tx, target.id, b.labGroupId)
      const moved = (await findBooking(tx, e.courseId, id))!
      await mailChange(
        tx,
        e.courseId,
        course,
        b,
        { by, reason: input.reason, dedupe: `booking-moved:${b.id}`, movedTo: moved },
        deps,
      )
      await promote(tx, e.courseId, course, b.slotId, new Set(locked), deps, now)
      return id
    }),
  ).catch((err: unknown) => {
    if (isDuplicate(err)) throw slotTaken(false)
    throw err
  })
  return view((await findBooking(db, e.courseId, newId))!)
}

/** Staff cancel a slot with a reason: its booking is cancelled and e-mailed, its waiting list cleared. */
export async function cancelSlot(
  db: Database,
  e: CourseEnrollment,
  slotId: number,
  reason: string,
  deps: BookingDeps,
): Promise<{ slotId: number; cancelledBookings: number }> {
  const slot = await findSlot(db, e.courseId, slotId)
  if (!slot || !staffActsOn(e, slot.sectionId)) throw notFound('That slot')
  const course = await courseBookingSettings(db, e.courseId)
  const by = (await findUserById(db, e.userId))?.displayName ?? 'The course staff'
  return retryOnLockConflict(() =>
    db.transaction(async (tx) => {
      const holder = await activeBookingOf(tx, slotId)
      await lockGroups(tx, holder ? [holder.labGroupId] : [])
      const locked = (await findSlot(tx, e.courseId, slotId, true))!
      if (locked.cancelledAt) throw new AppError('slot_cancelled', 'This slot is already cancelled.', 409)
      await cancelSlotRow(tx, slotId, reason)
      let n = 0
      const active = await activeBookingOf(tx, slotId)
      if (active) {
        const b = (await findBooking(tx, e.courseId, active.id))!
        if (await endBooking(tx, b.id, { status: 'cancelled', endedBy: e.userId, reason })) n++
        await mailChange(tx, e.courseId, course, b, { by, reason, dedupe: `booking-cancelled:${b.id}` }, deps)
      }
      await clearWaitlist(tx, slotId)
      return { slotId, cancelledBookings: n }
    }),
  )
}

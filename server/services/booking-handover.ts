import type { Executor } from '../db/client'
import { bookingChangedMail, pageLinks, waitlistBookedMail } from '../mail/templates'
import type { BookingRow } from '../repositories/bookings'
import {
  activeBookingOf,
  deleteWait,
  findBooking,
  findGroup,
  groupMembers,
  insertBooking,
  waitlistOf,
} from '../repositories/bookings'
import { enqueueMail } from '../repositories/outbox'
import { findSlot } from '../repositories/stands'
import type { BookingDeps, Course } from './booking-rules'
import { bookingRefusal } from './booking-rules'
import { whenText } from './stand-service'

/**
 * What follows when a booking ends early: staff's reason e-mailed to the group, and the freed slot
 * handed to the first waiting group that can still book it. Both run inside the caller's transaction.
 */

export async function mailChange(
  tx: Executor,
  courseId: number,
  course: Course,
  b: BookingRow,
  c: { by: string; reason: string; dedupe: string; movedTo?: BookingRow },
  deps: BookingDeps,
): Promise<void> {
  const members = await groupMembers(tx, courseId, b.labGroupId)
  const link = `${pageLinks(deps.appUrl, course.slug).course}/stand-time`
  const named = (x: BookingRow) => ({
    sheetTitle: x.moduleTitle,
    standName: x.standName,
    when: whenText(x.startsAt, x.minutes, course.timeZone),
  })
  await enqueueMail(
    tx,
    members.map((m) => ({
      dedupeKey: c.dedupe,
      toAddress: m.email,
      toName: m.displayName,
      ...bookingChangedMail({
        name: m.displayName,
        courseCode: course.code,
        groupName: b.labGroupName,
        booking: named(b),
        ...(c.movedTo ? { movedTo: named(c.movedTo) } : {}),
        by: c.by,
        reason: c.reason,
        link,
      }),
    })),
  )
}

/**
 * Gives a freed slot to the first waiting group that can still book it (its section, the sheet still
 * issued and allowed, runs left, before the cut-off) and e-mails that group. Only groups whose rows
 * this transaction locked are considered; one that joined the list since waits for the next turn.
 */
export async function promote(
  tx: Executor,
  courseId: number,
  course: Course,
  slotId: number,
  locked: Set<number>,
  deps: BookingDeps,
  now: Date,
): Promise<void> {
  const slot = await findSlot(tx, courseId, slotId)
  if (!slot || (await activeBookingOf(tx, slotId))) return
  for (const w of await waitlistOf(tx, slotId)) {
    if (!locked.has(w.labGroupId)) continue
    const members = await groupMembers(tx, courseId, w.labGroupId)
    const g = await findGroup(tx, courseId, w.labGroupId)
    if (!g) continue
    const no = await bookingRefusal(tx, course, courseId, g, slot, w.moduleId, { boundByCutoff: true, now })
    if (no) continue
    const id = await insertBooking(tx, { slotId, labGroupId: w.labGroupId, moduleId: w.moduleId, bookedBy: w.addedBy })
    await deleteWait(tx, slotId, w.labGroupId)
    const b = (await findBooking(tx, courseId, id))!
    const link = `${pageLinks(deps.appUrl, course.slug).course}/stand-time`
    await enqueueMail(
      tx,
      members.map((m) => ({
        dedupeKey: `waitlist-booked:${id}`,
        toAddress: m.email,
        toName: m.displayName,
        ...waitlistBookedMail({
          name: m.displayName,
          courseCode: course.code,
          groupName: b.labGroupName,
          booking: {
            sheetTitle: b.moduleTitle,
            standName: b.standName,
            when: whenText(b.startsAt, b.minutes, course.timeZone),
          },
          link,
        }),
      })),
    )
    return
  }
}

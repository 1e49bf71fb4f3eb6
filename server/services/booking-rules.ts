import { formatInZone } from '../../shared/time'
import type { BookingView } from '../../shared/schemas/stands'
import type { Executor } from '../db/client'
import { AppError } from '../errors'
import type { BookingRow } from '../repositories/bookings'
import { activeBookingCount } from '../repositories/bookings'
import type { CourseEnrollment } from '../repositories/enrollments'
import type { SlotRow } from '../repositories/stands'
import { listSheets, standAllows } from '../repositories/stands'
import { fieldError, studentGroup } from './stand-service'

/**
 * The rules of booking stand time, shared by a group's own booking, a place on a waiting list, a
 * staff move and a hand-over from the waiting list: who may hold which slot for which sheet, and the
 * refusals each break of a rule answers with.
 */

export interface BookingDeps {
  appUrl: string
}

export interface Course {
  cutoffHours: number
  timeZone: string
  code: string
  slug: string
}

export const HOUR = 3_600_000

export function view(b: BookingRow): BookingView {
  return {
    id: b.id,
    slotId: b.slotId,
    status: b.status,
    labGroup: { id: b.labGroupId, name: b.labGroupName },
    module: { id: b.moduleId, title: b.moduleTitle },
    startsAt: b.startsAt.toISOString(),
    minutes: b.minutes,
    stand: { id: b.standId, name: b.standName, location: b.standLocation },
    sectionId: b.sectionId,
    reason: b.reason,
    endedAt: b.endedAt?.toISOString() ?? null,
    createdAt: b.createdAt.toISOString(),
  }
}

export const noGroup = () =>
  new AppError('no_lab_group', 'You are not in a lab group yet; ask your instructor to place you in one.', 409)

export const cutOff = (course: Course, startsAt: Date, what: string) =>
  new AppError(
    'booking_cut_off',
    `Groups ${what} until ${course.cutoffHours} hours before the slot starts (${formatInZone(startsAt, course.timeZone)}); ask your TA or instructor.`,
    409,
  )

/**
 * Why this group cannot hold this slot for this sheet right now, or null when it can. The same
 * rules decide a group's own booking, a place on the waiting list and a promotion from it.
 */
export async function bookingRefusal(
  db: Executor,
  course: Course,
  courseId: number,
  group: { id: number; sectionId: number | null },
  slot: SlotRow & { standName: string },
  moduleId: number,
  opts: { boundByCutoff: boolean; now: Date },
): Promise<AppError | null> {
  if (slot.cancelledAt)
    return new AppError('slot_cancelled', `This slot was cancelled (${slot.cancelReason ?? 'no reason given'}).`, 409)
  if (group.sectionId !== slot.sectionId)
    return new AppError(
      'wrong_section',
      'This slot belongs to another section; your group books its own section’s slots.',
      403,
    )
  if (slot.startsAt.getTime() <= opts.now.getTime())
    return new AppError('slot_in_past', 'This slot has already started; choose one still to come.', 409)
  if (opts.boundByCutoff && slot.startsAt.getTime() - course.cutoffHours * HOUR < opts.now.getTime())
    return cutOff(course, slot.startsAt, 'book')
  const [sheet] = await listSheets(db, courseId, [moduleId])
  if (!sheet) return fieldError('moduleId', 'moduleId: that is not a lab sheet of this course.')
  if (sheet.status !== 'published')
    return new AppError('not_published', `moduleId: “${sheet.title}” is not issued to the class.`, 409)
  if (sheet.standRuns < 1 || !(await standAllows(db, slot.standId, moduleId)))
    return new AppError('sheet_not_on_stand', `moduleId: “${sheet.title}” is not run on ${slot.standName}.`, 409)
  const used = await activeBookingCount(db, group.id, moduleId)
  if (used >= sheet.standRuns)
    return new AppError(
      'stand_runs_used',
      `Your group already holds ${used} of the ${sheet.standRuns} stand run${sheet.standRuns === 1 ? '' : 's'} “${sheet.title}” allows; cancel one to book another.`,
      409,
    )
  return null
}

export async function myGroup(db: Executor, e: CourseEnrollment) {
  const g = await studentGroup(db, e)
  if (!g) throw noGroup()
  return g
}

export const slotTaken = (ours: boolean) =>
  ours
    ? new AppError('slot_taken', 'Your group already holds this slot.', 409)
    : new AppError(
        'slot_taken',
        'Another group has just booked this slot. Choose another slot or join its waiting list.',
        409,
      )

export function isDuplicate(err: unknown): boolean {
  let x: unknown = err
  for (let i = 0; x && i < 5; i++) {
    if ((x as { code?: unknown }).code === 'ER_DUP_ENTRY') return true
    x = (x as { cause?: unknown }).cause
  }
  return false
}

export const notActive = (b: { status: string }) =>
  new AppError('booking_not_active', `This booking is already ${b.status}; nothing was changed.`, 409)

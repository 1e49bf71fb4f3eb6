import { and, asc, eq, gte, inArray, isNull, lt, or } from 'drizzle-orm'
import type { SQL } from 'drizzle-orm'
import { alias } from 'drizzle-orm/mysql-core'
import type { Executor } from '../db/client'
import {
  bookings,
  courses,
  enrollments,
  labGroups,
  moduleVersions,
  modules,
  sections,
  standSlots,
  stands,
  users,
} from '../db/schema'

/**
 * Stand sessions as calendars, the course home's week and the day-before reminders read them: slots
 * and the bookings on them. Read-only; each function is one query whatever the number of rows.
 * Cancelled slots and bookings that are no longer active are left out everywhere here.
 */

export interface GroupBooking {
  bookingId: number
  courseId: number
  labGroupId: number
  groupName: string
  slotId: number
  startsAt: Date
  minutes: number
  standName: string
  location: string
  sheetTitle: string
}

export interface SlotSession {
  slotId: number
  courseId: number
  sectionId: number
  sectionName: string
  startsAt: Date
  minutes: number
  standName: string
  location: string
  /** The active booking on the slot, if any. */
  bookingId: number | null
  labGroupId: number | null
  groupName: string | null
  sheetTitle: string | null
}

export interface TimeRange {
  from?: Date
  to?: Date
}

/** The sheet's title as the class reads it (its issued version), or its slug before it was ever issued. */
const issuedVersion = alias(moduleVersions, 'issued_version')

function inRange(range: TimeRange): SQL[] {
  return [
    ...(range.from ? [gte(standSlots.startsAt, range.from)] : []),
    ...(range.to ? [lt(standSlots.startsAt, range.to)] : []),
  ]
}

/** Active bookings on slots that are not cancelled, with their course, earliest first: one query. */
async function activeBookings(db: Executor, conditions: SQL[]): Promise<UpcomingBooking[]> {
  const rows = await db
    .select({
      bookingId: bookings.id,
      courseId: stands.courseId,
      labGroupId: bookings.labGroupId,
      groupName: labGroups.name,
      slotId: standSlots.id,
      startsAt: standSlots.startsAt,
      minutes: standSlots.minutes,
      standName: stands.name,
      location: stands.location,
      moduleSlug: modules.slug,
      title: issuedVersion.title,
      courseCode: courses.code,
      courseTitle: courses.title,
      courseSlug: courses.slug,
      timeZone: courses.timeZone,
    })
    .from(bookings)
    .innerJoin(standSlots, eq(standSlots.id, bookings.slotId))
    .innerJoin(stands, eq(stands.id, standSlots.standId))
    .innerJoin(courses, eq(courses.id, stands.courseId))
    .innerJoin(labGroups, eq(labGroups.id, bookings.labGroupId))
    .innerJoin(modules, eq(modules.id, bookings.moduleId))
    .leftJoin(issuedVersion, eq(issuedVersion.id, modules.publishedVersionId))
    .where(and(eq(bookings.status, 'active'), isNull(standSlots.cancelledAt), ...conditions))
    .orderBy(asc(standSlots.startsAt), asc(bookings.id))
  return rows.map(({ moduleSlug, title, courseSlug, ...r }) => ({
    ...r,
    courseSlug: courseSlug ?? '',
    sheetTitle: title ?? moduleSlug,
  }))
}

/** Active bookings of these lab groups on slots that are not cancelled, earliest first. */
export async function listGroupBookings(
  db: Executor,
  labGroupIds: number[],
  range: TimeRange = {},
): Promise<GroupBooking[]> {
  if (labGroupIds.length === 0) return []
  const rows = await activeBookings(db, [inArray(bookings.labGroupId, labGroupIds), ...inRange(range)])
  return rows.map((r) => ({
    bookingId: r.bookingId,
    courseId: r.courseId,
    labGroupId: r.labGroupId,
    groupName: r.groupName,
    slotId: r.slotId,
    startsAt: r.startsAt,
    minutes: r.minutes,
    standName: r.standName,
    location: r.location,
    sheetTitle: r.sheetTitle,
  }))
}

/** Which slots a caller looks at: a whole course (sectionId null) or one section of it. */
export interface SlotScope {
  courseId: number
  sectionId: number | null
}

/** Slots that are not cancelled in these courses or sections, each with its active booking if it has one. */
export async function listSlotSessions(
  db: Executor,
  scopes: SlotScope[],
  range: TimeRange = {},
): Promise<SlotSession[]> {
  if (scopes.length === 0) return []
  const scopeMatch = or(
    ...scopes.map((s) =>
      s.sectionId === null
        ? eq(stands.courseId, s.courseId)
        : and(eq(stands.courseId, s.courseId), eq(standSlots.sectionId, s.sectionId)),
    ),
  )
  const rows = await db
    .select({
      slotId: standSlots.id,
      courseId: stands.courseId,
      sectionId: standSlots.sectionId,
      sectionName: sections.name,
      startsAt: standSlots.startsAt,
      minutes: standSlots.minutes,
      standName: stands.name,
      location: stands.location,
      bookingId: bookings.id,
      labGroupId: bookings.labGroupId,
      groupName: labGroups.name,
      moduleSlug: modules.slug,
      title: issuedVersion.title,
    })
    .from(standSlots)
    .innerJoin(stands, eq(stands.id, standSlots.standId))
    .innerJoin(sections, eq(sections.id, standSlots.sectionId))
    // The generated active_slot_id holds the slot only while a booking is active: at most one row joins.
    .leftJoin(bookings, eq(bookings.activeSlotId, standSlots.id))
    .leftJoin(labGroups, eq(labGroups.id, bookings.labGroupId))
    .leftJoin(modules, eq(modules.id, bookings.moduleId))
    .leftJoin(issuedVersion, eq(issuedVersion.id, modules.publishedVersionId))
    .where(and(scopeMatch, isNull(standSlots.cancelledAt), ...inRange(range)))
    .orderBy(asc(standSlots.startsAt), asc(stands.name), asc(standSlots.id))
  return rows.map(({ moduleSlug, title, ...r }) => ({
    ...r,
    sheetTitle: r.bookingId === null ? null : (title ?? moduleSlug),
  }))
}

export interface UpcomingBooking extends GroupBooking {
  courseCode: string
  courseTitle: string
  courseSlug: string
  timeZone: string
}

/** Active bookings on slots starting in [from, to) of courses that are open, for the day-before reminders. */
export function listBookingsStartingBetween(db: Executor, from: Date, to: Date): Promise<UpcomingBooking[]> {
  return activeBookings(db, [isNull(courses.closedAt), gte(standSlots.startsAt, from), lt(standSlots.startsAt, to)])
}

export interface GroupMember {
  labGroupId: number
  userId: number
  email: string
  name: string
}

/** The students enrolled in these lab groups. */
export async function listGroupMembers(db: Executor, labGroupIds: number[]): Promise<GroupMember[]> {
  if (labGroupIds.length === 0) return []
  const rows = await db
    .select({
      labGroupId: enrollments.labGroupId,
      userId: users.id,
      email: users.email,
      name: users.displayName,
    })
    .from(enrollments)
    .innerJoin(users, eq(users.id, enrollments.userId))
    .where(and(inArray(enrollments.labGroupId, labGroupIds), eq(enrollments.role, 'student')))
    .orderBy(asc(users.id))
  return rows.flatMap((r) => (r.labGroupId === null ? [] : [{ ...r, labGroupId: r.labGroupId }]))
}

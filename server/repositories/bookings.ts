import { and, asc, count, eq, inArray, sql } from 'drizzle-orm'
import type { Executor } from '../db/client'
import {
  bookingWaitlist,
  bookings,
  enrollments,
  labGroups,
  moduleVersions,
  modules,
  standSlots,
  stands,
  users,
} from '../db/schema'

export interface GroupRow {
  id: number
  courseId: number
  name: string
  sectionId: number | null
}

export interface BookingRow {
  id: number
  slotId: number
  labGroupId: number
  labGroupName: string
  moduleId: number
  moduleTitle: string
  status: 'active' | 'cancelled' | 'moved'
  reason: string | null
  endedAt: Date | null
  createdAt: Date
  startsAt: Date
  minutes: number
  sectionId: number
  slotCancelledAt: Date | null
  standId: number
  standName: string
  standLocation: string
}

const groupCols = {
  id: labGroups.id,
  courseId: labGroups.courseId,
  name: labGroups.name,
  sectionId: labGroups.sectionId,
}

export async function findGroup(db: Executor, courseId: number, groupId: number): Promise<GroupRow | null> {
  const rows = await db
    .select(groupCols)
    .from(labGroups)
    .where(and(eq(labGroups.id, groupId), eq(labGroups.courseId, courseId)))
    .limit(1)
  return rows[0] ?? null
}

/**
 * Locks lab-group rows in id order. Every booking transaction takes its group locks first and its
 * slot locks after, each in id order, so two transactions never wait on each other in a circle;
 * the group lock is what keeps two members of one group from going past the sheet's stand runs.
 */
export async function lockGroups(db: Executor, groupIds: number[]): Promise<void> {
  const ids = [...new Set(groupIds)].sort((a, b) => a - b)
  for (const id of ids) await db.select({ id: labGroups.id }).from(labGroups).where(eq(labGroups.id, id)).for('update')
}

const bookingCols = {
  id: bookings.id,
  slotId: bookings.slotId,
  labGroupId: bookings.labGroupId,
  labGroupName: labGroups.name,
  moduleId: bookings.moduleId,
  moduleTitle: moduleVersions.title,
  status: bookings.status,
  reason: bookings.reason,
  endedAt: bookings.endedAt,
  createdAt: bookings.createdAt,
  startsAt: standSlots.startsAt,
  minutes: standSlots.minutes,
  sectionId: standSlots.sectionId,
  slotCancelledAt: standSlots.cancelledAt,
  standId: stands.id,
  standName: stands.name,
  standLocation: stands.location,
}

function bookingQuery(db: Executor) {
  return db
    .select(bookingCols)
    .from(bookings)
    .innerJoin(standSlots, eq(standSlots.id, bookings.slotId))
    .innerJoin(stands, eq(stands.id, standSlots.standId))
    .innerJoin(labGroups, eq(labGroups.id, bookings.labGroupId))
    .innerJoin(modules, eq(modules.id, bookings.moduleId))
    .innerJoin(
      moduleVersions,
      eq(moduleVersions.id, sql`COALESCE(${modules.publishedVersionId}, ${modules.currentVersionId})`),
    )
}

export async function findBooking(db: Executor, courseId: number, bookingId: number): Promise<BookingRow | null> {
  const rows = await bookingQuery(db)
    .where(and(eq(bookings.id, bookingId), eq(stands.courseId, courseId)))
    .limit(1)
  return rows[0] ?? null
}

/** The course's bookings, narrowed to one group or one section; newest slot last. */
export async function listBookings(
  db: Executor,
  courseId: number,
  by: { labGroupId?: number; sectionId?: number; slotIds?: number[]; activeOnly?: boolean },
): Promise<BookingRow[]> {
  if (by.slotIds && by.slotIds.length === 0) return []
  return bookingQuery(db)
    .where(
      and(
        eq(stands.courseId, courseId),
        by.labGroupId !== undefined ? eq(bookings.labGroupId, by.labGroupId) : undefined,
        by.sectionId !== undefined ? eq(standSlots.sectionId, by.sectionId) : undefined,
        by.slotIds ? inArray(bookings.slotId, by.slotIds) : undefined,
        by.activeOnly ? eq(bookings.status, 'active') : undefined,
      ),
    )
    .orderBy(asc(standSlots.startsAt), asc(bookings.id))
}

/** The slot's active booking id, if any. */
export async function activeBookingOf(
  db: Executor,
  slotId: number,
): Promise<{ id: number; labGroupId: number } | null> {
  const rows = await db
    .select({ id: bookings.id, labGroupId: bookings.labGroupId })
    .from(bookings)
    .where(eq(bookings.activeSlotId, slotId))
    .limit(1)
  return rows[0] ?? null
}

export async function activeBookingCount(db: Executor, labGroupId: number, moduleId: number): Promise<number> {
  const [row] = await db
    .select({ n: count() })
    .from(bookings)
    .where(and(eq(bookings.labGroupId, labGroupId), eq(bookings.moduleId, moduleId), eq(bookings.status, 'active')))
  return row?.n ?? 0
}

/** Active bookings per sheet of one group. */
export async function activeCountsByModule(db: Executor, labGroupId: number): Promise<Map<number, number>> {
  const rows = await db
    .select({ moduleId: bookings.moduleId, n: count() })
    .from(bookings)
    .where(and(eq(bookings.labGroupId, labGroupId), eq(bookings.status, 'active')))
    .groupBy(bookings.moduleId)
  return new Map(rows.map((r) => [r.moduleId, r.n]))
}

export async function insertBooking(
  db: Executor,
  v: { slotId: number; labGroupId: number; moduleId: number; bookedBy: number | null },
): Promise<number> {
  const [row] = await db.insert(bookings).values(v).$returningId()
  return row!.id
}

/** Ends an active booking (cancelled, or moved to `movedToId`); false when it was no longer active. */
export async function endBooking(
  db: Executor,
  bookingId: number,
  v: { status: 'cancelled' | 'moved'; endedBy: number; reason: string | null; movedToId?: number },
): Promise<boolean> {
  const [res] = await db
    .update(bookings)
    .set({
      status: v.status,
      endedBy: v.endedBy,
      endedAt: sql`CURRENT_TIMESTAMP(3)`,
      reason: v.reason,
      movedToId: v.movedToId ?? null,
    })
    .where(and(eq(bookings.id, bookingId), eq(bookings.status, 'active')))
  return ((res as { affectedRows?: number }).affectedRows ?? 0) === 1
}

export interface WaitRow {
  id: number
  slotId: number
  labGroupId: number
  moduleId: number
  addedBy: number | null
}

/** The slot's waiting list, first come first. */
export async function waitlistOf(db: Executor, slotId: number): Promise<WaitRow[]> {
  return db
    .select({
      id: bookingWaitlist.id,
      slotId: bookingWaitlist.slotId,
      labGroupId: bookingWaitlist.labGroupId,
      moduleId: bookingWaitlist.moduleId,
      addedBy: bookingWaitlist.addedBy,
    })
    .from(bookingWaitlist)
    .where(eq(bookingWaitlist.slotId, slotId))
    .orderBy(asc(bookingWaitlist.createdAt), asc(bookingWaitlist.id))
}

/** Waiting lists of many slots at once (for the slot list). */
export async function waitlistsOf(db: Executor, slotIds: number[]): Promise<Map<number, WaitRow[]>> {
  const out = new Map<number, WaitRow[]>()
  if (slotIds.length === 0) return out
  const rows = await db
    .select({
      id: bookingWaitlist.id,
      slotId: bookingWaitlist.slotId,
      labGroupId: bookingWaitlist.labGroupId,
      moduleId: bookingWaitlist.moduleId,
      addedBy: bookingWaitlist.addedBy,
    })
    .from(bookingWaitlist)
    .where(inArray(bookingWaitlist.slotId, slotIds))
    .orderBy(asc(bookingWaitlist.createdAt), asc(bookingWaitlist.id))
  for (const r of rows) out.set(r.slotId, [...(out.get(r.slotId) ?? []), r])
  return out
}

export async function insertWait(
  db: Executor,
  v: { slotId: number; labGroupId: number; moduleId: number; addedBy: number },
): Promise<void> {
  await db.insert(bookingWaitlist).values(v)
}

export async function deleteWait(db: Executor, slotId: number, labGroupId: number): Promise<boolean> {
  const [res] = await db
    .delete(bookingWaitlist)
    .where(and(eq(bookingWaitlist.slotId, slotId), eq(bookingWaitlist.labGroupId, labGroupId)))
  return ((res as { affectedRows?: number }).affectedRows ?? 0) > 0
}

export async function clearWaitlist(db: Executor, slotId: number): Promise<void> {
  await db.delete(bookingWaitlist).where(eq(bookingWaitlist.slotId, slotId))
}

/** The students of a lab group, to e-mail. */
export async function groupMembers(
  db: Executor,
  courseId: number,
  labGroupId: number,
): Promise<{ email: string; displayName: string }[]> {
  return db
    .select({ email: users.email, displayName: users.displayName })
    .from(enrollments)
    .innerJoin(users, eq(users.id, enrollments.userId))
    .where(
      and(eq(enrollments.courseId, courseId), eq(enrollments.labGroupId, labGroupId), eq(enrollments.role, 'student')),
    )
    .orderBy(asc(users.id))
}

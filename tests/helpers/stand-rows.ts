import { eq } from 'drizzle-orm'
import type { Database } from '../../server/db/client'
import { bookings, labGroups, standSlots, stands } from '../../server/db/schema'

/**
 * Stand rows written straight into the tables, for tests of what reads them (calendars, the week,
 * reminders) independently of the booking pages and services.
 */

export async function insertStand(db: Database, courseId: number, name: string, location = ''): Promise<number> {
  const [row] = await db.insert(stands).values({ courseId, name, location }).$returningId()
  return row!.id
}

export async function insertSlot(
  db: Database,
  v: { standId: number; sectionId: number; startsAt: Date; minutes?: number; cancelled?: boolean },
): Promise<number> {
  const [row] = await db
    .insert(standSlots)
    .values({
      standId: v.standId,
      sectionId: v.sectionId,
      startsAt: v.startsAt,
      minutes: v.minutes ?? 30,
      ...(v.cancelled ? { cancelledAt: new Date(), cancelReason: 'Test: stand closed.' } : {}),
    })
    .$returningId()
  return row!.id
}

export async function insertBooking(
  db: Database,
  v: { slotId: number; labGroupId: number; moduleId: number },
): Promise<number> {
  const [row] = await db.insert(bookings).values(v).$returningId()
  return row!.id
}

export async function cancelBooking(db: Database, bookingId: number): Promise<void> {
  await db.update(bookings).set({ status: 'cancelled', endedAt: new Date() }).where(eq(bookings.id, bookingId))
}

export async function insertLabGroup(db: Database, courseId: number, sectionId: number, name: string): Promise<number> {
  const [row] = await db.insert(labGroups).values({ courseId, sectionId, name }).$returningId()
  return row!.id
}

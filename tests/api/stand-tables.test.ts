import { eq, sql } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { bookings, labGroups, runEntries, runRecords, standSlots, stands } from '../../server/db/schema'
import type { Fixture, TestContext } from '../helpers/app'
import { seedFixture, signedInAs, startTestApp } from '../helpers/app'
import { createModuleAs, moduleSource } from '../helpers/modules'

// What the database itself guarantees for stand sessions, whatever the code above it does.

/** What MariaDB answers (through Drizzle's wrapper) when a trigger refuses a change to a run entry. */
const APPEND_ONLY = { cause: expect.objectContaining({ message: expect.stringMatching(/append-only/) }) }

let ctx: TestContext
let fx: Fixture
let slotId = 0
let moduleId = 0
let versionId = 0
const groups: number[] = []

beforeAll(async () => {
  ctx = startTestApp()
  fx = await seedFixture(ctx)
  const db = ctx.handle.db
  const instructor = await signedInAs(ctx, fx.instructor.email)
  const sheet = await createModuleAs(instructor, fx.courseId, moduleSource('Stand tables'))
  moduleId = sheet.id
  versionId = sheet.versionId
  for (const name of ['Group S1', 'Group S2']) {
    const [g] = await db
      .insert(labGroups)
      .values({ courseId: fx.courseId, sectionId: fx.sectionA, name })
      .$returningId()
    groups.push(g!.id)
  }
  const [stand] = await db.insert(stands).values({ courseId: fx.courseId, name: 'Stand T' }).$returningId()
  const [slot] = await db
    .insert(standSlots)
    .values({ standId: stand!.id, sectionId: fx.sectionA, startsAt: new Date('2027-03-02T19:00:00Z'), minutes: 30 })
    .$returningId()
  slotId = slot!.id
})

afterAll(async () => {
  await ctx.close()
})

describe('stand tables', () => {
  it('refuses a second active holder of a slot, and frees the slot when the holder cancels', async () => {
    const db = ctx.handle.db
    const [first] = await db.insert(bookings).values({ slotId, labGroupId: groups[0]!, moduleId }).$returningId()
    await expect(db.insert(bookings).values({ slotId, labGroupId: groups[1]!, moduleId })).rejects.toMatchObject({
      cause: expect.objectContaining({ code: 'ER_DUP_ENTRY' }),
    })
    await db.update(bookings).set({ status: 'cancelled' }).where(eq(bookings.id, first!.id))
    const [second] = await db.insert(bookings).values({ slotId, labGroupId: groups[1]!, moduleId }).$returningId()
    const rows = await db
      .select({ id: bookings.id, status: bookings.status, active: bookings.activeSlotId })
      .from(bookings)
      .where(eq(bookings.slotId, slotId))
    expect(rows).toEqual([
      { id: first!.id, status: 'cancelled', active: null },
      { id: second!.id, status: 'active', active: slotId },
    ])
  })

  it('keeps run entries append-only: an update or a delete is refused and the entry stays', async () => {
    const db = ctx.handle.db
    const [booking] = await db.select({ id: bookings.id }).from(bookings).where(eq(bookings.activeSlotId, slotId))
    const [run] = await db
      .insert(runRecords)
      .values({ courseId: fx.courseId, bookingId: booking!.id, moduleVersionId: versionId, checklist: [] })
      .$returningId()
    const [entry] = await db
      .insert(runEntries)
      .values({ runId: run!.id, kind: 'note', text: 'First words', byUserId: fx.ta.id })
      .$returningId()
    await expect(
      db.update(runEntries).set({ text: 'Changed words' }).where(eq(runEntries.id, entry!.id)),
    ).rejects.toMatchObject(APPEND_ONLY)
    await expect(db.delete(runEntries).where(eq(runEntries.id, entry!.id))).rejects.toMatchObject(APPEND_ONLY)
    await expect(db.execute(sql`DELETE FROM run_entries WHERE run_id = ${run!.id}`)).rejects.toMatchObject(APPEND_ONLY)
    const [kept] = await db.select({ text: runEntries.text }).from(runEntries).where(eq(runEntries.id, entry!.id))
    expect(kept).toEqual({ text: 'First words' })
  })
})

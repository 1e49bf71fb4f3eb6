import { and, eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { courses, enrollments, labGroups } from '../../server/db/schema'
import type { StandWeek } from '../../shared/schemas/stand-week'
import type { Fixture, TestContext } from '../helpers/app'
import { seedFixture, signedInAs, startTestApp } from '../helpers/app'
import { createModuleAs, moduleSource, publishAs } from '../helpers/modules'
import { cancelBooking, insertBooking, insertLabGroup, insertSlot, insertStand } from '../helpers/stand-rows'

// GET /api/courses/:courseId/week: one week of stand sessions in the course's zone, as the caller may see them.

let ctx: TestContext
let fx: Fixture
const slot = { a1: 0, a2: 0, a3: 0, a4: 0, aPrev: 0, aNext: 0, aCancelled: 0, b1: 0 }

beforeAll(async () => {
  ctx = startTestApp()
  fx = await seedFixture(ctx)
  const db = ctx.handle.db
  // Mountain Standard Time (UTC−7) all through the week of 1 March 2027.
  await db.update(courses).set({ timeZone: 'America/Denver' }).where(eq(courses.id, fx.courseId))
  const inst = await signedInAs(ctx, fx.instructor.email)
  const sheet = await createModuleAs(inst, fx.courseId, moduleSource('Week run'))
  await publishAs(inst, fx.courseId, sheet)
  const [g1] = await db
    .select({ id: labGroups.id })
    .from(labGroups)
    .where(and(eq(labGroups.courseId, fx.courseId), eq(labGroups.name, 'G1')))
  const g3 = await insertLabGroup(db, fx.courseId, fx.sectionA, 'G3')
  const g2 = await insertLabGroup(db, fx.courseId, fx.sectionB, 'G2')
  await db
    .update(enrollments)
    .set({ labGroupId: g2 })
    .where(and(eq(enrollments.userId, fx.student2.id), eq(enrollments.courseId, fx.courseId)))
  const standId = await insertStand(db, fx.courseId, 'Stand W', 'Bay 4')
  const A = (iso: string, cancelled = false) =>
    insertSlot(db, { standId, sectionId: fx.sectionA, startsAt: new Date(iso), cancelled })
  slot.aPrev = await A('2027-03-01T06:30:00Z') // Sunday 28 Feb, 23:30 local: the week before
  slot.a1 = await A('2027-03-01T07:00:00Z') // Monday 1 March, 00:00 local: the first moment of the week
  slot.a2 = await A('2027-03-02T20:00:00Z') // Tuesday 13:00
  slot.a3 = await A('2027-03-08T06:30:00Z') // Sunday 7 March, 23:30: the last slot of the week
  slot.aNext = await A('2027-03-08T07:00:00Z') // Monday 8 March, 00:00: the next week
  slot.aCancelled = await A('2027-03-02T20:30:00Z', true)
  slot.a4 = await A('2027-03-02T21:00:00Z')
  slot.b1 = await insertSlot(db, { standId, sectionId: fx.sectionB, startsAt: new Date('2027-03-04T16:00:00Z') })
  const book = (slotId: number, labGroupId: number) => insertBooking(db, { slotId, labGroupId, moduleId: sheet.id })
  await book(slot.a1, g1!.id)
  await book(slot.a2, g3)
  await cancelBooking(db, await book(slot.a4, g1!.id))
  await book(slot.b1, g2)
})

afterAll(async () => {
  await ctx.close()
})

async function weekAs(email: string, start = '2027-03-01'): Promise<StandWeek> {
  const c = await signedInAs(ctx, email)
  const res = await c.agent.get(`/api/courses/${fx.courseId}/week?start=${start}`).expect(200)
  return res.body as StandWeek
}

describe('the week at the stand', () => {
  it('runs from the start day’s midnight to the next week’s in the course’s zone', async () => {
    const week = await weekAs(fx.instructor.email)
    expect(week).toMatchObject({ start: '2027-03-01', next: '2027-03-08', previous: '2027-02-22' })
    expect(week.timeZone).toBe('America/Denver')
    expect(week.sessions.map((s) => s.slotId)).toEqual([slot.a1, slot.a2, slot.a4, slot.b1, slot.a3])
    const first = week.sessions[0]!
    expect(first).toMatchObject({
      startsAt: '2027-03-01T07:00:00.000Z',
      endsAt: '2027-03-01T07:30:00.000Z',
      standName: 'Stand W',
      location: 'Bay 4',
      sectionName: 'A',
    })
    const before = await weekAs(fx.instructor.email, '2027-02-22')
    expect(before.sessions.map((s) => s.slotId)).toContain(slot.aPrev)
    expect(before.sessions.map((s) => s.slotId)).not.toContain(slot.a1)
  })

  it('shows a student their section’s slots, which one their group holds, and no other group’s name', async () => {
    const week = await weekAs(fx.student.email)
    expect(week.sessions.map((s) => [s.slotId, s.booked, s.mine, s.groupName])).toEqual([
      [slot.a1, true, true, 'G1'],
      [slot.a2, true, false, null],
      [slot.a4, false, false, null],
      [slot.a3, false, false, null],
    ])
    expect(week.sessions[0]!.sheetTitle).toBe('Week run')
    expect(week.sessions[1]!.sheetTitle).toBeNull()
    const other = await weekAs(fx.student2.email)
    expect(other.sessions.map((s) => [s.slotId, s.mine, s.groupName])).toEqual([[slot.b1, true, 'G2']])
  })

  it('shows a TA their section’s slots with the booking groups’ names', async () => {
    const week = await weekAs(fx.ta.email)
    expect(week.sessions.map((s) => [s.slotId, s.groupName, s.mine])).toEqual([
      [slot.a1, 'G1', false],
      [slot.a2, 'G3', false],
      [slot.a4, null, false],
      [slot.a3, null, false],
    ])
  })

  it('without a start day, answers the week holding today', async () => {
    const c = await signedInAs(ctx, fx.ta.email)
    const week = (await c.agent.get(`/api/courses/${fx.courseId}/week`).expect(200)).body as StandWeek
    expect(new Date(`${week.start}T00:00:00Z`).getUTCDay()).toBe(1)
    const today = new Intl.DateTimeFormat('en-CA', { timeZone: 'America/Denver' }).format(new Date())
    expect(week.start <= today && today < week.next).toBe(true)
  })

  it('refuses a start that is not a day, naming the field', async () => {
    const c = await signedInAs(ctx, fx.student.email)
    for (const bad of ['2027-02-30', '2027-3-1', 'next-week', '1999-12-27']) {
      const res = await c.agent.get(`/api/courses/${fx.courseId}/week?start=${bad}`)
      expect(res.status, bad).toBe(400)
      expect(res.body.error.code).toBe('validation_failed')
      expect(res.body.error.details[0].path).toBe('start')
    }
    const extra = await c.agent.get(`/api/courses/${fx.courseId}/week?start=2027-03-01&section=2`)
    expect(extra.status).toBe(400)
  })
})

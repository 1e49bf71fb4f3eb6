import { count, eq, inArray } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { courses, standModules, standSlots, stands } from '../../server/db/schema'
import type { Client, Fixture, TestContext } from '../helpers/app'
import { seedFixture, signedInAs, startTestApp } from '../helpers/app'
import type { CreatedModule } from '../helpers/modules'
import { issuedStandSheet, utcSoon } from '../helpers/stands'

// Stands and their slots: the instructor lists stands and opens slots, one at a time or a weekly
// pattern for a term; bad input is refused with the field named and nothing stored.

let ctx: TestContext
let fx: Fixture
let inst: Client
let ta: Client
let student: Client
let sheet: CreatedModule
let plainSheet: CreatedModule
let standId = 0

const C = () => `/api/courses/${fx.courseId}`

async function slotCount(): Promise<number> {
  const [row] = await ctx.handle.db.select({ n: count() }).from(standSlots).where(eq(standSlots.standId, standId))
  return row!.n
}

beforeAll(async () => {
  ctx = startTestApp()
  fx = await seedFixture(ctx)
  inst = await signedInAs(ctx, fx.instructor.email)
  ta = await signedInAs(ctx, fx.ta.email)
  student = await signedInAs(ctx, fx.student.email)
  sheet = await issuedStandSheet(inst, fx.courseId, 'Stand runs', 2)
  plainSheet = await issuedStandSheet(inst, fx.courseId, 'Desk work', 0)
})

afterAll(async () => {
  await ctx.close()
})

describe('stands', () => {
  it('the instructor adds a stand with its allowed sheets, and staff read it back', async () => {
    const res = await inst.agent
      .post(`${C()}/stands`)
      .set('x-csrf-token', inst.csrf)
      .send({ name: 'Bay 1 stand', location: 'Bay 1', maxPressureNote: '10 bar receiver', moduleIds: [sheet.id] })
      .expect(201)
    standId = res.body.id
    expect(res.body).toMatchObject({
      name: 'Bay 1 stand',
      location: 'Bay 1',
      maxPressureNote: '10 bar receiver',
      modules: [{ id: sheet.id, title: 'Stand runs' }],
    })
    const list = await ta.agent.get(`${C()}/stands`).expect(200)
    expect(list.body.stands.map((s: { name: string }) => s.name)).toEqual(['Bay 1 stand'])
    expect(list.body.standSheets).toEqual([{ id: sheet.id, title: 'Stand runs', standRuns: 2 }])
    expect(list.body.sections).toEqual([{ id: fx.sectionA, name: 'A' }])
    expect(list.body.cutoffHours).toBe(24)
  })

  it('refuses a second stand of the same name, and a sheet that is not run on a stand, storing nothing', async () => {
    const dup = await inst.agent.post(`${C()}/stands`).set('x-csrf-token', inst.csrf).send({ name: 'Bay 1 stand' })
    expect(dup.status).toBe(409)
    expect(dup.body.error.code).toBe('stand_exists')
    const bad = await inst.agent
      .post(`${C()}/stands`)
      .set('x-csrf-token', inst.csrf)
      .send({ name: 'Bay 2 stand', moduleIds: [plainSheet.id] })
    expect(bad.status).toBe(400)
    expect(bad.body.error.message).toContain('moduleIds')
    expect(bad.body.error.message).toContain('Desk work')
    const blank = await inst.agent.post(`${C()}/stands`).set('x-csrf-token', inst.csrf).send({ name: '  ' })
    expect(blank.status).toBe(400)
    expect(blank.body.error.message).toContain('name')
    const rows = await ctx.handle.db.select({ name: stands.name }).from(stands).where(eq(stands.courseId, fx.courseId))
    expect(rows.map((r) => r.name)).toEqual(['Bay 1 stand'])
  })

  it('changes a stand and replaces its allowed sheets', async () => {
    const res = await inst.agent
      .patch(`${C()}/stands/${standId}`)
      .set('x-csrf-token', inst.csrf)
      .send({ location: 'Bay 1, north wall', moduleIds: [] })
      .expect(200)
    expect(res.body).toMatchObject({ location: 'Bay 1, north wall', modules: [] })
    await inst.agent
      .patch(`${C()}/stands/${standId}`)
      .set('x-csrf-token', inst.csrf)
      .send({ moduleIds: [sheet.id] })
      .expect(200)
    const allowed = await ctx.handle.db.select().from(standModules).where(eq(standModules.standId, standId))
    expect(allowed).toEqual([{ standId, moduleId: sheet.id }])
    const other = await inst.agent.patch(`${C()}/stands/999999999`).set('x-csrf-token', inst.csrf).send({ name: 'X' })
    expect(other.status).toBe(404)
  })
})

describe('slots', () => {
  it('opens one slot and reads it in the slot list', async () => {
    const res = await inst.agent
      .post(`${C()}/stands/${standId}/slots`)
      .set('x-csrf-token', inst.csrf)
      .send({ kind: 'one', sectionId: fx.sectionA, date: '2030-03-04', start: '09:00', minutes: 45 })
      .expect(201)
    expect(res.body.created).toBe(1)
    expect(res.body.slots[0]).toMatchObject({ startsAt: '2030-03-04T09:00:00.000Z', minutes: 45 })
    const list = await student.agent.get(`${C()}/slots?from=2030-03-04&to=2030-03-04`).expect(200)
    expect(list.body.slots).toHaveLength(1)
    expect(list.body.slots[0]).toMatchObject({ state: 'free', minutes: 45, stand: { name: 'Bay 1 stand' } })
  })

  it('opens a term of Tuesdays 13:00–16:00 in 30-minute slots, skipping the holiday', async () => {
    const before = await slotCount()
    const res = await inst.agent
      .post(`${C()}/stands/${standId}/slots`)
      .set('x-csrf-token', inst.csrf)
      .send({
        kind: 'pattern',
        sectionId: fx.sectionA,
        weekday: 2,
        from: '2030-03-05',
        to: '2030-03-26',
        start: '13:00',
        end: '16:00',
        slotMinutes: 30,
        except: ['2030-03-19'],
      })
      .expect(201)
    // Four Tuesdays (5, 12, 19, 26 March 2030) less the holiday, six slots each.
    expect(res.body.created).toBe(18)
    const starts = (res.body.slots as { startsAt: string }[]).map((s) => s.startsAt)
    expect(starts[0]).toBe('2030-03-05T13:00:00.000Z')
    expect(starts[5]).toBe('2030-03-05T15:30:00.000Z')
    expect(starts.some((s) => s.startsWith('2030-03-19'))).toBe(false)
    expect(starts.at(-1)).toBe('2030-03-26T15:30:00.000Z')
    expect(await slotCount()).toBe(before + 18)
  })

  it('refuses a pattern that overlaps one existing slot, naming the clashing slot, and opens none of it', async () => {
    const before = await slotCount()
    const res = await inst.agent
      .post(`${C()}/stands/${standId}/slots`)
      .set('x-csrf-token', inst.csrf)
      .send({
        kind: 'pattern',
        sectionId: fx.sectionB,
        weekday: 2,
        from: '2030-04-02',
        to: '2030-04-30',
        start: '09:00',
        end: '12:00',
        slotMinutes: 60,
      })
      .expect(201)
    expect(res.body.created).toBe(15)
    const clash = await inst.agent.post(`${C()}/stands/${standId}/slots`).set('x-csrf-token', inst.csrf).send({
      kind: 'pattern',
      sectionId: fx.sectionB,
      weekday: 2,
      from: '2030-05-07',
      to: '2030-05-28',
      start: '09:00',
      end: '10:00',
      slotMinutes: 60,
    })
    // No clash yet: this one is fine and proves the next refusal is about the overlap only.
    expect(clash.status).toBe(201)
    const overlapping = await inst.agent.post(`${C()}/stands/${standId}/slots`).set('x-csrf-token', inst.csrf).send({
      kind: 'pattern',
      sectionId: fx.sectionB,
      weekday: 2,
      from: '2030-04-16',
      to: '2030-06-25',
      start: '11:45',
      end: '12:45',
      slotMinutes: 60,
    })
    expect(overlapping.status).toBe(409)
    expect(overlapping.body.error.code).toBe('slot_overlap')
    expect(overlapping.body.error.message).toMatch(/overlaps slot \d+/)
    expect(overlapping.body.error.message).toContain('nothing was opened')
    expect(await slotCount()).toBe(before + 15 + 4)
  })

  it('refuses a single slot that overlaps another by a few minutes', async () => {
    const before = await slotCount()
    const res = await inst.agent
      .post(`${C()}/stands/${standId}/slots`)
      .set('x-csrf-token', inst.csrf)
      .send({ kind: 'one', sectionId: fx.sectionA, date: '2030-03-04', start: '09:40', minutes: 30 })
    expect(res.status).toBe(409)
    expect(res.body.error.code).toBe('slot_overlap')
    expect(await slotCount()).toBe(before)
  })

  it('refuses a past date, a zero or negative length, a bad time and a pattern with no days, naming the field', async () => {
    const before = await slotCount()
    const cases: [Record<string, unknown>, string][] = [
      [{ kind: 'one', sectionId: fx.sectionA, date: '2020-01-07', start: '09:00', minutes: 30 }, 'date'],
      [{ kind: 'one', sectionId: fx.sectionA, date: '2030-08-06', start: '09:00', minutes: 0 }, 'minutes'],
      [{ kind: 'one', sectionId: fx.sectionA, date: '2030-08-06', start: '09:00', minutes: -30 }, 'minutes'],
      [{ kind: 'one', sectionId: fx.sectionA, date: '2030-02-30', start: '09:00', minutes: 30 }, 'date'],
      [{ kind: 'one', sectionId: fx.sectionA, date: '2030-08-06', start: '25:00', minutes: 30 }, 'start'],
      [
        {
          kind: 'pattern',
          sectionId: fx.sectionA,
          weekday: 2,
          from: '2030-08-06',
          to: '2030-08-27',
          start: '13:00',
          end: '16:00',
          slotMinutes: 0,
        },
        'slotMinutes',
      ],
      [
        {
          kind: 'pattern',
          sectionId: fx.sectionA,
          weekday: 2,
          from: '2030-08-06',
          to: '2030-08-27',
          start: '13:00',
          end: '12:00',
          slotMinutes: 30,
        },
        'end',
      ],
      [
        {
          kind: 'pattern',
          sectionId: fx.sectionA,
          weekday: 2,
          from: '2030-08-06',
          to: '2030-08-27',
          start: '13:00',
          end: '14:00',
          slotMinutes: 30,
          except: ['2030-08-07'],
        },
        'except',
      ],
      [
        {
          kind: 'pattern',
          sectionId: fx.sectionA,
          weekday: 2,
          from: '2025-01-07',
          to: '2025-02-25',
          start: '13:00',
          end: '14:00',
          slotMinutes: 30,
        },
        'from',
      ],
      [{ kind: 'one', sectionId: fx.sectionA, date: utcSoon(-3).date, start: utcSoon(-3).start, minutes: 30 }, 'date'],
    ]
    for (const [body, field] of cases) {
      const res = await inst.agent.post(`${C()}/stands/${standId}/slots`).set('x-csrf-token', inst.csrf).send(body)
      expect(res.status, JSON.stringify(body)).toBe(400)
      expect(res.body.error.message, JSON.stringify(body)).toContain(field)
    }
    expect(await slotCount()).toBe(before)
  })

  it('a TA opens slots for their own section only; another course’s section is refused', async () => {
    const own = await ta.agent
      .post(`${C()}/stands/${standId}/slots`)
      .set('x-csrf-token', ta.csrf)
      .send({ kind: 'one', sectionId: fx.sectionA, date: '2030-09-03', start: '09:00', minutes: 30 })
    expect(own.status).toBe(201)
    const before = await slotCount()
    const other = await ta.agent
      .post(`${C()}/stands/${standId}/slots`)
      .set('x-csrf-token', ta.csrf)
      .send({ kind: 'one', sectionId: fx.sectionB, date: '2030-09-03', start: '10:00', minutes: 30 })
    expect(other.status).toBe(403)
    expect(other.body.error.code).toBe('wrong_section')
    const foreign = await inst.agent
      .post(`${C()}/stands/${standId}/slots`)
      .set('x-csrf-token', inst.csrf)
      .send({ kind: 'one', sectionId: 999999999, date: '2030-09-03', start: '10:00', minutes: 30 })
    expect(foreign.status).toBe(400)
    expect(foreign.body.error.message).toContain('sectionId')
    expect(await slotCount()).toBe(before)
  })

  it('shows students their own section’s slots only, and TAs theirs', async () => {
    const mine = await student.agent.get(`${C()}/slots?from=2030-03-01&to=2030-12-31`).expect(200)
    const sectionsSeen = new Set(mine.body.slots.map((s: { section: { id: number } }) => s.section.id))
    expect([...sectionsSeen]).toEqual([fx.sectionA])
    const all = await inst.agent.get(`${C()}/slots?from=2030-03-01&to=2030-12-31`).expect(200)
    expect(new Set(all.body.slots.map((s: { section: { id: number } }) => s.section.id))).toEqual(
      new Set([fx.sectionA, fx.sectionB]),
    )
    const taView = await ta.agent.get(`${C()}/slots?from=2030-03-01&to=2030-12-31`).expect(200)
    expect(taView.body.slots).toHaveLength(mine.body.slots.length)
    const bad = await student.agent.get(`${C()}/slots?from=2030-03-10&to=2030-03-01`)
    expect(bad.status).toBe(400)
    expect(bad.body.error.message).toContain('to')
  })

  it('cancels a slot with a reason; a second cancel and a missing reason are refused', async () => {
    const [slot] = await ctx.handle.db
      .select({ id: standSlots.id })
      .from(standSlots)
      .where(inArray(standSlots.startsAt, [new Date('2030-09-03T09:00:00Z')]))
    const noReason = await ta.agent.delete(`${C()}/slots/${slot!.id}`).set('x-csrf-token', ta.csrf).send({})
    expect(noReason.status).toBe(400)
    expect(noReason.body.error.message).toContain('reason')
    await ta.agent
      .delete(`${C()}/slots/${slot!.id}`)
      .set('x-csrf-token', ta.csrf)
      .send({ reason: 'Compressor service' })
      .expect(200)
    const again = await ta.agent
      .delete(`${C()}/slots/${slot!.id}`)
      .set('x-csrf-token', ta.csrf)
      .send({ reason: 'Compressor service' })
    expect(again.status).toBe(409)
    expect(again.body.error.code).toBe('slot_cancelled')
    const [row] = await ctx.handle.db
      .select({ reason: standSlots.cancelReason })
      .from(standSlots)
      .where(eq(standSlots.id, slot!.id))
    expect(row!.reason).toBe('Compressor service')
  })

  it('keeps a pattern at the same wall-clock time across a daylight-saving change in the course’s zone', async () => {
    await ctx.handle.db.update(courses).set({ timeZone: 'America/Denver' }).where(eq(courses.id, fx.courseId))
    try {
      // Denver moves from UTC−7 to UTC−6 on Sunday 10 March 2030.
      const res = await inst.agent
        .post(`${C()}/stands/${standId}/slots`)
        .set('x-csrf-token', inst.csrf)
        .send({
          kind: 'pattern',
          sectionId: fx.sectionA,
          weekday: 5,
          from: '2030-03-08',
          to: '2030-03-15',
          start: '13:00',
          end: '14:00',
          slotMinutes: 60,
        })
        .expect(201)
      expect(res.body.slots.map((s: { startsAt: string }) => s.startsAt)).toEqual([
        '2030-03-08T20:00:00.000Z',
        '2030-03-15T19:00:00.000Z',
      ])
    } finally {
      await ctx.handle.db.update(courses).set({ timeZone: 'UTC' }).where(eq(courses.id, fx.courseId))
    }
  })

  it('the instructor sets the booking cut-off; a negative one is refused', async () => {
    await inst.agent
      .patch(`${C()}/booking-settings`)
      .set('x-csrf-token', inst.csrf)
      .send({ cutoffHours: 48 })
      .expect(200, { cutoffHours: 48 })
    const bad = await inst.agent
      .patch(`${C()}/booking-settings`)
      .set('x-csrf-token', inst.csrf)
      .send({ cutoffHours: -1 })
    expect(bad.status).toBe(400)
    expect(bad.body.error.message).toContain('cutoffHours')
    const [row] = await ctx.handle.db
      .select({ h: courses.bookingCutoffHours })
      .from(courses)
      .where(eq(courses.id, fx.courseId))
    expect(row!.h).toBe(48)
  })
})

import { and, count, eq, inArray, like } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { bookingWaitlist, bookings, mailOutbox, standSlots } from '../../server/db/schema'
import type { Client, Fixture, TestContext } from '../helpers/app'
import { seedFixture, signedInAs, startTestApp } from '../helpers/app'
import type { CreatedModule } from '../helpers/modules'
import { groupWithStudents, issuedStandSheet, utcSoon } from '../helpers/stands'

// Booking stand time: a group books a slot of its own section for a run of a sheet the stand allows,
// within the sheet's stand runs and before the cut-off; waiting lists; staff move and cancel with a
// reason e-mailed through the outbox; and the races the database must settle.

let ctx: TestContext
let fx: Fixture
let inst: Client
let ta: Client
let sheet: CreatedModule
let oneRun: CreatedModule
let offStand: CreatedModule
let standId = 0
let otherStandId = 0
const C = () => `/api/courses/${fx.courseId}`

/** Opens one slot and returns its id. */
async function slot(
  date: string,
  start: string,
  opts: { sectionId?: number; minutes?: number; stand?: number } = {},
): Promise<number> {
  const res = await inst.agent
    .post(`${C()}/stands/${opts.stand ?? standId}/slots`)
    .set('x-csrf-token', inst.csrf)
    .send({ kind: 'one', sectionId: opts.sectionId ?? fx.sectionA, date, start, minutes: opts.minutes ?? 30 })
  if (res.status !== 201) throw new Error(`slot failed: ${res.status} ${JSON.stringify(res.body)}`)
  return res.body.slots[0].id
}

async function book(c: Client, slotId: number, moduleId = sheet.id) {
  return c.agent.post(`${C()}/slots/${slotId}/bookings`).set('x-csrf-token', c.csrf).send({ moduleId })
}

/** Every booking and waiting-list row of the course's slots, to compare before and after a refusal. */
async function storedRows() {
  const db = ctx.handle.db
  const slotIds = (
    await db
      .select({ id: standSlots.id })
      .from(standSlots)
      .where(inArray(standSlots.standId, [standId, otherStandId]))
  ).map((r) => r.id)
  return {
    bookings: await db.select().from(bookings).where(inArray(bookings.slotId, slotIds)),
    waits: await db.select().from(bookingWaitlist).where(inArray(bookingWaitlist.slotId, slotIds)),
  }
}

async function mailsWith(prefix: string) {
  return ctx.handle.db
    .select({ to: mailOutbox.toAddress, subject: mailOutbox.subject, text: mailOutbox.textBody })
    .from(mailOutbox)
    .where(like(mailOutbox.dedupeKey, `${prefix}%`))
}

beforeAll(async () => {
  ctx = startTestApp()
  fx = await seedFixture(ctx)
  inst = await signedInAs(ctx, fx.instructor.email)
  ta = await signedInAs(ctx, fx.ta.email)
  sheet = await issuedStandSheet(inst, fx.courseId, 'Cold-flow stand runs', 2)
  oneRun = await issuedStandSheet(inst, fx.courseId, 'Hot-fire stand run', 1)
  offStand = await issuedStandSheet(inst, fx.courseId, 'Schlieren bench', 1)
  const s = await inst.agent
    .post(`${C()}/stands`)
    .set('x-csrf-token', inst.csrf)
    .send({ name: 'Stand North', location: 'Bay 3', moduleIds: [sheet.id, oneRun.id] })
    .expect(201)
  standId = s.body.id
  const o = await inst.agent
    .post(`${C()}/stands`)
    .set('x-csrf-token', inst.csrf)
    .send({ name: 'Stand South', moduleIds: [sheet.id, oneRun.id] })
    .expect(201)
  otherStandId = o.body.id
})

afterAll(async () => {
  await ctx.close()
})

describe('booking a slot', () => {
  it('a student books a free slot of their section for their group, and sees it as theirs', async () => {
    const g = await groupWithStudents(ctx, fx.courseId, fx.sectionA, 2)
    const id = await slot('2030-10-01', '09:00')
    const res = await book(g.students[0]!.client, id)
    expect(res.status).toBe(201)
    expect(res.body).toMatchObject({
      slotId: id,
      status: 'active',
      labGroup: { id: g.groupId },
      module: { id: sheet.id, title: 'Cold-flow stand runs' },
      stand: { name: 'Stand North' },
    })
    const partner = await g.students[1]!.client.agent.get(`${C()}/slots?from=2030-10-01&to=2030-10-01`).expect(200)
    expect(partner.body.slots.find((s: { id: number }) => s.id === id)).toMatchObject({ state: 'mine' })
    const other = await signedInAs(ctx, fx.student.email)
    const seen = await other.agent.get(`${C()}/slots?from=2030-10-01&to=2030-10-01`).expect(200)
    expect(seen.body.slots.find((s: { id: number }) => s.id === id)).toMatchObject({ state: 'taken', booking: null })
    const mine = await g.students[1]!.client.agent.get(`${C()}/bookings`).expect(200)
    expect(mine.body.bookings.map((b: { slotId: number }) => b.slotId)).toEqual([id])
    const theirs = await other.agent.get(`${C()}/bookings`).expect(200)
    expect(theirs.body.bookings).toEqual([])
  })

  it('refuses bad bookings with a clear message and leaves stored data unchanged', async () => {
    const g = await groupWithStudents(ctx, fx.courseId, fx.sectionA)
    const st = g.students[0]!.client
    const a = await slot('2030-10-08', '09:00')
    const b = await slot('2030-10-08', '10:00')
    const taken = await slot('2030-10-08', '11:00')
    const other = await slot('2030-10-08', '12:00', { sectionId: fx.sectionB })
    const soon = utcSoon(3)
    const near = await slot(soon.date, soon.start, { stand: otherStandId })
    const cancelled = await slot('2030-10-08', '13:00')
    await inst.agent
      .delete(`${C()}/slots/${cancelled}`)
      .set('x-csrf-token', inst.csrf)
      .send({ reason: 'Stand under repair' })
      .expect(200)
    const holder = await groupWithStudents(ctx, fx.courseId, fx.sectionA)
    expect((await book(holder.students[0]!.client, taken)).status).toBe(201)
    expect((await book(st, a, oneRun.id)).status).toBe(201)

    const before = await storedRows()
    const cases: [
      () => Promise<{ status: number; body: { error: { code: string; message: string } } }>,
      number,
      string,
      RegExp,
    ][] = [
      [() => book(st, b, oneRun.id), 409, 'stand_runs_used', /1 of the 1 stand run/],
      [() => book(st, near), 409, 'booking_cut_off', /24 hours before/],
      [() => book(st, other), 403, 'wrong_section', /another section/],
      [() => book(st, b, offStand.id), 409, 'sheet_not_on_stand', /Schlieren bench.*Stand North/],
      [() => book(st, cancelled), 409, 'slot_cancelled', /Stand under repair/],
      [() => book(st, taken), 409, 'slot_taken', /Another group/],
      [() => book(st, 999999999), 404, 'not_found', /slot/],
      [
        () => st.agent.post(`${C()}/slots/${b}/bookings`).set('x-csrf-token', st.csrf).send({ moduleId: 'x' }),
        400,
        'validation_failed',
        /moduleId/,
      ],
    ]
    for (const [call, status, code, message] of cases) {
      const res = await call()
      expect(res.status, code).toBe(status)
      expect(res.body.error.code).toBe(code)
      expect(res.body.error.message).toMatch(message)
    }
    expect(await storedRows()).toEqual(before)
    // Staff do not book for a group.
    expect((await book(ta, b)).status).toBe(403)
    expect(await storedRows()).toEqual(before)
  })

  it('a student without a lab group is told so', async () => {
    const loner = await signedInAs(ctx, fx.student2.email)
    const id = await slot('2030-10-09', '09:00', { sectionId: fx.sectionB })
    const res = await book(loner, id)
    expect(res.status).toBe(409)
    expect(res.body.error.code).toBe('no_lab_group')
  })
})

describe('cancelling, waiting lists, moving', () => {
  it('a group cancels its own booking before the cut-off and the first waiting group that can book gets it, by e-mail', async () => {
    const holder = await groupWithStudents(ctx, fx.courseId, fx.sectionA)
    const usedUp = await groupWithStudents(ctx, fx.courseId, fx.sectionA)
    const waiter = await groupWithStudents(ctx, fx.courseId, fx.sectionA, 2)
    const id = await slot('2030-10-15', '09:00')
    const elsewhere = await slot('2030-10-15', '10:00')
    const res = await book(holder.students[0]!.client, id, oneRun.id)
    expect(res.status).toBe(201)
    // First in line, but by the time the slot frees it has used its one run elsewhere.
    const w1 = usedUp.students[0]!.client
    await w1.agent
      .post(`${C()}/slots/${id}/waitlist`)
      .set('x-csrf-token', w1.csrf)
      .send({ moduleId: oneRun.id })
      .expect(201)
    const w2 = waiter.students[0]!.client
    const joined = await w2.agent
      .post(`${C()}/slots/${id}/waitlist`)
      .set('x-csrf-token', w2.csrf)
      .send({ moduleId: oneRun.id })
      .expect(201)
    expect(joined.body).toEqual({ place: 2 })
    const again = await w2.agent
      .post(`${C()}/slots/${id}/waitlist`)
      .set('x-csrf-token', w2.csrf)
      .send({ moduleId: oneRun.id })
    expect(again.status).toBe(409)
    expect(again.body.error.code).toBe('already_waiting')
    const free = await w2.agent
      .post(`${C()}/slots/${elsewhere}/waitlist`)
      .set('x-csrf-token', w2.csrf)
      .send({ moduleId: oneRun.id })
    expect(free.status).toBe(409)
    expect(free.body.error.code).toBe('slot_free')
    expect((await book(w1, elsewhere, oneRun.id)).status).toBe(201)

    const h = holder.students[0]!.client
    const cancelled = await h.agent.post(`${C()}/bookings/${res.body.id}/cancel`).set('x-csrf-token', h.csrf).send({})
    expect(cancelled.status).toBe(200)
    expect(cancelled.body.status).toBe('cancelled')

    const active = await ctx.handle.db
      .select({ group: bookings.labGroupId })
      .from(bookings)
      .where(eq(bookings.activeSlotId, id))
    expect(active).toEqual([{ group: waiter.groupId }])
    const waits = await ctx.handle.db
      .select({ g: bookingWaitlist.labGroupId })
      .from(bookingWaitlist)
      .where(eq(bookingWaitlist.slotId, id))
    expect(waits).toEqual([{ g: usedUp.groupId }])
    const mails = await mailsWith('waitlist-booked:')
    const toWaiter = mails.filter((m) => waiter.students.some((s) => s.email === m.to))
    expect(toWaiter).toHaveLength(2)
    expect(toWaiter[0]!.text).toContain('Hot-fire stand run')
    expect(mails.some((m) => usedUp.students.some((s) => s.email === m.to))).toBe(false)
    // Nobody from the cancelling group gets a staff-reason mail: they cancelled it themselves.
    expect((await mailsWith(`booking-cancelled:${res.body.id}`)).length).toBe(0)
  })

  it('a group may not cancel after the cut-off; staff may, and must give a reason that is e-mailed', async () => {
    const g = await groupWithStudents(ctx, fx.courseId, fx.sectionA, 2)
    const soon = utcSoon(5)
    const id = await slot(soon.date, soon.start)
    // The group's own booking, made before the cut-off came (stored directly: the API refuses it now).
    const [row] = await ctx.handle.db
      .insert(bookings)
      .values({ slotId: id, labGroupId: g.groupId, moduleId: sheet.id, bookedBy: g.students[0]!.id })
      .$returningId()
    const st = g.students[0]!.client
    const late = await st.agent.post(`${C()}/bookings/${row!.id}/cancel`).set('x-csrf-token', st.csrf).send({})
    expect(late.status).toBe(409)
    expect(late.body.error.code).toBe('booking_cut_off')
    const noReason = await ta.agent.post(`${C()}/bookings/${row!.id}/cancel`).set('x-csrf-token', ta.csrf).send({})
    expect(noReason.status).toBe(400)
    expect(noReason.body.error.message).toContain('reason')
    const [still] = await ctx.handle.db.select({ s: bookings.status }).from(bookings).where(eq(bookings.id, row!.id))
    expect(still!.s).toBe('active')
    const ok = await ta.agent
      .post(`${C()}/bookings/${row!.id}/cancel`)
      .set('x-csrf-token', ta.csrf)
      .send({ reason: 'The receiver failed its inspection' })
    expect(ok.status).toBe(200)
    expect(ok.body).toMatchObject({ status: 'cancelled', reason: 'The receiver failed its inspection' })
    const mails = await mailsWith(`booking-cancelled:${row!.id}`)
    expect(mails.map((m) => m.to).sort()).toEqual(g.students.map((s) => s.email).sort())
    expect(mails[0]!.text).toContain('The receiver failed its inspection')
    const twice = await ta.agent
      .post(`${C()}/bookings/${row!.id}/cancel`)
      .set('x-csrf-token', ta.csrf)
      .send({ reason: 'Again' })
    expect(twice.status).toBe(409)
    expect(twice.body.error.code).toBe('booking_not_active')
  })

  it('staff move a booking to another slot with a reason; the group is e-mailed and the old slot is free', async () => {
    const g = await groupWithStudents(ctx, fx.courseId, fx.sectionA)
    const from = await slot('2030-10-22', '09:00')
    const to = await slot('2030-10-22', '10:00', { stand: otherStandId })
    const busy = await slot('2030-10-22', '11:00')
    const other = await slot('2030-10-22', '12:00', { sectionId: fx.sectionB })
    const st = g.students[0]!.client
    const b = (await book(st, from)).body
    const holder = await groupWithStudents(ctx, fx.courseId, fx.sectionA)
    expect((await book(holder.students[0]!.client, busy)).status).toBe(201)

    const before = await storedRows()
    const refused: [Record<string, unknown>, number, string][] = [
      [{ slotId: busy, reason: 'Bay closed' }, 409, 'slot_taken'],
      [{ slotId: other, reason: 'Bay closed' }, 403, 'wrong_section'],
      [{ slotId: to }, 400, 'validation_failed'],
      [{ slotId: 999999999, reason: 'Bay closed' }, 400, 'validation_failed'],
    ]
    for (const [body, status, code] of refused) {
      const res = await inst.agent.post(`${C()}/bookings/${b.id}/move`).set('x-csrf-token', inst.csrf).send(body)
      expect(res.status, JSON.stringify(body)).toBe(status)
      expect(res.body.error.code).toBe(code)
    }
    // The student may not move a booking at all.
    const own = await st.agent
      .post(`${C()}/bookings/${b.id}/move`)
      .set('x-csrf-token', st.csrf)
      .send({ slotId: to, reason: 'x y z' })
    expect(own.status).toBe(403)
    expect(await storedRows()).toEqual(before)

    const moved = await ta.agent
      .post(`${C()}/bookings/${b.id}/move`)
      .set('x-csrf-token', ta.csrf)
      .send({ slotId: to, reason: 'Stand North is being recalibrated' })
    expect(moved.status).toBe(200)
    expect(moved.body).toMatchObject({ slotId: to, status: 'active', stand: { name: 'Stand South' } })
    const [old] = await ctx.handle.db.select().from(bookings).where(eq(bookings.id, b.id))
    expect(old).toMatchObject({
      status: 'moved',
      movedToId: moved.body.id,
      reason: 'Stand North is being recalibrated',
    })
    const mails = await mailsWith(`booking-moved:${b.id}`)
    expect(mails.map((m) => m.to)).toEqual([g.students[0]!.email])
    expect(mails[0]!.text).toContain('Stand South')
    expect(mails[0]!.text).toContain('Stand North is being recalibrated')
    // The old slot is free again: another group (with a run left) books it.
    expect((await book(holder.students[0]!.client, from)).status).toBe(201)
  })

  it('a cancelled slot cancels its booking and e-mails the group', async () => {
    const g = await groupWithStudents(ctx, fx.courseId, fx.sectionA)
    const id = await slot('2030-10-29', '09:00')
    const b = (await book(g.students[0]!.client, id)).body
    const res = await ta.agent
      .delete(`${C()}/slots/${id}`)
      .set('x-csrf-token', ta.csrf)
      .send({ reason: 'Building closed for the holiday' })
      .expect(200)
    expect(res.body).toEqual({ slotId: id, cancelledBookings: 1 })
    const [row] = await ctx.handle.db.select({ s: bookings.status }).from(bookings).where(eq(bookings.id, b.id))
    expect(row!.s).toBe('cancelled')
    const mails = await mailsWith(`booking-cancelled:${b.id}`)
    expect(mails[0]!.text).toContain('Building closed for the holiday')
  })
})

describe('scope', () => {
  it('a TA acts on their own section only: another section’s booking and slot do not exist for them', async () => {
    const g = await groupWithStudents(ctx, fx.courseId, fx.sectionB)
    const id = await slot('2030-11-19', '09:00', { sectionId: fx.sectionB })
    const b = (await book(g.students[0]!.client, id)).body
    const before = await storedRows()
    const cancel = await ta.agent
      .post(`${C()}/bookings/${b.id}/cancel`)
      .set('x-csrf-token', ta.csrf)
      .send({ reason: 'Not my section' })
    expect(cancel.status).toBe(404)
    const move = await ta.agent
      .post(`${C()}/bookings/${b.id}/move`)
      .set('x-csrf-token', ta.csrf)
      .send({ slotId: id, reason: 'Not my section' })
    expect(move.status).toBe(404)
    const drop = await ta.agent.delete(`${C()}/slots/${id}`).set('x-csrf-token', ta.csrf).send({ reason: 'Not mine' })
    expect(drop.status).toBe(404)
    const list = await ta.agent.get(`${C()}/bookings`).expect(200)
    expect(list.body.bookings.some((x: { id: number }) => x.id === b.id)).toBe(false)
    // Another group's student cannot cancel it either.
    const stranger = await groupWithStudents(ctx, fx.courseId, fx.sectionB)
    const c = stranger.students[0]!.client
    expect((await c.agent.post(`${C()}/bookings/${b.id}/cancel`).set('x-csrf-token', c.csrf).send({})).status).toBe(404)
    expect(await storedRows()).toEqual(before)
  })

  it('a group leaves a waiting list; leaving twice says it is not on it; a cancelled slot clears its list', async () => {
    const holder = await groupWithStudents(ctx, fx.courseId, fx.sectionA)
    const waiter = await groupWithStudents(ctx, fx.courseId, fx.sectionA)
    const other = await groupWithStudents(ctx, fx.courseId, fx.sectionA)
    const id = await slot('2030-11-26', '09:00')
    expect((await book(holder.students[0]!.client, id)).status).toBe(201)
    const w = waiter.students[0]!.client
    const o = other.students[0]!.client
    for (const c of [w, o]) {
      await c.agent
        .post(`${C()}/slots/${id}/waitlist`)
        .set('x-csrf-token', c.csrf)
        .send({ moduleId: sheet.id })
        .expect(201)
    }
    await w.agent.delete(`${C()}/slots/${id}/waitlist`).set('x-csrf-token', w.csrf).expect(204)
    const twice = await w.agent.delete(`${C()}/slots/${id}/waitlist`).set('x-csrf-token', w.csrf)
    expect(twice.status).toBe(404)
    const seen = await o.agent.get(`${C()}/slots?from=2030-11-26&to=2030-11-26`).expect(200)
    expect(seen.body.slots[0]).toMatchObject({ state: 'taken', myWaitPlace: 1 })
    await inst.agent
      .delete(`${C()}/slots/${id}`)
      .set('x-csrf-token', inst.csrf)
      .send({ reason: 'Bay flooded' })
      .expect(200)
    const left = await ctx.handle.db.select().from(bookingWaitlist).where(eq(bookingWaitlist.slotId, id))
    expect(left).toEqual([])
    const after = await o.agent.get(`${C()}/slots?from=2030-11-26&to=2030-11-26`).expect(200)
    expect(after.body.slots[0]).toMatchObject({ state: 'cancelled', cancelReason: 'Bay flooded', myWaitPlace: null })
  })
})

describe('races', () => {
  it('20 groups racing for the last free slot: exactly one wins, the rest get a clear 409, nothing half-written', async () => {
    const groups = await Promise.all(Array.from({ length: 20 }, () => groupWithStudents(ctx, fx.courseId, fx.sectionA)))
    const id = await slot('2030-11-05', '09:00')
    const results = await Promise.all(groups.map((g) => book(g.students[0]!.client, id)))
    const statuses = results.map((r) => r.status)
    expect(statuses.filter((s) => s === 201)).toHaveLength(1)
    expect(statuses.filter((s) => s === 409)).toHaveLength(19)
    for (const r of results.filter((x) => x.status === 409)) {
      expect(r.body.error.code).toBe('slot_taken')
      expect(r.body.error.message).toContain('Another group has just booked this slot')
    }
    const rows = await ctx.handle.db.select().from(bookings).where(eq(bookings.slotId, id))
    expect(rows).toHaveLength(1)
    expect(rows[0]).toMatchObject({ status: 'active', activeSlotId: id })
    const winner = results.findIndex((r) => r.status === 201)
    expect(rows[0]!.labGroupId).toBe(groups[winner]!.groupId)
    const [waits] = await ctx.handle.db
      .select({ n: count() })
      .from(bookingWaitlist)
      .where(eq(bookingWaitlist.slotId, id))
    expect(waits!.n).toBe(0)
    const groupIds = groups.map((g) => g.groupId)
    const [all] = await ctx.handle.db
      .select({ n: count() })
      .from(bookings)
      .where(inArray(bookings.labGroupId, groupIds))
    expect(all!.n).toBe(1)
  })

  it('two members of one group booking two slots when the sheet allows one run: one wins', async () => {
    const g = await groupWithStudents(ctx, fx.courseId, fx.sectionA, 2)
    const a = await slot('2030-11-12', '09:00')
    const b = await slot('2030-11-12', '10:00')
    const [r1, r2] = await Promise.all([
      book(g.students[0]!.client, a, oneRun.id),
      book(g.students[1]!.client, b, oneRun.id),
    ])
    expect([r1!.status, r2!.status].sort()).toEqual([201, 409])
    const loser = r1!.status === 409 ? r1! : r2!
    expect(loser.body.error.code).toBe('stand_runs_used')
    const active = await ctx.handle.db
      .select({ n: count() })
      .from(bookings)
      .where(and(eq(bookings.labGroupId, g.groupId), eq(bookings.status, 'active')))
    expect(active[0]!.n).toBe(1)
  })
})

import { readFileSync } from 'node:fs'
import { and, count, eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { hashPassword } from '../../server/auth/password'
import {
  bookings,
  courses,
  enrollments,
  labGroups,
  runEntries,
  runPeople,
  runRecords,
  standModules,
  standSlots,
  stands,
  submissions,
  users,
} from '../../server/db/schema'
import { currentDueDates } from '../../scripts/demo/seed-demo'
import type { Client, Fixture, TestContext } from '../helpers/app'
import { PASSWORD, seedFixture, signedInAs, startTestApp, uniq } from '../helpers/app'
import { coldFlowCsv, coldFlowPayload } from '../helpers/cold-flow'
import type { CreatedModule } from '../helpers/modules'
import { createModuleAs, publishAs } from '../helpers/modules'

// Run records at the stand through the API: opening, the append-only checklist, the one sign-off,
// and hand-ins that need a signed-off run.

const CHECKLIST = `standRuns: 3
requiresSignedRun: true
checklist:
  - { key: goggles, text: Eye protection on for everyone at the stand }
  - { key: leak-check, text: Leak check passed at working pressure, staff: true, hold: true }
  - { key: barrier, text: Everyone behind the barrier, hold: true }
  - { key: hearing, text: Hearing protection on, staff: true }
`

let ctx: TestContext
let fx: Fixture
let sheet: CreatedModule
let g1 = 0
let g2 = 0
let standId = 0
let slotSeq = 0
const people: Record<'taB' | 'studentG2', { id: number; email: string }> = {} as never
const c: Record<'ta' | 'taB' | 'student' | 'studentG2' | 'instructor', Client> = {} as never
const C = () => `/api/courses/${fx.courseId}`

/** A booking inserted as the booking pages would make it (that part is built elsewhere). */
async function makeBooking(
  labGroupId: number,
  status: 'active' | 'cancelled' = 'active',
  moduleId = sheet.id,
): Promise<number> {
  const db = ctx.handle.db
  slotSeq += 1
  const [slot] = await db
    .insert(standSlots)
    .values({
      standId,
      sectionId: fx.sectionA,
      startsAt: new Date(Date.UTC(2027, 2, 2, 13 + slotSeq, 0)),
      minutes: 30,
    })
    .$returningId()
  const [b] = await db.insert(bookings).values({ slotId: slot!.id, labGroupId, moduleId, status }).$returningId()
  return b!.id
}

async function entryCount(runId: number): Promise<number> {
  const [row] = await ctx.handle.db.select({ n: count() }).from(runEntries).where(eq(runEntries.runId, runId))
  return row!.n
}

async function runRow(runId: number) {
  const [row] = await ctx.handle.db.select().from(runRecords).where(eq(runRecords.id, runId))
  return row!
}

const post = (who: keyof typeof c, url: string, body: object = {}) =>
  c[who].agent.post(url).set('x-csrf-token', c[who].csrf).send(body)

const SIGN_OFF = () => ({
  outcome: 'completed',
  startedAt: '2027-03-02T14:05:00Z',
  endedAt: '2027-03-02T14:25:00Z',
  people: [fx.student.id, fx.ta.id],
  notes: 'Two cold-flow runs at 700 kPa.',
})

beforeAll(async () => {
  ctx = startTestApp()
  fx = await seedFixture(ctx)
  const db = ctx.handle.db
  const hash = await hashPassword(PASSWORD)
  const tag = uniq()
  const [grp] = await db.select({ id: labGroups.id }).from(labGroups).where(eq(labGroups.courseId, fx.courseId))
  g1 = grp!.id
  const [second] = await db
    .insert(labGroups)
    .values({ courseId: fx.courseId, sectionId: fx.sectionA, name: 'G2' })
    .$returningId()
  g2 = second!.id
  for (const [key, role, sectionId, labGroupId] of [
    ['taB', 'ta', fx.sectionB, null],
    ['studentG2', 'student', fx.sectionA, g2],
  ] as const) {
    const email = `${key}.${tag}@test.example`
    const [u] = await db
      .insert(users)
      .values({ email, displayName: `${key} ${tag}`, passwordHash: hash })
      .$returningId()
    await db.insert(enrollments).values({ userId: u!.id, courseId: fx.courseId, role, sectionId, labGroupId })
    people[key] = { id: u!.id, email }
  }
  c.instructor = await signedInAs(ctx, fx.instructor.email)
  c.ta = await signedInAs(ctx, fx.ta.email)
  c.taB = await signedInAs(ctx, people.taB.email)
  c.student = await signedInAs(ctx, fx.student.email)
  c.studentG2 = await signedInAs(ctx, people.studentG2.email)

  const cold = currentDueDates(
    readFileSync(new URL('../../content/02-cold-flow-characterisation.md', import.meta.url), 'utf8'),
  )
  sheet = await createModuleAs(
    c.instructor,
    fx.courseId,
    cold
      // The sheet's own stand runs and checklist give way to this test's.
      .replace(/^standRuns: .*\n/m, '')
      .replace(/^checklist:\n(?: {2}.*\n)+/m, '')
      .replace(/^groupSubmission: true$/m, `groupSubmission: true\n${CHECKLIST}`)
      .replace(/^title: .*$/m, 'title: Cold flow on the stand'),
  )
  await publishAs(c.instructor, fx.courseId, sheet)
  const [stand] = await db.insert(stands).values({ courseId: fx.courseId, name: 'Stand R' }).$returningId()
  standId = stand!.id
  await db.insert(standModules).values({ standId, moduleId: sheet.id })
})

afterAll(async () => {
  await ctx.close()
})

describe('opening a run', () => {
  it('answers 404 run_not_opened with the booking before it is opened, to staff and to the booked group', async () => {
    const bookingId = await makeBooking(g1)
    for (const who of ['ta', 'student'] as const) {
      const res = await c[who].agent.get(`${C()}/bookings/${bookingId}/run`)
      expect(res.status).toBe(404)
      expect(res.body.error.code).toBe('run_not_opened')
      expect(res.body.error.details.booking).toMatchObject({ id: bookingId, labGroupName: 'G1', standName: 'Stand R' })
      expect(res.body.error.details.canOpen).toBe(who === 'ta')
    }
  })

  it('hides a booking from another group’s student and another section’s TA (404 not_found)', async () => {
    const bookingId = await makeBooking(g1)
    for (const who of ['studentG2', 'taB'] as const) {
      const res = await c[who].agent.get(`${C()}/bookings/${bookingId}/run`)
      expect(res.status).toBe(404)
      expect(res.body.error.code).toBe('not_found')
    }
    const open = await post('taB', `${C()}/bookings/${bookingId}/run`)
    expect(open.status).toBe(404)
    expect(await ctx.handle.db.select().from(runRecords).where(eq(runRecords.bookingId, bookingId))).toEqual([])
  })

  it('opens with the checklist of the issued version, once; a student may not open it', async () => {
    const bookingId = await makeBooking(g1)
    const byStudent = await post('student', `${C()}/bookings/${bookingId}/run`)
    expect(byStudent.status).toBe(403)
    const res = await post('ta', `${C()}/bookings/${bookingId}/run`)
    expect(res.status).toBe(201)
    expect(res.body.checklist.map((i: { key: string; staff: boolean; hold: boolean; ticked: boolean }) => i)).toEqual([
      expect.objectContaining({ key: 'goggles', staff: false, hold: false, ticked: false, by: null }),
      expect.objectContaining({ key: 'leak-check', staff: true, hold: true, ticked: false }),
      expect.objectContaining({ key: 'barrier', staff: false, hold: true, ticked: false }),
      expect.objectContaining({ key: 'hearing', staff: true, hold: false, ticked: false }),
    ])
    const [stored] = await ctx.handle.db.select().from(runRecords).where(eq(runRecords.bookingId, bookingId))
    expect(stored!.moduleVersionId).toBe(sheet.versionId)
    expect(stored!.checklist.map((i) => i.key)).toEqual(['goggles', 'leak-check', 'barrier', 'hearing'])
    const again = await post('instructor', `${C()}/bookings/${bookingId}/run`)
    expect(again.status).toBe(409)
    expect(again.body.error.code).toBe('run_exists')
    const read = await c.student.agent.get(`${C()}/bookings/${bookingId}/run`)
    expect(read.status).toBe(200)
    expect(read.body.id).toBe(res.body.id)
  })

  it('keeps the checklist a run was opened with when the sheet is issued again with other items', async () => {
    const source = (items: string) =>
      `---\ntitle: Checklist versions\nstandRuns: 2\nchecklist:\n${items}---\n\nInvented test sheet.\n`
    const first = source('  - { key: first-item, text: The first wording, hold: true }\n')
    const m = await createModuleAs(c.instructor, fx.courseId, first)
    await publishAs(c.instructor, fx.courseId, m)
    const before = await makeBooking(g1, 'active', m.id)
    const opened = await post('ta', `${C()}/bookings/${before}/run`).expect(201)
    const saved = await c.instructor.agent
      .put(`${C()}/modules/${m.id}`)
      .set('x-csrf-token', c.instructor.csrf)
      .send({ source: source('  - { key: second-item, text: The second wording }\n'), baseVersionId: m.versionId })
      .expect(200)
    await publishAs(c.instructor, fx.courseId, { ...m, versionId: saved.body.current.id })
    const kept = await c.ta.agent.get(`${C()}/bookings/${before}/run`).expect(200)
    expect(kept.body.checklist.map((i: { key: string }) => i.key)).toEqual(['first-item'])
    expect(kept.body.id).toBe(opened.body.id)
    const after = await makeBooking(g1, 'active', m.id)
    const fresh = await post('ta', `${C()}/bookings/${after}/run`).expect(201)
    expect(fresh.body.checklist.map((i: { key: string }) => i.key)).toEqual(['second-item'])
    // The old item cannot be ticked on the new run, and the new one not on the old run.
    const wrong = await post('ta', `${C()}/runs/${kept.body.id}/entries`, { kind: 'tick', itemKey: 'second-item' })
    expect(wrong.status).toBe(400)
    expect(wrong.body.error.message).toContain('second-item')
  })

  it('refuses to open a run for a cancelled booking', async () => {
    const bookingId = await makeBooking(g1, 'cancelled')
    const res = await post('ta', `${C()}/bookings/${bookingId}/run`)
    expect(res.status).toBe(409)
    expect(res.body.error.code).toBe('booking_not_active')
    expect(await ctx.handle.db.select().from(runRecords).where(eq(runRecords.bookingId, bookingId))).toEqual([])
  })

  it('a non-numeric booking id is a 400 naming bookingId', async () => {
    const res = await c.ta.agent.get(`${C()}/bookings/abc/run`)
    expect(res.status).toBe(400)
    expect(res.body.error.message).toContain('bookingId')
  })
})

describe('ticking the checklist', () => {
  let runId = 0
  beforeAll(async () => {
    const bookingId = await makeBooking(g1)
    runId = (await post('ta', `${C()}/bookings/${bookingId}/run`)).body.id
  })

  it('refuses a tick of an item the checklist does not have, naming the key, and stores nothing', async () => {
    const res = await post('ta', `${C()}/runs/${runId}/entries`, { kind: 'tick', itemKey: 'no-such-item' })
    expect(res.status).toBe(400)
    expect(res.body.error.code).toBe('unknown_checklist_item')
    expect(res.body.error.message).toContain('no-such-item')
    expect(await entryCount(runId)).toBe(0)
  })

  it('refuses malformed entries with the field named', async () => {
    const cases: [object, string][] = [
      [{ kind: 'tick' }, 'itemKey'],
      [{ kind: 'note' }, 'text'],
      [{ kind: 'correction', text: '   ' }, 'text'],
      [{ kind: 'sign-off', text: 'x' }, 'kind'],
      [{ kind: 'tick', itemKey: 'goggles', extra: 1 }, 'extra'],
    ]
    for (const [body, field] of cases) {
      const res = await post('ta', `${C()}/runs/${runId}/entries`, body)
      expect(res.status, JSON.stringify(body)).toBe(400)
      expect(JSON.stringify(res.body.error)).toContain(field)
    }
    expect(await entryCount(runId)).toBe(0)
  })

  it('lets a student of the group tick an item that is not staff-only, but not a staff-only one', async () => {
    const staffOnly = await post('student', `${C()}/runs/${runId}/entries`, { kind: 'tick', itemKey: 'leak-check' })
    expect(staffOnly.status).toBe(403)
    expect(staffOnly.body.error.message).toContain('leak-check')
    expect(await entryCount(runId)).toBe(0)
    const res = await post('student', `${C()}/runs/${runId}/entries`, { kind: 'tick', itemKey: 'goggles' })
    expect(res.status).toBe(201)
    const goggles = res.body.checklist.find((i: { key: string }) => i.key === 'goggles')
    expect(goggles).toMatchObject({ ticked: true, by: expect.stringContaining('student') })
    expect(Date.parse(goggles.at)).not.toBeNaN()
  })

  it('hides the run from another group’s student and another section’s TA', async () => {
    for (const who of ['studentG2', 'taB'] as const) {
      const res = await post(who, `${C()}/runs/${runId}/entries`, { kind: 'note', text: 'Not mine.' })
      expect(res.status).toBe(404)
    }
    expect(await entryCount(runId)).toBe(1)
  })

  it('keeps every tick and untick as its own entry: the history only grows', async () => {
    const before = (await c.ta.agent.get(`${C()}/bookings/${(await runRow(runId)).bookingId}/run`)).body.entries
    await post('ta', `${C()}/runs/${runId}/entries`, { kind: 'untick', itemKey: 'goggles' }).expect(201)
    const after = await post('ta', `${C()}/runs/${runId}/entries`, { kind: 'tick', itemKey: 'goggles' }).expect(201)
    expect(after.body.entries.slice(0, before.length)).toEqual(before)
    expect(after.body.entries.slice(before.length).map((x: { kind: string; itemKey: string }) => x.kind)).toEqual([
      'untick',
      'tick',
    ])
    expect(after.body.entries.map((x: { kind: string }) => x.kind)).toEqual(['tick', 'untick', 'tick'])
  })
})

describe('signing a run off', () => {
  let runId = 0
  let bookingId = 0
  beforeAll(async () => {
    bookingId = await makeBooking(g1)
    runId = (await post('ta', `${C()}/bookings/${bookingId}/run`)).body.id
  })

  /** The run's stored sign-off columns and people, for "nothing changed" checks. */
  async function stored() {
    const r = await runRow(runId)
    const who = await ctx.handle.db.select().from(runPeople).where(eq(runPeople.runId, runId))
    return { signedOffAt: r.signedOffAt, outcome: r.outcome, people: who.length, entries: await entryCount(runId) }
  }

  it('refuses while a hold point is not ticked, naming the items', async () => {
    await post('ta', `${C()}/runs/${runId}/entries`, { kind: 'tick', itemKey: 'leak-check' }).expect(201)
    await post('ta', `${C()}/runs/${runId}/entries`, { kind: 'tick', itemKey: 'barrier' }).expect(201)
    // An untick after the tick: the latest mark decides.
    await post('student', `${C()}/runs/${runId}/entries`, { kind: 'untick', itemKey: 'barrier' }).expect(201)
    const before = await stored()
    const res = await post('ta', `${C()}/runs/${runId}/sign-off`, SIGN_OFF())
    expect(res.status).toBe(409)
    expect(res.body.error.code).toBe('hold_points_open')
    expect(res.body.error.message).toContain('barrier')
    expect(res.body.error.message).not.toContain('leak-check')
    expect(res.body.error.details.items).toEqual(['barrier'])
    expect(await stored()).toEqual(before)
  })

  it('refuses bad sign-off input with the field named, and stores nothing', async () => {
    await post('student', `${C()}/runs/${runId}/entries`, { kind: 'tick', itemKey: 'barrier' }).expect(201)
    const before = await stored()
    const cases: [object, string][] = [
      [{ ...SIGN_OFF(), outcome: 'aborted' }, 'reason'],
      [{ ...SIGN_OFF(), outcome: 'hang-fire' }, 'waitMinutes'],
      [{ ...SIGN_OFF(), outcome: 'misfire', waitMinutes: -5 }, 'waitMinutes'],
      [{ ...SIGN_OFF(), outcome: 'exploded' }, 'outcome'],
      [{ ...SIGN_OFF(), endedAt: '2027-03-02T14:00:00Z' }, 'endedAt'],
      [{ ...SIGN_OFF(), startedAt: 'yesterday' }, 'startedAt'],
      [{ ...SIGN_OFF(), people: [] }, 'people'],
      [{ ...SIGN_OFF(), people: ['x'] }, 'people'],
    ]
    for (const [body, field] of cases) {
      const res = await post('ta', `${C()}/runs/${runId}/sign-off`, body)
      expect(res.status, JSON.stringify(body)).toBe(400)
      expect(JSON.stringify(res.body.error)).toContain(field)
    }
    expect(await stored()).toEqual(before)
  })

  it('refuses people who are not in the group or the course staff, naming their ids', async () => {
    const before = await stored()
    for (const stranger of [fx.outsider.id, people.studentG2.id, fx.student2.id]) {
      const res = await post('ta', `${C()}/runs/${runId}/sign-off`, {
        ...SIGN_OFF(),
        people: [fx.student.id, stranger],
      })
      expect(res.status).toBe(400)
      expect(res.body.error.code).toBe('not_at_run')
      expect(res.body.error.message).toContain(String(stranger))
      expect(res.body.error.details.ids).toEqual([stranger])
    }
    expect(await stored()).toEqual(before)
  })

  it('refuses a sign-off by a student', async () => {
    const before = await stored()
    const res = await post('student', `${C()}/runs/${runId}/sign-off`, SIGN_OFF())
    expect(res.status).toBe(403)
    expect(await stored()).toEqual(before)
  })

  it('signs off once with outcome, times, people and notes; then only notes and corrections', async () => {
    const res = await post('ta', `${C()}/runs/${runId}/sign-off`, {
      ...SIGN_OFF(),
      people: [fx.student.id, fx.ta.id, fx.instructor.id],
    })
    expect(res.status).toBe(200)
    expect(res.body.signOff).toMatchObject({
      outcome: 'completed',
      startedAt: '2027-03-02T14:05:00.000Z',
      endedAt: '2027-03-02T14:25:00.000Z',
      notes: 'Two cold-flow runs at 700 kPa.',
      by: expect.stringContaining('ta'),
    })
    expect(res.body.signOff.people.map((p: { id: number }) => p.id).sort()).toEqual(
      [fx.student.id, fx.ta.id, fx.instructor.id].sort(),
    )
    expect(res.body.entries.at(-1)).toMatchObject({ kind: 'sign-off' })
    expect(res.body.can).toMatchObject({ signOff: false, tickStaffItems: false })
    const row = await runRow(runId)
    expect(row.signedOffAt).not.toBeNull()

    const second = await post('instructor', `${C()}/runs/${runId}/sign-off`, {
      ...SIGN_OFF(),
      outcome: 'aborted',
      reason: 'x',
    })
    expect(second.status).toBe(409)
    expect(second.body.error.code).toBe('run_signed_off')
    expect((await runRow(runId)).outcome).toBe('completed')

    const entries = await entryCount(runId)
    const tick = await post('ta', `${C()}/runs/${runId}/entries`, { kind: 'untick', itemKey: 'goggles' })
    expect(tick.status).toBe(409)
    expect(tick.body.error.code).toBe('run_signed_off')
    const byStudent = await post('student', `${C()}/runs/${runId}/entries`, { kind: 'tick', itemKey: 'hearing' })
    expect(byStudent.status).toBe(409)
    expect(await entryCount(runId)).toBe(entries)

    const correction = await post('ta', `${C()}/runs/${runId}/entries`, {
      kind: 'correction',
      itemKey: 'leak-check',
      text: 'Leak check was at 650 kPa, not 700 kPa.',
    })
    expect(correction.status).toBe(201)
    const studentCorrection = await post('student', `${C()}/runs/${runId}/entries`, { kind: 'correction', text: 'x' })
    expect(studentCorrection.status).toBe(403)
    const note = await post('student', `${C()}/runs/${runId}/entries`, { kind: 'note', text: 'Data uploaded.' })
    expect(note.status).toBe(201)
    expect(note.body.entries.slice(-2).map((x: { kind: string; text: string }) => [x.kind, x.text])).toEqual([
      ['correction', 'Leak check was at 650 kPa, not 700 kPa.'],
      ['note', 'Data uploaded.'],
    ])
  })

  it('lists the signed-off run for its group only', async () => {
    const mine = await c.student.agent.get(`${C()}/modules/${sheet.id}/signed-runs`).expect(200)
    expect(mine.body.map((r: { id: number }) => r.id)).toContain(runId)
    expect(mine.body.find((r: { id: number }) => r.id === runId)).toMatchObject({
      bookingId,
      outcome: 'completed',
      standName: 'Stand R',
      signedOffBy: expect.stringContaining('ta'),
    })
    const other = await c.studentG2.agent.get(`${C()}/modules/${sheet.id}/signed-runs`).expect(200)
    expect(other.body).toEqual([])
  })
})

describe('a hand-in that needs a signed-off run', () => {
  let signedRun = 0
  let unsignedRun = 0
  let otherGroupRun = 0

  beforeAll(async () => {
    const db = ctx.handle.db
    const mine = await c.student.agent.get(`${C()}/modules/${sheet.id}/signed-runs`).expect(200)
    signedRun = mine.body[0].id
    const open = await makeBooking(g1)
    unsignedRun = (await post('ta', `${C()}/bookings/${open}/run`)).body.id
    const theirs = await makeBooking(g2)
    const [r] = await db
      .insert(runRecords)
      .values({
        courseId: fx.courseId,
        bookingId: theirs,
        moduleVersionId: sheet.versionId,
        checklist: [],
        outcome: 'completed',
        startedAt: new Date('2027-03-02T15:00:00Z'),
        endedAt: new Date('2027-03-02T15:20:00Z'),
        signedOffAt: new Date(),
        signedOffBy: fx.ta.id,
      })
      .$returningId()
    otherGroupRun = r!.id
  })

  async function handIn(runRecordId?: string | number) {
    const log = coldFlowCsv()
    let req = c.student.agent
      .post(`${C()}/modules/${sheet.id}/submissions`)
      .set('x-csrf-token', c.student.csrf)
      .field('payload', JSON.stringify(coldFlowPayload(log)))
    if (runRecordId !== undefined) req = req.field('runRecordId', String(runRecordId))
    return req.attach('table:run', Buffer.from(log.csv), 'run.csv')
  }
  const stored = async () => {
    const [row] = await ctx.handle.db
      .select({ n: count() })
      .from(submissions)
      .where(and(eq(submissions.moduleId, sheet.id)))
    return row!.n
  }

  it('is refused without a run, with another group’s run, with an unsigned run or a malformed id; nothing is stored', async () => {
    const cases: [string | number | undefined, number, string][] = [
      [undefined, 409, 'signed-off stand run'],
      [otherGroupRun, 409, 'not a run of your lab group'],
      [unsignedRun, 409, 'not signed off'],
      [999999999, 409, 'not a run of your lab group'],
      ['abc', 400, 'runRecordId'],
    ]
    for (const [id, status, words] of cases) {
      const res = await handIn(id)
      expect(res.status, String(id)).toBe(status)
      expect(res.body.error.message).toContain(words)
    }
    expect(await stored()).toBe(0)
  })

  it('is stored against the group’s signed-off run, and the review page shows that run', async () => {
    const res = await handIn(signedRun)
    expect(res.status).toBe(201)
    const [row] = await ctx.handle.db
      .select({ run: submissions.runRecordId })
      .from(submissions)
      .where(eq(submissions.id, res.body.id))
    expect(row!.run).toBe(signedRun)
    const review = await c.ta.agent.get(`${C()}/submissions/${res.body.id}/review`).expect(200)
    expect(review.body.run).toMatchObject({
      id: signedRun,
      outcome: 'completed',
      startedAt: '2027-03-02T14:05:00.000Z',
      signedOffBy: expect.stringContaining('ta'),
    })
  })
})

describe('sign-off races and closed courses', () => {
  it('two sign-offs at the same moment: exactly one is stored, the other gets 409', async () => {
    const bookingId = await makeBooking(g1)
    const runId = (await post('ta', `${C()}/bookings/${bookingId}/run`)).body.id as number
    for (const itemKey of ['leak-check', 'barrier']) {
      await post('ta', `${C()}/runs/${runId}/entries`, { kind: 'tick', itemKey }).expect(201)
    }
    const answers = await Promise.all([
      post('ta', `${C()}/runs/${runId}/sign-off`, SIGN_OFF()),
      post('instructor', `${C()}/runs/${runId}/sign-off`, { ...SIGN_OFF(), outcome: 'misfire', waitMinutes: 30 }),
    ])
    expect(answers.map((a) => a.status).sort()).toEqual([200, 409])
    const winner = answers.find((a) => a.status === 200)!
    const row = await runRow(runId)
    expect(row.outcome).toBe(winner.body.signOff.outcome)
    const signOffs = await ctx.handle.db
      .select({ id: runEntries.id })
      .from(runEntries)
      .where(and(eq(runEntries.runId, runId), eq(runEntries.kind, 'sign-off')))
    expect(signOffs).toHaveLength(1)
  })

  it('a closed course refuses every write to a run (409 course_closed) and still shows it to staff', async () => {
    const bookingId = await makeBooking(g1)
    const runId = (await post('ta', `${C()}/bookings/${bookingId}/run`)).body.id as number
    const other = await makeBooking(g1)
    await ctx.handle.db.update(courses).set({ closedAt: new Date() }).where(eq(courses.id, fx.courseId))
    try {
      const answers = [
        await post('ta', `${C()}/runs/${runId}/entries`, { kind: 'tick', itemKey: 'goggles' }),
        await post('ta', `${C()}/runs/${runId}/sign-off`, SIGN_OFF()),
        await post('ta', `${C()}/bookings/${other}/run`),
      ]
      expect(answers.map((a) => [a.status, a.body.error.code])).toEqual([
        [409, 'course_closed'],
        [409, 'course_closed'],
        [409, 'course_closed'],
      ])
      expect(await entryCount(runId)).toBe(0)
      expect((await runRow(runId)).signedOffAt).toBeNull()
      await c.ta.agent.get(`${C()}/bookings/${bookingId}/run`).expect(200)
    } finally {
      await ctx.handle.db.update(courses).set({ closedAt: null }).where(eq(courses.id, fx.courseId))
    }
  })
})

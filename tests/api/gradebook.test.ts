import { readFileSync } from 'node:fs'
import { and, eq } from 'drizzle-orm'
import Papa from 'papaparse'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { currentDueDates } from '../../scripts/demo/seed-demo'
import { hashPassword } from '../../server/auth/password'
import { enrollments, labGroups, modules, users } from '../../server/db/schema'
import { createLogger } from '../../server/logger'
import { DEFAULT_OUTBOX_OPTIONS, drainOnce } from '../../server/mail/outbox-worker'
import { createSmtpSender } from '../../server/mail/transport'
import type { Gradebook, MyGrades } from '../../shared/schemas/grades'
import type { Client, Fixture, TestContext } from '../helpers/app'
import { PASSWORD, seedFixture, signedInAs, startTestApp, uniq } from '../helpers/app'
import { coldFlowCsv, coldFlowPayload } from '../helpers/cold-flow'
import { expectClose } from '../helpers/expect-close'
import { waitForMail } from '../helpers/maildev'
import type { CreatedModule } from '../helpers/modules'
import { createModuleAs, moduleSource, publishAs } from '../helpers/modules'

const COLD = readFileSync(new URL('../../content/02-cold-flow-characterisation.md', import.meta.url), 'utf8')

/** The cold-flow module with our own title, results policy, hand-in mode, and (optionally) dates in the past. */
function coldFlowModule(title: string, o: { results: string; group: boolean; pastDue?: boolean }): string {
  let s = o.pastDue ? COLD.replace(/(\b(?:at|acceptUntil):\s*)\d{4}-/g, '$12020-') : currentDueDates(COLD)
  s = s.replace(/^title: .*$/m, `title: ${title}`)
  s = s.replace('results: immediately', `results: ${o.results}`)
  s = s.replace('groupSubmission: true', `groupSubmission: ${o.group}`)
  return s
}

let ctx: TestContext
let fx: Fixture
let inst: Client
let taA: Client
let taB: Client
/** S1 = fixture student (section A, G1), S2 = student2 (B), S3 (A, G1), S4 (B, a formula-like name), S5 (A, nothing handed in). */
const S: Record<'s1' | 's2' | 's3' | 's4' | 's5', { id: number; email: string; name: string; c?: Client }> = {} as never
let g1: number
let m1: CreatedModule
let m2: CreatedModule
let m3: CreatedModule
let draft: CreatedModule
const tag = uniq()
const M1_TITLE = `Individual after release ${tag}`
const EVIL = '=HYPERLINK("x")'
/** The counted hand-in per student on M1, and its points and max as set up here. */
const counted: Record<string, { id: number; points: number; max: number }> = {}
let m2Counted: { id: number; points: number; max: number }
let firstAttemptS1: number

const R = () => `/api/courses/${fx.courseId}`

async function addPerson(role: 'student' | 'ta', name: string, sectionId: number, labGroupId: number | null) {
  const email = `${role}.${uniq()}@test.example`
  const [row] = await ctx.handle.db
    .insert(users)
    .values({ email, displayName: name, passwordHash: await hashPassword(PASSWORD) })
    .$returningId()
  await ctx.handle.db
    .insert(enrollments)
    .values({ userId: row!.id, courseId: fx.courseId, role, sectionId, labGroupId })
  return { id: row!.id, email, name }
}

async function handIn(c: Client, moduleId: number) {
  const log = coldFlowCsv()
  const res = await c.agent
    .post(`${R()}/modules/${moduleId}/submissions`)
    .set('x-csrf-token', c.csrf)
    .field('payload', JSON.stringify(coldFlowPayload(log)))
    .attach('table:run', Buffer.from(log.csv), 'run.csv')
  if (res.status !== 201) throw new Error(`hand-in failed: ${res.status} ${JSON.stringify(res.body)}`)
  return res.body.id as number
}

/** The instructor sets the total of a hand-in through the review API, with a reason. */
async function overrideTotal(submissionId: number, points: number) {
  const extras = await inst.agent.get(`${R()}/submissions/${submissionId}/review`).expect(200)
  await inst.agent
    .post(`${R()}/submissions/${submissionId}/overrides`)
    .set('x-csrf-token', inst.csrf)
    .send({ checkId: null, points, reason: 'Gradebook test: a known total.', revision: extras.body.revision })
    .expect(200)
}

/** What the staff see of a hand-in (checks with pass/fail, the stored score and max). */
async function staffView(submissionId: number) {
  return (await inst.agent.get(`${R()}/submissions/${submissionId}`).expect(200)).body as {
    score: number
    maxScore: number
    checks: { key: string; label: string; pass: boolean }[]
  }
}

async function drainMail() {
  const sender = createSmtpSender(ctx.config)
  try {
    for (let i = 0; i < 20; i++)
      if ((await drainOnce(ctx.handle.db, sender, createLogger('silent'), DEFAULT_OUTBOX_OPTIONS)) === 0) break
  } finally {
    sender.close()
  }
}

beforeAll(async () => {
  ctx = startTestApp()
  fx = await seedFixture(ctx)
  inst = await signedInAs(ctx, fx.instructor.email)
  taA = await signedInAs(ctx, fx.ta.email)
  const [g] = await ctx.handle.db
    .select({ id: labGroups.id })
    .from(labGroups)
    .where(and(eq(labGroups.courseId, fx.courseId), eq(labGroups.name, 'G1')))
  g1 = g!.id
  S.s1 = { id: fx.student.id, email: fx.student.email, name: '' }
  S.s2 = { id: fx.student2.id, email: fx.student2.email, name: '' }
  S.s3 = await addPerson('student', `Third ${tag}`, fx.sectionA, g1)
  S.s4 = await addPerson('student', EVIL, fx.sectionB, null)
  S.s5 = await addPerson('student', `Fifth ${tag}`, fx.sectionA, null)
  const tb = await addPerson('ta', `TA B ${tag}`, fx.sectionB, null)
  taB = await signedInAs(ctx, tb.email)
  for (const k of ['s1', 's2', 's3', 's4', 's5'] as const) S[k].c = await signedInAs(ctx, S[k].email)

  m1 = await createModuleAs(inst, fx.courseId, coldFlowModule(M1_TITLE, { results: 'when-final', group: false }))
  await publishAs(inst, fx.courseId, m1)
  m2 = await createModuleAs(
    inst,
    fx.courseId,
    coldFlowModule(`Group immediately ${tag}`, { results: 'immediately', group: true }),
  )
  await publishAs(inst, fx.courseId, m2)
  m3 = await createModuleAs(
    inst,
    fx.courseId,
    coldFlowModule(`Past due ${tag}`, { results: 'immediately', group: false, pastDue: true }),
  )
  await publishAs(inst, fx.courseId, m3)
  draft = await createModuleAs(inst, fx.courseId, moduleSource(`Draft ${tag}`))

  // M1: S1 hands in twice (the second attempt counts), S2, S3, S4 once; S5 never.
  firstAttemptS1 = await handIn(S.s1.c!, m1.id)
  const a2 = await handIn(S.s1.c!, m1.id)
  const s2 = await handIn(S.s2.c!, m1.id)
  const s3 = await handIn(S.s3.c!, m1.id)
  const s4 = await handIn(S.s4.c!, m1.id)
  const max = (await staffView(a2)).maxScore
  // Known totals, set by the staff: 10 % on the first attempt (must not count), then 90 %, 35 %, 50 %.
  const pts = (f: number) => Number((max * f).toFixed(2))
  await overrideTotal(firstAttemptS1, pts(0.1))
  await overrideTotal(a2, pts(0.9))
  await overrideTotal(s2, pts(0.35))
  await overrideTotal(s3, pts(0.5))
  counted[S.s1.email] = { id: a2, points: pts(0.9), max }
  counted[S.s2.email] = { id: s2, points: pts(0.35), max }
  counted[S.s3.email] = { id: s3, points: pts(0.5), max }
  const v4 = await staffView(s4)
  counted[S.s4.email] = { id: s4, points: v4.score, max: v4.maxScore }
  // M2 (group): S1 hands in for G1; it counts for S3 too.
  const gs = await handIn(S.s1.c!, m2.id)
  const vg = await staffView(gs)
  m2Counted = { id: gs, points: vg.score, max: vg.maxScore }
}, 120_000)
afterAll(async () => {
  await ctx.close()
})

const book = async (c: Client, query = '') =>
  (await c.agent.get(`${R()}/gradebook${query}`).expect(200)).body as Gradebook
const rowOf = (b: Gradebook, email: string) => b.students.find((s) => s.email === email)

describe('the gradebook', () => {
  it('counts the latest graded attempt (the staff total when overridden) and a group hand-in for every member', async () => {
    const b = await book(inst)
    expect(b.modules.map((m) => m.id)).toEqual([m1.id, m2.id, m3.id])
    expect(b.students.map((s) => s.email).sort()).toEqual(
      Object.values(S)
        .map((s) => s.email)
        .sort(),
    )
    for (const email of [S.s1.email, S.s2.email, S.s3.email, S.s4.email]) {
      const cell = rowOf(b, email)!.cells[String(m1.id)]!
      expect(cell.submissionId).toBe(counted[email]!.id)
      expect(cell.points).toBe(counted[email]!.points)
      expect(cell.maxScore).toBe(counted[email]!.max)
    }
    expect(rowOf(b, S.s1.email)!.cells[String(m1.id)]!.attempt).toBe(2)
    expect(rowOf(b, S.s1.email)!.cells[String(m1.id)]!.overridden).toBe(true)
    expect(rowOf(b, S.s5.email)!.cells[String(m1.id)]).toBeUndefined()
    // The group hand-in counts for both members of G1, and for nobody else.
    expect(rowOf(b, S.s1.email)!.cells[String(m2.id)]!.submissionId).toBe(m2Counted.id)
    expect(rowOf(b, S.s3.email)!.cells[String(m2.id)]!.submissionId).toBe(m2Counted.id)
    expect(rowOf(b, S.s2.email)!.cells[String(m2.id)]).toBeUndefined()
    expect(b.canManage).toBe(true)
    expect(b.enrolledStudents).toBe(5)
  })

  it('statistics per module match the points set up here', async () => {
    const b = await book(inst)
    const stats = b.stats.find((s) => s.moduleId === m1.id)!
    const percents = Object.values(counted).map((c) => (c.points / c.max) * 100)
    const sorted = [...percents].sort((a, b) => a - b)
    expect(stats.n).toBe(4)
    expectClose(stats.meanPercent!, percents.reduce((a, b) => a + b, 0) / 4, 1e-9)
    expectClose(stats.medianPercent!, (sorted[1]! + sorted[2]!) / 2, 1e-9)
    const bins = new Array(10).fill(0)
    for (const p of percents) bins[Math.min(9, Math.floor(p / 10))] += 1
    expect(stats.histogram).toEqual(bins)

    // The checks failed most often, over the counted hand-ins as the staff see them.
    const tally = new Map<string, { fails: number; attempts: number }>()
    for (const c of Object.values(counted)) {
      for (const ch of (await staffView(c.id)).checks) {
        const t = tally.get(ch.key) ?? { fails: 0, attempts: 0 }
        t.attempts += 1
        if (!ch.pass) t.fails += 1
        tally.set(ch.key, t)
      }
    }
    const failing = [...tally.entries()].filter(([, t]) => t.fails > 0)
    expect(stats.hardestChecks.length).toBe(Math.min(5, failing.length))
    for (const h of stats.hardestChecks) expect({ fails: h.fails, attempts: h.attempts }).toEqual(tally.get(h.key))
    const shown = new Set(stats.hardestChecks.map((h) => h.key))
    const minShown = Math.min(...stats.hardestChecks.map((h) => h.fails))
    for (const [k, t] of failing) if (!shown.has(k)) expect(t.fails).toBeLessThanOrEqual(minShown)

    const past = b.stats.find((s) => s.moduleId === m3.id)!
    expect(past).toMatchObject({
      n: 0,
      meanPercent: null,
      medianPercent: null,
      histogram: new Array(10).fill(0),
      hardestChecks: [],
    })
  })

  it('weights: the instructor sets them, bad values are refused and change nothing, and totals follow', async () => {
    const put = (c: Client, moduleId: number, body: object) =>
      c.agent.put(`${R()}/gradebook/modules/${moduleId}/weight`).set('x-csrf-token', c.csrf).send(body)
    expect((await put(inst, m1.id, { weight: 3 })).status).toBe(200)
    for (const bad of [{ weight: -1 }, { weight: 'NaN' }, { weight: null }, {}, { weight: 1e9 }]) {
      const res = await put(inst, m1.id, bad)
      expect(res.status, JSON.stringify(bad)).toBe(400)
      expect(res.body.error.message).toMatch(/^weight: /)
    }
    expect((await put(taA, m1.id, { weight: 5 })).status).toBe(403)
    expect((await put(inst, 999_999_999, { weight: 1 })).status).toBe(404)
    const [row] = await ctx.handle.db.select({ w: modules.weight }).from(modules).where(eq(modules.id, m1.id))
    expect(row!.w).toBe(3)

    const b = await book(inst)
    expect(b.modules.find((m) => m.id === m1.id)!.weight).toBe(3)
    expect(b.modules.find((m) => m.id === m3.id)!.pastDue).toBe(true)
    expect(b.modules.find((m) => m.id === m2.id)!.pastDue).toBe(false)
    // Weighted mean, M3 past due counts as 0 % for everyone, M2 (not due) only where handed in.
    const p1 = (e: string) => (counted[e]!.points / counted[e]!.max) * 100
    const p2 = (m2Counted.points / m2Counted.max) * 100
    expectClose(rowOf(b, S.s1.email)!.totalPercent!, (3 * p1(S.s1.email) + p2 + 0) / 5, 1e-9)
    expectClose(rowOf(b, S.s3.email)!.totalPercent!, (3 * p1(S.s3.email) + p2 + 0) / 5, 1e-9)
    expectClose(rowOf(b, S.s2.email)!.totalPercent!, (3 * p1(S.s2.email) + 0) / 4, 1e-9)
    expect(rowOf(b, S.s5.email)!.totalPercent).toBe(0)
  })

  it('a student with an extension not yet reached is not counted as missing on that module; once withdrawn, they are', async () => {
    const ext = `${R()}/extensions/${m3.id}/${S.s5.id}`
    const later = new Date(Date.now() + 7 * 86_400_000).toISOString()
    await inst.agent.put(ext).set('x-csrf-token', inst.csrf).send({ dueAt: later, note: 'Gradebook test' }).expect(200)
    try {
      const b = await book(inst)
      // M3's own due date has passed, but S5's extended one has not: no module counts for S5 yet.
      expect(b.modules.find((m) => m.id === m3.id)!.pastDue).toBe(true)
      expect(rowOf(b, S.s5.email)!.extendedOpen).toEqual([m3.id])
      expect(rowOf(b, S.s5.email)!.totalPercent).toBeNull()
      expect(rowOf(b, S.s2.email)!.extendedOpen).toEqual([])
    } finally {
      await inst.agent.delete(ext).set('x-csrf-token', inst.csrf).expect(200)
    }
    const after = await book(inst)
    expect(rowOf(after, S.s5.email)!.extendedOpen).toEqual([])
    expect(rowOf(after, S.s5.email)!.totalPercent).toBe(0)
  })

  it('a TA sees only the students of their own section; filters by section and lab group', async () => {
    const a = await book(taA)
    expect(a.students.map((s) => s.email).sort()).toEqual([S.s1.email, S.s3.email, S.s5.email].sort())
    expect(a.canManage).toBe(false)
    expect(a.sections.map((s) => s.id)).toEqual([fx.sectionA])
    expect(a.stats.find((s) => s.moduleId === m1.id)!.n).toBe(2)
    const b = await book(taB)
    expect(b.students.map((s) => s.email).sort()).toEqual([S.s2.email, S.s4.email].sort())
    expect((await taA.agent.get(`${R()}/gradebook?sectionId=${fx.sectionB}`)).status).toBe(403)
    expect((await taA.agent.get(`${R()}/gradebook.csv?sectionId=${fx.sectionB}`)).status).toBe(403)
    const byGroup = await book(inst, `?labGroupId=${g1}`)
    expect(byGroup.students.map((s) => s.email).sort()).toEqual([S.s1.email, S.s3.email].sort())
    const bySection = await book(inst, `?sectionId=${fx.sectionB}`)
    expect(bySection.students.map((s) => s.email).sort()).toEqual([S.s2.email, S.s4.email].sort())
    const bad = await inst.agent.get(`${R()}/gradebook?sectionId=abc`)
    expect(bad.status).toBe(400)
    expect(bad.body.error.message).toContain('sectionId')
    expect((await S.s1.c!.agent.get(`${R()}/gradebook`)).status).toBe(403)
  })
})

describe('the CSV export', () => {
  it('has one row per student, numbers as numbers, and a formula-like name neutralised', async () => {
    const res = await inst.agent.get(`${R()}/gradebook.csv`)
    expect(res.status).toBe(200)
    expect(res.headers['content-type']).toContain('text/csv')
    expect(res.headers['content-disposition']).toMatch(
      /^attachment; filename="?gradebook-[A-Za-z0-9_-]+-\d{4}-\d{2}-\d{2}\.csv"?$/,
    )
    const parsed = Papa.parse<string[]>(res.text.replace(/^\uFEFF/, ''), { skipEmptyLines: true })
    const [header, ...rows] = parsed.data
    expect(header!.slice(0, 4)).toEqual(['email', 'name', 'section', 'group'])
    expect(header!.at(-1)).toBe('total %')
    expect(header).toContain(`${M1_TITLE} (points)`)
    expect(rows).toHaveLength(5)
    expect(new Set(rows.map((r) => r[0]))).toEqual(new Set(Object.values(S).map((s) => s.email)))
    const evil = rows.find((r) => r[0] === S.s4.email)!
    expect(evil[1]).toBe(`'${EVIL}`)
    const col = header!.indexOf(`${M1_TITLE} (points)`)
    const s2 = rows.find((r) => r[0] === S.s2.email)!
    expect(Number(s2[col])).toBe(counted[S.s2.email]!.points)
    expect(rows.find((r) => r[0] === S.s5.email)![col]).toBe('')
    // No cell starts a formula.
    for (const r of rows)
      for (const cell of r) if (/^[=+@\t\r]/.test(cell)) throw new Error(`cell ${cell} starts a formula`)

    const a = await taA.agent.get(`${R()}/gradebook.csv`)
    const aRows = Papa.parse<string[]>(a.text.replace(/^\uFEFF/, ''), { skipEmptyLines: true }).data.slice(1)
    expect(aRows.map((r) => r[0]).sort()).toEqual([S.s1.email, S.s3.email, S.s5.email].sort())
  })
})

describe('releasing grades', () => {
  const release = (c: Client, moduleId: number) =>
    c.agent.post(`${R()}/gradebook/modules/${moduleId}/release`).set('x-csrf-token', c.csrf)

  it('a draft cannot be released; a module of another course does not exist; only the instructor releases', async () => {
    const res = await release(inst, draft.id)
    expect(res.status).toBe(409)
    expect(res.body.error.code).toBe('module_draft')
    expect(res.body.error.message).toContain('being prepared')
    expect((await release(inst, 999_999_999)).status).toBe(404)
    expect((await release(taA, m1.id)).status).toBe(403)
    expect((await release(S.s1.c!, m1.id)).status).toBe(403)
    const [row] = await ctx.handle.db
      .select({ at: modules.gradesReleasedAt })
      .from(modules)
      .where(eq(modules.id, draft.id))
    expect(row!.at).toBeNull()
  })

  it('when-final results stay hidden until the marks are made final, then every student gets one e-mail, and a repeat sends nothing', async () => {
    const s2 = S.s2.c!
    const before = await s2.agent.get(`${R()}/submissions/${counted[S.s2.email]!.id}`).expect(200)
    expect(before.body.resultsVisible).toBe(false)
    expect(before.body.score).toBeNull()
    expect(before.body.checks).toEqual([])
    const mineBefore = (await s2.agent.get(`${R()}/my-grades`).expect(200)).body as MyGrades
    expect(mineBefore.rows.find((r) => r.moduleId === m1.id)).toMatchObject({ state: 'hidden', points: null })

    const first = await release(inst, m1.id)
    expect(first.status).toBe(200)
    expect(first.body.emailed).toBe(5)
    expect(first.body.releasedAt).toEqual(expect.any(String))
    const again = await release(inst, m1.id)
    expect(again.status).toBe(200)
    expect(again.body).toEqual({ moduleId: m1.id, releasedAt: first.body.releasedAt, emailed: 0 })

    const after = await s2.agent.get(`${R()}/submissions/${counted[S.s2.email]!.id}`).expect(200)
    expect(after.body.resultsVisible).toBe(true)
    expect(after.body.score).toBe(counted[S.s2.email]!.points)
    expect(after.body.checks.length).toBeGreaterThan(0)
    const mine = (await s2.agent.get(`${R()}/my-grades`).expect(200)).body as MyGrades
    expect(mine.rows.find((r) => r.moduleId === m1.id)).toMatchObject({
      state: 'released',
      points: counted[S.s2.email]!.points,
      submissionId: counted[S.s2.email]!.id,
    })
    expect((await book(inst)).modules.find((m) => m.id === m1.id)!.releasedAt).toBe(first.body.releasedAt)

    // Withdrawn (no mail) and released again: still nobody is mailed twice.
    const off = await inst.agent.delete(`${R()}/gradebook/modules/${m1.id}/release`).set('x-csrf-token', inst.csrf)
    expect(off.status).toBe(200)
    expect(off.body.releasedAt).toBeNull()
    expect((await s2.agent.get(`${R()}/submissions/${counted[S.s2.email]!.id}`).expect(200)).body.resultsVisible).toBe(
      false,
    )
    const re = await release(inst, m1.id)
    expect(re.status).toBe(200)
    expect(re.body.emailed).toBe(0)

    await drainMail()
    const all = await waitForMail((mails) =>
      Object.values(S).every((s) => mails.some((m) => m.subject.includes(M1_TITLE) && m.to[0]?.address === s.email)),
    )
    const released = all.filter((m) => m.subject.includes(M1_TITLE) && m.subject.includes('marks are final'))
    for (const s of Object.values(S))
      expect(
        released.filter((m) => m.to[0]?.address === s.email),
        s.email,
      ).toHaveLength(1)
    expect(released).toHaveLength(5)
    const toS2 = released.find((m) => m.to[0]?.address === S.s2.email)!
    expect(toS2.text).toContain(`/c/${fx.courseSlug}/hand-ins/${counted[S.s2.email]!.id}`)
    const toS5 = released.find((m) => m.to[0]?.address === S.s5.email)!
    expect(toS5.text).toContain(`/c/${fx.courseSlug}/my-marks`)
  })
})

describe('my grades', () => {
  it('shows every module with its state and counted score; staff are sent to the gradebook', async () => {
    const s3 = (await S.s3.c!.agent.get(`${R()}/my-grades`).expect(200)).body as MyGrades
    expect(s3.rows.map((r) => r.moduleId)).toEqual([m1.id, m2.id, m3.id])
    expect(s3.rows.find((r) => r.moduleId === m2.id)).toMatchObject({
      state: 'provisional',
      submissionId: m2Counted.id,
      points: m2Counted.points,
      maxScore: m2Counted.max,
    })
    expect(s3.rows.find((r) => r.moduleId === m3.id)).toMatchObject({
      state: 'not-handed-in',
      submissionId: null,
      points: null,
    })
    const s5 = (await S.s5.c!.agent.get(`${R()}/my-grades`).expect(200)).body as MyGrades
    expect(s5.rows.every((r) => r.state === 'not-handed-in')).toBe(true)
    expect(s5.totalPercent).toBe(0)
    const res = await inst.agent.get(`${R()}/my-grades`)
    expect(res.status).toBe(403)
    expect((await taA.agent.get(`${R()}/my-grades`)).status).toBe(403)
  })
})

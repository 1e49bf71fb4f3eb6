import { readFileSync } from 'node:fs'
import { and, count, eq, inArray } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { RolloverPlan, RolloverRequest, RolloverResult } from '../../shared/schemas/course-rollover'
import { courses, enrollments, labGroups, moduleVersions, modules, sections, submissions } from '../../server/db/schema'
import type { Client, Fixture, TestContext } from '../helpers/app'
import { anonymous, seedFixture, signedInAs, startTestApp, uniq } from '../helpers/app'
import { coldFlowCsv, coldFlowPayload } from '../helpers/cold-flow'
import type { CreatedModule } from '../helpers/modules'
import { createModuleAs, moduleSource, publishAs } from '../helpers/modules'
import { insertModuleWithVersion, markPublished } from '../../server/repositories/modules'
import { toVersion } from '../../server/services/module-service'

let ctx: TestContext
let fx: Fixture
let inst: Client
let ta: Client
let student: Client
let outsider: Client
let coldFlow: CreatedModule

const C = () => `/api/courses/${fx.courseId}`
// The demo cold-flow sheet: due 2027-02-23T17:00 and late limit 2027-02-26T17:00 (America/Denver).
const COLD_FLOW = readFileSync(new URL('../../content/02-cold-flow-characterisation.md', import.meta.url), 'utf8')

const request = (over: Partial<RolloverRequest> = {}): RolloverRequest => ({
  code: `R${uniq()}`,
  title: 'Propulsion lab, next term',
  term: 'Autumn 2027',
  startDate: '2027-08-30',
  shiftWeeks: 27,
  copyTas: true,
  ...over,
})
const post = (c: Client, path: '/rollover' | '/rollover/preview', body: object) =>
  c.agent.post(`${C()}${path}`).set('x-csrf-token', c.csrf).send(body)

/** Rows in the tables a roll-over writes, to show that a refused one wrote nothing. */
async function tableCounts() {
  const db = ctx.handle.db
  const n = async (t: typeof courses | typeof sections | typeof labGroups | typeof modules | typeof enrollments) =>
    (await db.select({ n: count() }).from(t))[0]!.n
  return {
    courses: await n(courses),
    sections: await n(sections),
    labGroups: await n(labGroups),
    modules: await n(modules),
    enrollments: await n(enrollments),
  }
}

beforeAll(async () => {
  ctx = startTestApp()
  fx = await seedFixture(ctx)
  inst = await signedInAs(ctx, fx.instructor.email)
  ta = await signedInAs(ctx, fx.ta.email)
  student = await signedInAs(ctx, fx.student.email)
  outsider = await signedInAs(ctx, fx.outsider.email)
  const db = ctx.handle.db
  await db.update(sections).set({ meets: 'Tue 13:00–16:00, Bay 2' }).where(eq(sections.id, fx.sectionA))

  // Issued, then edited: the copy must come from the issued version 1, not the draft version 2.
  coldFlow = await createModuleAs(inst, fx.courseId, COLD_FLOW)
  await publishAs(inst, fx.courseId, coldFlow)
  const saved = await inst.agent
    .put(`${C()}/modules/${coldFlow.id}`)
    .set('x-csrf-token', inst.csrf)
    .send({
      source: COLD_FLOW.replace(/^title: .*$/m, 'title: Unissued edit of cold flow'),
      baseVersionId: coldFlow.versionId,
    })
  expect(saved.status).toBe(200)
  await db.update(modules).set({ weight: 2.5 }).where(eq(modules.id, coldFlow.id))
  // Never issued: not copied.
  await createModuleAs(inst, fx.courseId, moduleSource('Draft never issued'))

  // A hand-in by the fixture student's lab group: it stays behind.
  const log = coldFlowCsv()
  const handIn = await student.agent
    .post(`${C()}/modules/${coldFlow.id}/submissions`)
    .set('x-csrf-token', student.csrf)
    .field('payload', JSON.stringify(coldFlowPayload(log)))
    .attach('table:run', Buffer.from(log.csv), 'run.csv')
  expect(handIn.status).toBe(201)
})
afterAll(async () => {
  await ctx.close()
})

describe('roll-over preview', () => {
  it('lists what would be created, with due dates moved by whole weeks, and writes nothing', async () => {
    const before = await tableCounts()
    const body = request()
    const res = await post(inst, '/rollover/preview', body)
    expect(res.status).toBe(200)
    const plan = res.body as RolloverPlan
    expect(plan.course).toMatchObject({
      code: body.code,
      term: 'Autumn 2027',
      institution: 'Test University (fictional)',
    })
    expect(plan.sheets).toHaveLength(1)
    // 27 weeks after Tue 2027-02-23 is Tue 2027-08-31 (and 2027-02-26 → 2027-09-03), same wall-clock time.
    expect(plan.sheets[0]).toMatchObject({
      slug: coldFlow.slug,
      title: 'Cold-flow characterisation of a converging–diverging nozzle',
      fromVersion: 1,
      weight: 2.5,
      oldDue: '2027-02-23T17:00',
      newDue: '2027-08-31T17:00',
      oldAcceptUntil: '2027-02-26T17:00',
      newAcceptUntil: '2027-09-03T17:00',
      timeZone: 'America/Denver',
      problems: [],
    })
    expect(plan.skippedSheets.map((s) => s.title)).toEqual(['Draft never issued'])
    expect(plan.sections).toEqual([
      { name: 'A', meets: 'Tue 13:00–16:00, Bay 2' },
      { name: 'B', meets: '' },
    ])
    expect(plan.labGroups).toEqual([{ name: 'G1', section: 'A' }])
    expect(plan.tas).toEqual([{ name: expect.any(String), email: fx.ta.email, section: 'A' }])
    expect(await tableCounts()).toEqual(before)
    const [made] = await ctx.handle.db.select({ n: count() }).from(courses).where(eq(courses.code, body.code))
    expect(made!.n).toBe(0)
  })

  it('points out a moved due date that falls before the new term starts, and lists no TAs unless asked', async () => {
    const res = await post(
      inst,
      '/rollover/preview',
      request({ shiftWeeks: 0, startDate: '2027-08-30', copyTas: false }),
    )
    expect(res.status).toBe(200)
    const plan = res.body as RolloverPlan
    expect(plan.sheets[0]!.newDue).toBe('2027-02-23T17:00')
    expect(plan.sheets[0]!.problems.join(' ')).toMatch(/before the new term starts \(2027-08-30\)/)
    expect(plan.tas).toEqual([])
  })
})

describe('roll-over confirm', () => {
  it('creates the new course: sheets being prepared with moved dates, sections, empty groups, weights, TAs; no students or hand-ins', async () => {
    const body = request()
    const res = await post(inst, '/rollover', body)
    expect(res.status).toBe(201)
    const result = res.body as RolloverResult
    const db = ctx.handle.db
    const newId = result.courseId
    expect(result.slug).toBe(`${body.code.toLowerCase()}-autumn-2027`)

    const [course] = await db.select().from(courses).where(eq(courses.id, newId))
    expect(course).toMatchObject({ code: body.code, term: 'Autumn 2027', title: body.title, timeZone: 'UTC' })

    const people = await db
      .select({
        userId: enrollments.userId,
        role: enrollments.role,
        sectionId: enrollments.sectionId,
        labGroupId: enrollments.labGroupId,
      })
      .from(enrollments)
      .where(eq(enrollments.courseId, newId))
    const newSections = await db.select().from(sections).where(eq(sections.courseId, newId))
    const sectionA = newSections.find((s) => s.name === 'A')!
    expect(newSections.map((s) => [s.name, s.meets]).sort()).toEqual([
      ['A', 'Tue 13:00–16:00, Bay 2'],
      ['B', ''],
    ])
    expect(people.sort((a, b) => a.role.localeCompare(b.role))).toEqual([
      { userId: fx.instructor.id, role: 'instructor', sectionId: null, labGroupId: null },
      { userId: fx.ta.id, role: 'ta', sectionId: sectionA.id, labGroupId: null },
    ])
    const groups = await db.select().from(labGroups).where(eq(labGroups.courseId, newId))
    expect(groups.map((g) => [g.name, g.sectionId])).toEqual([['G1', sectionA.id]])

    const mods = await db.select().from(modules).where(eq(modules.courseId, newId))
    expect(mods).toHaveLength(1)
    const m = mods[0]!
    expect(m).toMatchObject({ slug: coldFlow.slug, status: 'draft', publishedVersionId: null, weight: 2.5 })
    const versions = await db.select().from(moduleVersions).where(eq(moduleVersions.moduleId, m.id))
    expect(versions).toHaveLength(1)
    const v = versions[0]!
    expect(v).toMatchObject({ number: 1, status: 'draft', valid: true, id: m.currentVersionId })
    expect(v.title).toBe('Cold-flow characterisation of a converging–diverging nozzle')
    expect(v.source).toContain('  at: 2027-08-31T17:00\n  timeZone: America/Denver')
    expect(v.source).toContain('  acceptUntil: 2027-09-03T17:00\n  penaltyPerDay: 0.1')
    expect(v.source).toContain('\nattempts: 3\n')
    // 17:00 in Denver on 31 August 2027 is daylight time (UTC−6).
    expect(v.dueAt?.toISOString()).toBe('2027-08-31T23:00:00.000Z')
    // Everything else of the sheet is as issued: only the two dates differ.
    const changed = COLD_FLOW.split('\n').filter((line, i) => line !== v.source.split('\n')[i])
    expect(changed).toEqual(['  at: 2027-02-23T17:00', '  acceptUntil: 2027-02-26T17:00'])

    const [handIns] = await db
      .select({ n: count() })
      .from(submissions)
      .where(inArray(submissions.moduleId, [m.id]))
    expect(handIns!.n).toBe(0)

    // The instructor opens the new course and sees the sheet being prepared with its moved due date.
    const list = await inst.agent.get(`/api/courses/${newId}/modules`)
    expect(list.status).toBe(200)
    expect(list.body).toEqual([
      expect.objectContaining({ slug: coldFlow.slug, status: 'draft', dueAt: '2027-08-31T23:00:00.000Z' }),
    ])
    // The old course keeps its own sheet, issued, and the hand-in.
    const [old] = await db.select().from(modules).where(eq(modules.id, coldFlow.id))
    expect(old!.status).toBe('published')
    const [oldHandIns] = await db.select({ n: count() }).from(submissions).where(eq(submissions.moduleId, coldFlow.id))
    expect(oldHandIns!.n).toBe(1)
    // The students stay behind: they cannot see the new course.
    expect((await student.agent.get(`/api/courses/${newId}`)).status).toBe(404)
  })

  it('refuses a code and term that exist already (409 naming them), in any case, and writes nothing', async () => {
    const body = request()
    expect((await post(inst, '/rollover', body)).status).toBe(201)
    const before = await tableCounts()
    const again = await post(inst, '/rollover', { ...body, title: 'Another title' })
    expect(again.status).toBe(409)
    expect(again.body.error.code).toBe('course_exists')
    expect(again.body.error.message).toContain(body.code)
    expect(again.body.error.message).toContain('Autumn 2027')
    const lower = await post(inst, '/rollover', { ...body, code: body.code.toLowerCase(), term: 'autumn 2027' })
    expect(lower.status).toBe(409)
    expect((await post(inst, '/rollover/preview', body)).status).toBe(409)
    // The course it starts from is taken too.
    const [self] = await ctx.handle.db.select().from(courses).where(eq(courses.id, fx.courseId))
    expect((await post(inst, '/rollover', { ...body, code: self!.code, term: self!.term })).status).toBe(409)
    expect(await tableCounts()).toEqual(before)
  })

  it('leaves the TAs behind unless asked', async () => {
    const res = await post(inst, '/rollover', request({ copyTas: false }))
    expect(res.status).toBe(201)
    const roles = await ctx.handle.db
      .select({ role: enrollments.role })
      .from(enrollments)
      .where(eq(enrollments.courseId, (res.body as RolloverResult).courseId))
    expect(roles).toEqual([{ role: 'instructor' }])
  })
})

describe('roll-over of a course closed at the end of its term', () => {
  it('starts the next term from it: the closed course is only read', async () => {
    const [{ code }] = (await ctx.handle.db
      .select({ code: courses.code })
      .from(courses)
      .where(eq(courses.id, fx.courseId))) as [{ code: string }]
    const closed = await inst.agent.post(`${C()}/close`).set('x-csrf-token', inst.csrf).send({ confirmCode: code })
    expect(closed.status).toBe(200)
    try {
      // Other writes to the closed course are refused, the roll-over is not.
      const section = await inst.agent.post(`${C()}/sections`).set('x-csrf-token', inst.csrf).send({ name: 'Late' })
      expect(section.status).toBe(409)
      expect((await post(inst, '/rollover/preview', request())).status).toBe(200)
      const res = await post(inst, '/rollover', request())
      expect(res.status).toBe(201)
    } finally {
      const reopened = await inst.agent.post(`${C()}/reopen`).set('x-csrf-token', inst.csrf).send({})
      expect(reopened.status).toBe(200)
    }
  })
})

describe('roll-over refusals', () => {
  it('bad fields are 400 naming the field, and nothing is written', async () => {
    const before = await tableCounts()
    const cases: [object, string][] = [
      [{ ...request(), startDate: '2027-02-30' }, 'startDate'],
      [{ ...request(), startDate: undefined }, 'startDate'],
      [{ ...request(), shiftWeeks: 1.5 }, 'shiftWeeks'],
      [{ ...request(), shiftWeeks: 500 }, 'shiftWeeks'],
      [{ ...request(), code: '' }, 'code'],
      [{ ...request(), term: 'x' }, 'term'],
      [{ ...request(), title: undefined }, 'title'],
    ]
    for (const [body, field] of cases) {
      for (const path of ['/rollover/preview', '/rollover'] as const) {
        const res = await post(inst, path, body)
        expect(res.status, `${path} ${field}`).toBe(400)
        expect(res.body.error.message.startsWith(`${field}: `), res.body.error.message).toBe(true)
      }
    }
    expect(await tableCounts()).toEqual(before)
  })

  it('only the instructor may roll a course over: TA and student 403, outsider 404, signed out 401', async () => {
    const before = await tableCounts()
    const anon = await anonymous(ctx)
    for (const path of ['/rollover/preview', '/rollover'] as const) {
      expect((await post(ta, path, request())).status).toBe(403)
      expect((await post(student, path, request())).status).toBe(403)
      expect((await post(outsider, path, request())).status).toBe(404)
      expect((await post(anon, path, request())).status).toBe(401)
    }
    expect(await tableCounts()).toEqual(before)
    // An instructor of another course cannot start from this one either.
    const [other] = await ctx.handle.db
      .select({ n: count() })
      .from(enrollments)
      .where(and(eq(enrollments.courseId, fx.courseId), eq(enrollments.userId, fx.outsider.id)))
    expect(other!.n).toBe(0)
  })
})

describe('sheets whose dates cannot be moved', () => {
  it('are copied as they are and listed with what to check', async () => {
    // An issued version stored before today's checks: its due date is not a real date.
    const own = await seedFixture(ctx)
    const me = await signedInAs(ctx, own.instructor.email)
    const source = moduleSource('Old sheet').replace('"2027-02-09T17:00"', '"2027-02-30T17:00"')
    const v = toVersion(source, 'old-sheet', 'UTC')
    const m = await insertModuleWithVersion(
      ctx.handle.db,
      { courseId: own.courseId, slug: 'old-sheet', position: 1, createdBy: own.instructor.id },
      v,
    )
    await markPublished(ctx.handle.db, m.moduleId, m.versionId, null, own.instructor.id)
    const res = await me.agent
      .post(`/api/courses/${own.courseId}/rollover`)
      .set('x-csrf-token', me.csrf)
      .send(request())
    expect(res.status).toBe(201)
    const sheet = (res.body as RolloverResult).sheets[0]!
    expect(sheet).toMatchObject({ oldDue: '2027-02-30T17:00', newDue: null })
    expect(sheet.problems.join(' ')).toMatch(/due\.at “2027-02-30T17:00” is not a date .* not moved/)
    expect(sheet.problems.join(' ')).toMatch(/problem.* to fix before it can be issued/)
    const [copy] = await ctx.handle.db
      .select({ source: moduleVersions.source, valid: moduleVersions.valid })
      .from(moduleVersions)
      .innerJoin(modules, eq(modules.currentVersionId, moduleVersions.id))
      .where(eq(modules.courseId, (res.body as RolloverResult).courseId))
    expect(copy).toEqual({ source, valid: false })
  })
})

import { readFileSync } from 'node:fs'
import { and, eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { CourseStructure, ExtensionOverview } from '../../shared/schemas/course-admin'
import type { RosterEntry } from '../../shared/schemas/courses'
import {
  dueExtensions,
  enrollments,
  gradeChanges,
  labGroups,
  sections,
  submissions,
  users,
} from '../../server/db/schema'
import type { Client, Fixture, TestContext } from '../helpers/app'
import { hashPassword } from '../../server/auth/password'
import { PASSWORD, seedFixture, signedInAs, startTestApp, uniq } from '../helpers/app'
import { coldFlowCsv, coldFlowPayload } from '../helpers/cold-flow'
import type { CreatedModule } from '../helpers/modules'
import { createModuleAs, moduleSource, publishAs } from '../helpers/modules'

let ctx: TestContext
let fx: Fixture
/** A second course, to try its ids from the first. */
let other: Fixture
let inst: Client
let ta: Client
let student: Client
let student2: Client

const DAY = 86_400_000
const C = () => `/api/courses/${fx.courseId}`
const send = (c: Client, method: 'post' | 'patch' | 'put' | 'delete', url: string, body?: object) => {
  const req = c.agent[method](`${C()}${url}`).set('x-csrf-token', c.csrf)
  return body === undefined ? req : req.send(body)
}
const structure = async (): Promise<CourseStructure> => (await inst.agent.get(`${C()}/sections`).expect(200)).body
const roster = async (): Promise<RosterEntry[]> => (await inst.agent.get(`${C()}/roster`).expect(200)).body
const placed = async (userId: number) => (await roster()).find((r) => r.userId === userId)
const g1 = async () => (await structure()).labGroups.find((g) => g.name === 'G1')!

/** A local wall-clock time in UTC, to the minute, as the front matter writes it. */
const localUtc = (ms: number) => new Date(ms).toISOString().slice(0, 16)

/**
 * The cold-flow demo module with the dates of a test: due and late limit as given (UTC), ten
 * attempts, 10 % a day off. Handed in by lab group.
 */
function coldFlowDue(dueMs: number, acceptUntilMs: number): string {
  const src = readFileSync(new URL('../../content/02-cold-flow-characterisation.md', import.meta.url), 'utf8')
  const out = src
    .replace(/^due:\n {2}at: .*\n {2}timeZone: .*$/m, `due:\n  at: ${localUtc(dueMs)}\n  timeZone: UTC`)
    .replace(/^ {2}acceptUntil: .*$/m, `  acceptUntil: ${localUtc(acceptUntilMs)}`)
    .replace(/^attempts: 3$/m, 'attempts: 10')
  if (!out.includes('timeZone: UTC') || !out.includes('attempts: 10') || !out.includes(localUtc(acceptUntilMs)))
    throw new Error('the cold-flow module changed shape')
  return out
}

function handIn(c: Client, moduleId: number) {
  const log = coldFlowCsv()
  return c.agent
    .post(`${C()}/modules/${moduleId}/submissions`)
    .set('x-csrf-token', c.csrf)
    .field('payload', JSON.stringify(coldFlowPayload(log)))
    .attach('table:run', Buffer.from(log.csv), 'run.csv')
}

async function publishedModule(source: string): Promise<CreatedModule> {
  const m = await createModuleAs(inst, fx.courseId, source)
  await publishAs(inst, fx.courseId, m)
  return m
}

beforeAll(async () => {
  ctx = startTestApp()
  fx = await seedFixture(ctx)
  other = await seedFixture(ctx)
  inst = await signedInAs(ctx, fx.instructor.email)
  ta = await signedInAs(ctx, fx.ta.email)
  student = await signedInAs(ctx, fx.student.email)
  student2 = await signedInAs(ctx, fx.student2.email)
})
afterAll(async () => {
  await ctx.close()
})

describe('sections', () => {
  it('the instructor creates, renames and deletes a section; TAs read the list', async () => {
    const name = `Sec ${uniq()}`
    const created = await send(inst, 'post', '/sections', { name, meets: 'Tue 13:00–16:00, Bay 2' })
    expect(created.status).toBe(201)
    const s = (created.body as CourseStructure).sections.find((x) => x.name === name)!
    expect(s).toMatchObject({ meets: 'Tue 13:00–16:00, Bay 2', studentCount: 0, tas: [], labGroupCount: 0 })

    const renamed = await send(inst, 'patch', `/sections/${s.id}`, { name: `${name} (Thu)`, meets: 'Thu 08:00, Bay 1' })
    expect(renamed.status).toBe(200)
    expect((renamed.body as CourseStructure).sections.find((x) => x.id === s.id)).toMatchObject({
      name: `${name} (Thu)`,
      meets: 'Thu 08:00, Bay 1',
    })

    const read = await ta.agent.get(`${C()}/sections`).expect(200)
    expect((read.body as CourseStructure).sections.map((x) => x.id)).toContain(s.id)

    const gone = await send(inst, 'delete', `/sections/${s.id}`)
    expect(gone.status).toBe(200)
    expect((await structure()).sections.map((x) => x.id)).not.toContain(s.id)
  })

  it('refuses a name already used in the course (in any letter case) and keeps both sections as they were', async () => {
    const before = await structure()
    const dup = await send(inst, 'post', '/sections', { name: 'a' })
    expect(dup.status).toBe(409)
    expect(dup.body.error.code).toBe('section_exists')
    expect(dup.body.error.message).toContain('“a”')
    expect(dup.body.error.details).toEqual({ field: 'name' })
    const rename = await send(inst, 'patch', `/sections/${fx.sectionB}`, { name: 'A' })
    expect(rename.status).toBe(409)
    expect(await structure()).toEqual(before)
  })

  it('names the field of bad input', async () => {
    const empty = await send(inst, 'post', '/sections', { name: '   ' })
    expect(empty.status).toBe(400)
    expect(empty.body.error.message).toMatch(/^name: /)
    const long = await send(inst, 'post', '/sections', { name: 'x'.repeat(61) })
    expect(long.status).toBe(400)
    expect(long.body.error.message).toContain('name: at most 60')
    const nothing = await send(inst, 'patch', `/sections/${fx.sectionA}`, {})
    expect(nothing.status).toBe(400)
  })

  it('refuses to delete a section that still has students or a TA, and changes nothing', async () => {
    const before = await structure()
    const res = await send(inst, 'delete', `/sections/${fx.sectionA}`)
    expect(res.status).toBe(409)
    expect(res.body.error.code).toBe('section_not_empty')
    expect(res.body.error.message).toMatch(/still has 1 student and 1 TA/)
    expect(await structure()).toEqual(before)
  })

  it('a section of another course does not exist here (404), and nothing changes there', async () => {
    for (const res of [
      await send(inst, 'patch', `/sections/${other.sectionA}`, { name: 'Taken over' }),
      await send(inst, 'delete', `/sections/${other.sectionB}`),
    ]) {
      expect(res.status).toBe(404)
    }
    const rows = await ctx.handle.db
      .select({ name: sections.name })
      .from(sections)
      .where(eq(sections.courseId, other.courseId))
    expect(rows.map((r) => r.name).sort()).toEqual(['A', 'B'])
  })

  it('a TA or a student cannot change sections (403), and nothing is created', async () => {
    const name = `Sec ${uniq()}`
    expect((await send(ta, 'post', '/sections', { name })).status).toBe(403)
    expect((await send(student, 'post', '/sections', { name })).status).toBe(403)
    expect((await structure()).sections.map((s) => s.name)).not.toContain(name)
  })
})

describe('lab groups', () => {
  it('the instructor creates a group tied to a section, renames it, unties it, and deletes it while empty', async () => {
    const name = `Grp ${uniq()}`
    const created = await send(inst, 'post', '/lab-groups', { name, sectionId: fx.sectionB })
    expect(created.status).toBe(201)
    const g = (created.body as CourseStructure).labGroups.find((x) => x.name === name)!
    expect(g).toMatchObject({ sectionId: fx.sectionB, sectionName: 'B', members: [], handInCount: 0 })

    const renamed = await send(inst, 'patch', `/lab-groups/${g.id}`, { name: `${name}b`, sectionId: null })
    expect((renamed.body as CourseStructure).labGroups.find((x) => x.id === g.id)).toMatchObject({
      name: `${name}b`,
      sectionId: null,
    })

    expect((await send(inst, 'delete', `/lab-groups/${g.id}`)).status).toBe(200)
    expect((await structure()).labGroups.map((x) => x.id)).not.toContain(g.id)
  })

  it('refuses a duplicate group name, a section of another course, and a group of another course, changing nothing', async () => {
    const before = await structure()
    const dup = await send(inst, 'post', '/lab-groups', { name: 'g1' })
    expect(dup.status).toBe(409)
    expect(dup.body.error.code).toBe('lab_group_exists')
    const foreignSection = await send(inst, 'post', '/lab-groups', { name: `Grp ${uniq()}`, sectionId: other.sectionA })
    expect(foreignSection.status).toBe(404)
    expect(foreignSection.body.error.message).toContain('section')
    const [otherG1] = await ctx.handle.db
      .select({ id: labGroups.id })
      .from(labGroups)
      .where(eq(labGroups.courseId, other.courseId))
    expect((await send(inst, 'patch', `/lab-groups/${otherG1!.id}`, { name: 'Mine now' })).status).toBe(404)
    expect((await send(inst, 'delete', `/lab-groups/${otherG1!.id}`)).status).toBe(404)
    expect(await structure()).toEqual(before)
    const [still] = await ctx.handle.db
      .select({ name: labGroups.name })
      .from(labGroups)
      .where(eq(labGroups.id, otherG1!.id))
    expect(still!.name).toBe('G1')
  })

  it('refuses to delete a group with members, or to tie it to a section its members are not in', async () => {
    const before = await structure()
    const g = await g1()
    const del = await send(inst, 'delete', `/lab-groups/${g.id}`)
    expect(del.status).toBe(409)
    expect(del.body.error.code).toBe('lab_group_not_empty')
    const tie = await send(inst, 'patch', `/lab-groups/${g.id}`, { sectionId: fx.sectionB })
    expect(tie.status).toBe(409)
    expect(tie.body.error.code).toBe('section_mismatch')
    expect(tie.body.error.message).toContain(`student ${fx.student.email.split('@')[0]!.split('.')[1]}`)
    expect(await structure()).toEqual(before)
  })
})

describe('placing people', () => {
  it('a student moved into a group tied to a section moves to that section; back out to no group', async () => {
    const name = `Grp ${uniq()}`
    const s = (await send(inst, 'post', '/lab-groups', { name, sectionId: fx.sectionA }).expect(201))
      .body as CourseStructure
    const g = s.labGroups.find((x) => x.name === name)!
    expect(await placed(fx.student2.id)).toMatchObject({ sectionId: fx.sectionB, labGroupId: null })

    expect((await send(inst, 'patch', `/roster/${fx.student2.id}`, { labGroupId: g.id })).status).toBe(204)
    expect(await placed(fx.student2.id)).toMatchObject({
      sectionId: fx.sectionA,
      sectionName: 'A',
      labGroupId: g.id,
      labGroupName: name,
    })

    expect(
      (await send(inst, 'patch', `/roster/${fx.student2.id}`, { sectionId: fx.sectionB, labGroupId: null })).status,
    ).toBe(204)
    expect(await placed(fx.student2.id)).toMatchObject({ sectionId: fx.sectionB, labGroupId: null })
    await send(inst, 'delete', `/lab-groups/${g.id}`).expect(200)
  })

  it('refuses a section that contradicts the group’s, and a group of another course, changing nothing', async () => {
    const g = await g1()
    const before = await placed(fx.student2.id)
    const clash = await send(inst, 'patch', `/roster/${fx.student2.id}`, { sectionId: fx.sectionB, labGroupId: g.id })
    expect(clash.status).toBe(409)
    expect(clash.body.error.code).toBe('section_mismatch')
    expect(clash.body.error.message).toContain('“G1” belongs to section “A”')
    // The student in G1 (section A) cannot be put in section B while staying in G1.
    const keepGroup = await send(inst, 'patch', `/roster/${fx.student.id}`, { sectionId: fx.sectionB })
    expect(keepGroup.status).toBe(409)
    const [otherG1] = await ctx.handle.db
      .select({ id: labGroups.id })
      .from(labGroups)
      .where(eq(labGroups.courseId, other.courseId))
    const foreign = await send(inst, 'patch', `/roster/${fx.student2.id}`, { labGroupId: otherG1!.id })
    expect(foreign.status).toBe(404)
    expect(await placed(fx.student2.id)).toEqual(before)
    expect(await placed(fx.student.id)).toMatchObject({ sectionId: fx.sectionA, labGroupId: g.id })
  })

  it('a person of another course is not found here; an instructor has no placement', async () => {
    expect((await send(inst, 'patch', `/roster/${other.student.id}`, { sectionId: fx.sectionA })).status).toBe(404)
    const [row] = await ctx.handle.db
      .select({ sectionId: enrollments.sectionId })
      .from(enrollments)
      .where(and(eq(enrollments.userId, other.student.id), eq(enrollments.courseId, other.courseId)))
    expect(row!.sectionId).toBe(other.sectionA)
    const self = await send(inst, 'patch', `/roster/${fx.instructor.id}`, { sectionId: fx.sectionA })
    expect(self.status).toBe(409)
    expect(self.body.error.code).toBe('not_placeable')
  })

  it('assigns a TA to a section (and to none); a TA is never put in a lab group', async () => {
    expect((await send(inst, 'patch', `/roster/${fx.ta.id}`, { sectionId: fx.sectionB })).status).toBe(204)
    let s = await structure()
    expect(s.sections.find((x) => x.id === fx.sectionB)!.tas.map((t) => t.userId)).toEqual([fx.ta.id])
    expect(s.sections.find((x) => x.id === fx.sectionA)!.tas).toEqual([])
    expect(s.tas.find((t) => t.userId === fx.ta.id)!.sectionId).toBe(fx.sectionB)

    const g = await g1()
    const grouped = await send(inst, 'patch', `/roster/${fx.ta.id}`, { labGroupId: g.id })
    expect(grouped.status).toBe(409)
    expect(grouped.body.error.code).toBe('not_placeable')

    expect((await send(inst, 'patch', `/roster/${fx.ta.id}`, { sectionId: null })).status).toBe(204)
    expect((await structure()).tas.find((t) => t.userId === fx.ta.id)!.sectionId).toBeNull()
    // Back where the fixture had them.
    await send(inst, 'patch', `/roster/${fx.ta.id}`, { sectionId: fx.sectionA }).expect(204)
    s = await structure()
    expect(s.sections.find((x) => x.id === fx.sectionA)!.tas.map((t) => t.userId)).toEqual([fx.ta.id])
  })
})

describe('due-date extensions and lateness', () => {
  it('refuses a module without a due date, a date not after the module’s, and ids of another course, storing nothing', async () => {
    const noDue = await publishedModule(`---\ntitle: Reading ${uniq()}\n---\n\n# Reading\n\nNo due date here.\n`)
    const dated = await publishedModule(moduleSource(`Dated ${uniq()}`))
    // moduleSource's due date: 2027-02-09 17:00 in Denver (MST, UTC−7) = 2027-02-10T00:00Z.
    const url = (m: number, u: number) => `/extensions/${m}/${u}`

    const none = await send(inst, 'put', url(noDue.id, fx.student.id), { dueAt: '2030-01-01T00:00:00Z' })
    expect(none.status).toBe(409)
    expect(none.body.error.code).toBe('no_due_date')

    const same = await send(inst, 'put', url(dated.id, fx.student.id), { dueAt: '2027-02-10T00:00:00Z' })
    expect(same.status).toBe(400)
    expect(same.body.error.code).toBe('extension_not_later')
    expect(same.body.error.message).toMatch(/^dueAt: /)
    const before = await send(inst, 'put', url(dated.id, fx.student.id), { dueAt: '2027-02-01T00:00:00Z' })
    expect(before.status).toBe(400)

    const notADate = await send(inst, 'put', url(dated.id, fx.student.id), { dueAt: 'next Tuesday' })
    expect(notADate.status).toBe(400)
    expect(notADate.body.error.message).toContain('dueAt')
    const tooFar = await send(inst, 'put', url(dated.id, fx.student.id), { dueAt: '2099-01-01T00:00:00Z' })
    expect(tooFar.status).toBe(400)
    expect(tooFar.body.error.message).toContain('dueAt: choose a date before 2038')

    expect((await send(inst, 'put', url(dated.id, other.student.id), { dueAt: '2030-01-01T00:00:00Z' })).status).toBe(
      404,
    )
    const otherInst = await signedInAs(ctx, other.instructor.email)
    const foreignModule = await createModuleAs(otherInst, other.courseId, moduleSource(`Theirs ${uniq()}`))
    expect(
      (await send(inst, 'put', url(foreignModule.id, fx.student.id), { dueAt: '2030-01-01T00:00:00Z' })).status,
    ).toBe(404)
    const toTa = await send(inst, 'put', url(dated.id, fx.ta.id), { dueAt: '2030-01-01T00:00:00Z' })
    expect(toTa.status).toBe(409)

    const stored = await ctx.handle.db.select().from(dueExtensions).where(eq(dueExtensions.moduleId, dated.id))
    expect(stored).toEqual([])
    expect(await ctx.handle.db.select().from(dueExtensions).where(eq(dueExtensions.moduleId, noDue.id))).toEqual([])
  })

  it('grants, changes (one row per student and module) and withdraws an extension', async () => {
    const dated = await publishedModule(moduleSource(`Dated ${uniq()}`))
    const url = `/extensions/${dated.id}/${fx.student.id}`
    const first = await send(inst, 'put', url, { dueAt: '2027-02-12T00:00:00Z', note: 'Test stand down for repair.' })
    expect(first.status).toBe(200)
    const again = await send(inst, 'put', url, { dueAt: '2027-02-13T06:00:00+02:00', note: 'One more day.' })
    expect(again.status).toBe(200)
    const rows = await ctx.handle.db.select().from(dueExtensions).where(eq(dueExtensions.moduleId, dated.id))
    expect(rows).toHaveLength(1)
    expect(rows[0]!.dueAt.toISOString()).toBe('2027-02-13T04:00:00.000Z')
    expect(rows[0]!.note).toBe('One more day.')
    expect(rows[0]!.grantedBy).toBe(fx.instructor.id)

    const overview = (await ta.agent.get(`${C()}/extensions`).expect(200)).body as ExtensionOverview
    expect(overview.modules.find((m) => m.id === dated.id)!.dueAt).toBe('2027-02-10T00:00:00.000Z')
    expect(overview.extensions.filter((x) => x.moduleId === dated.id)).toEqual([
      expect.objectContaining({
        userId: fx.student.id,
        dueAt: '2027-02-13T04:00:00.000Z',
        moduleDueAt: '2027-02-10T00:00:00.000Z',
        note: 'One more day.',
      }),
    ])

    expect((await send(inst, 'delete', url)).status).toBe(200)
    expect(await ctx.handle.db.select().from(dueExtensions).where(eq(dueExtensions.moduleId, dated.id))).toEqual([])
    expect((await send(inst, 'delete', url)).status).toBe(404)
  })

  it('a late hand-in is on time with an extension; days late and the penalty count from the extended date; each member’s own extension counts for a group hand-in', async () => {
    const now = Date.now()
    // Due 2.5 days ago, late hand-ins for 5 more days, 10 % a day.
    const dueMs = Date.parse(`${localUtc(now - 2.5 * DAY)}Z`)
    const m = await publishedModule(coldFlowDue(dueMs, now + 5 * DAY))
    const daysLate = (submittedAt: string, due: number) => Math.ceil((Date.parse(submittedAt) - due) / DAY)

    const plain = await handIn(student, m.id)
    expect(plain.status).toBe(201)
    expect(plain.body.isLate).toBe(true)
    expect(plain.body.daysLate).toBe(daysLate(plain.body.submittedAt, dueMs))
    expect(plain.body.daysLate).toBe(3)
    expect(plain.body.latePenalty).toBeCloseTo(0.3, 12)

    // Extended by 1.2 days: 1.3 days past it, so 2 days late.
    const ext = dueMs + 1.2 * DAY
    await send(inst, 'put', `/extensions/${m.id}/${fx.student.id}`, { dueAt: new Date(ext).toISOString() }).expect(200)
    const later = await handIn(student, m.id)
    expect(later.status).toBe(201)
    expect(later.body.daysLate).toBe(daysLate(later.body.submittedAt, ext))
    expect(later.body.daysLate).toBe(2)
    expect(later.body.latePenalty).toBeCloseTo(0.2, 12)
    // The penalty is applied to the score the checks gave (same data as the first hand-in).
    expect(later.body.score).toBeCloseTo(later.body.rawScore * 0.8, 5)

    // Extended past now: on time, no penalty, and the student sees their own due date.
    const ext2 = now + DAY
    await send(inst, 'put', `/extensions/${m.id}/${fx.student.id}`, { dueAt: new Date(ext2).toISOString() }).expect(200)
    const mine = (await student.agent.get(`${C()}/modules/${m.id}/submissions/mine`).expect(200)).body
    expect(mine.dueAt).toBe(new Date(ext2).toISOString())
    expect(mine.dueExtended).toBe(true)
    const onTime = await handIn(student, m.id)
    expect(onTime.status).toBe(201)
    expect(onTime.body).toMatchObject({ isLate: false, daysLate: 0, latePenalty: 0 })
    expect(onTime.body.score).toBe(onTime.body.rawScore)
    // Stored as answered.
    const [row] = await ctx.handle.db.select().from(submissions).where(eq(submissions.id, onTime.body.id))
    expect(row).toMatchObject({ isLate: false, daysLate: 0, latePenalty: 0 })

    // A partner in the same group without an extension hands in late: the submitter's own extension counts.
    const g = await g1()
    await send(inst, 'patch', `/roster/${fx.student2.id}`, { labGroupId: g.id }).expect(204)
    const partnerMine = (await student2.agent.get(`${C()}/modules/${m.id}/submissions/mine`).expect(200)).body
    expect(partnerMine.dueAt).toBe(new Date(dueMs).toISOString())
    expect(partnerMine.dueExtended).toBe(false)
    const partner = await handIn(student2, m.id)
    expect(partner.status).toBe(201)
    expect(partner.body.isLate).toBe(true)
    expect(partner.body.daysLate).toBe(daysLate(partner.body.submittedAt, dueMs))
    await send(inst, 'patch', `/roster/${fx.student2.id}`, { sectionId: fx.sectionB, labGroupId: null }).expect(204)
    // The partner's hand-in keeps the group it was made for.
    const [kept] = await ctx.handle.db.select().from(submissions).where(eq(submissions.id, partner.body.id))
    expect(kept!.labGroupId).toBe(g.id)
    // A group with hand-ins is not deleted.
    const del = await send(inst, 'delete', `/lab-groups/${g.id}`)
    expect(del.status).toBe(409)
  })

  it('the late-acceptance limit moves with the extension', async () => {
    const now = Date.now()
    // Due three days ago; late hand-ins closed an hour ago.
    const dueMs = Date.parse(`${localUtc(now - 3 * DAY)}Z`)
    const m = await publishedModule(coldFlowDue(dueMs, now - 3_600_000))
    const refused = await handIn(student, m.id)
    expect(refused.status).toBe(409)
    expect(refused.body.error.code).toBe('past_late_limit')
    expect(await ctx.handle.db.select().from(submissions).where(eq(submissions.moduleId, m.id))).toEqual([])

    // Two and a half more days (half a day ago): the late window now closes 2.5 days after the hour just passed.
    const ext = dueMs + 2.5 * DAY
    await send(inst, 'put', `/extensions/${m.id}/${fx.student.id}`, { dueAt: new Date(ext).toISOString() }).expect(200)
    const res = await handIn(student, m.id)
    expect(res.status).toBe(201)
    expect(res.body.isLate).toBe(true)
    expect(res.body.daysLate).toBe(Math.ceil((Date.parse(res.body.submittedAt) - ext) / DAY))
    expect(res.body.daysLate).toBe(1)
  })
})

describe('removing someone from the course', () => {
  it('refuses to remove the only instructor, or an instructor removing themself; another instructor can be removed', async () => {
    const last = await send(inst, 'delete', `/roster/${fx.instructor.id}`)
    expect(last.status).toBe(409)
    expect(last.body.error.code).toBe('last_instructor')
    const tag = uniq()
    const [u] = await ctx.handle.db
      .insert(users)
      .values({ email: `co.${tag}@test.example`, displayName: `Co-instructor ${tag}` })
      .$returningId()
    await ctx.handle.db.insert(enrollments).values({ userId: u!.id, courseId: fx.courseId, role: 'instructor' })
    const self = await send(inst, 'delete', `/roster/${fx.instructor.id}`)
    expect(self.status).toBe(409)
    expect(self.body.error.code).toBe('cannot_remove_self')
    expect((await roster()).filter((r) => r.role === 'instructor')).toHaveLength(2)
    expect((await send(inst, 'delete', `/roster/${u!.id}`)).status).toBe(204)
    expect((await roster()).filter((r) => r.role === 'instructor').map((r) => r.userId)).toEqual([fx.instructor.id])
  })

  it('a person of another course is not found, and stays enrolled there', async () => {
    expect((await send(inst, 'delete', `/roster/${other.student.id}`)).status).toBe(404)
    const rows = await ctx.handle.db
      .select()
      .from(enrollments)
      .where(and(eq(enrollments.userId, other.student.id), eq(enrollments.courseId, other.courseId)))
    expect(rows).toHaveLength(1)
  })

  it('removes the enrollment only: submissions, grades and audit rows stay, and the person loses access', async () => {
    // A fresh student with one graded, overridden hand-in.
    const tag = uniq()
    const email = `leaver.${tag}@test.example`
    const [u] = await ctx.handle.db
      .insert(users)
      .values({ email, displayName: `Leaver ${tag}`, passwordHash: await hashPassword(PASSWORD) })
      .$returningId()
    const leaverId = u!.id
    await ctx.handle.db
      .insert(enrollments)
      .values({ userId: leaverId, courseId: fx.courseId, role: 'student', sectionId: fx.sectionA })
    const leaver = await signedInAs(ctx, email)
    const m = await publishedModule(
      coldFlowDue(Date.now() + 7 * DAY, Date.now() + 9 * DAY).replace(
        'groupSubmission: true',
        'groupSubmission: false',
      ),
    )
    const sub = await handIn(leaver, m.id)
    expect(sub.status).toBe(201)
    const extras = await inst.agent.get(`${C()}/submissions/${sub.body.id}/review`).expect(200)
    await inst.agent
      .post(`${C()}/submissions/${sub.body.id}/overrides`)
      .set('x-csrf-token', inst.csrf)
      .send({
        checkId: null,
        points: 9,
        reason: 'Checked the log by hand before the student left.',
        revision: extras.body.revision,
      })
      .expect(200)
    await send(inst, 'put', `/extensions/${m.id}/${leaverId}`, {
      dueAt: new Date(Date.now() + 8 * DAY).toISOString(),
    }).expect(200)

    const res = await send(inst, 'delete', `/roster/${leaverId}`)
    expect(res.status).toBe(204)

    expect((await roster()).map((r) => r.userId)).not.toContain(leaverId)
    const [kept] = await ctx.handle.db.select().from(submissions).where(eq(submissions.id, sub.body.id))
    expect(kept).toMatchObject({ userId: leaverId, status: 'graded', scoreOverride: 9 })
    expect(
      await ctx.handle.db.select().from(gradeChanges).where(eq(gradeChanges.submissionId, sub.body.id)),
    ).toHaveLength(1)
    // The instructor still reads the hand-in.
    await inst.agent.get(`${C()}/submissions/${sub.body.id}`).expect(200)
    // Extensions of people no longer enrolled are not listed.
    const overview = (await inst.agent.get(`${C()}/extensions`).expect(200)).body as ExtensionOverview
    expect(overview.extensions.map((x) => x.userId)).not.toContain(leaverId)

    // The removed student no longer sees the course or their hand-in in it.
    expect((await leaver.agent.get(C())).status).toBe(404)
    expect((await leaver.agent.get(`${C()}/submissions/${sub.body.id}`)).status).toBe(404)
    expect((await leaver.agent.get('/api/courses').expect(200)).body).toEqual([])
    // Removing them again: not found.
    expect((await send(inst, 'delete', `/roster/${leaverId}`)).status).toBe(404)
  })
})

import { readFileSync } from 'node:fs'
import { and, eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { currentDueDates } from '../../scripts/demo/seed-demo'
import { hashPassword } from '../../server/auth/password'
import { enrollments, labGroups, recheckRequests, submissions, users } from '../../server/db/schema'
import { createLogger } from '../../server/logger'
import { DEFAULT_OUTBOX_OPTIONS, drainOnce } from '../../server/mail/outbox-worker'
import { createSmtpSender } from '../../server/mail/transport'
import type { MyGrades, RecheckStatus } from '../../shared/schemas/grades'
import type { ReviewPage } from '../../shared/schemas/review'
import type { Client, Fixture, TestContext } from '../helpers/app'
import { PASSWORD, seedFixture, signedInAs, startTestApp, uniq } from '../helpers/app'
import { coldFlowCsv, coldFlowPayload } from '../helpers/cold-flow'
import { waitForMail } from '../helpers/maildev'
import type { CreatedModule } from '../helpers/modules'
import { createModuleAs, publishAs } from '../helpers/modules'

const COLD = currentDueDates(
  readFileSync(new URL('../../content/02-cold-flow-characterisation.md', import.meta.url), 'utf8'),
)
const moduleText = (title: string, group: boolean) =>
  COLD.replace(/^title: .*$/m, `title: ${title}`)
    // The older name of `results: when-final`, still read so that modules written with it load.
    .replace('results: immediately', 'results: after-release')
    .replace('groupSubmission: true', `groupSubmission: ${group}`)

let ctx: TestContext
let fx: Fixture
let inst: Client
let ta: Client
let taB: Client
let student: Client
let student2: Client
let partner: Client
let partnerEmail: string
let solo: CreatedModule
let group: CreatedModule
let soloSub: number
let groupSub: number
const tag = uniq()
const R = () => `/api/courses/${fx.courseId}`
const recheck = (c: Client, id: number, body: unknown) =>
  c.agent
    .post(`${R()}/submissions/${id}/recheck`)
    .set('x-csrf-token', c.csrf)
    .send(body as object)

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

async function addPerson(role: 'student' | 'ta', sectionId: number, labGroupId: number | null) {
  const email = `${role}.${uniq()}@test.example`
  const [row] = await ctx.handle.db
    .insert(users)
    .values({ email, displayName: `${role} ${tag}`, passwordHash: await hashPassword(PASSWORD) })
    .$returningId()
  await ctx.handle.db
    .insert(enrollments)
    .values({ userId: row!.id, courseId: fx.courseId, role, sectionId, labGroupId })
  return email
}

const release = (moduleId: number) =>
  inst.agent.post(`${R()}/gradebook/modules/${moduleId}/release`).set('x-csrf-token', inst.csrf).expect(200)

beforeAll(async () => {
  ctx = startTestApp()
  fx = await seedFixture(ctx)
  inst = await signedInAs(ctx, fx.instructor.email)
  ta = await signedInAs(ctx, fx.ta.email)
  student = await signedInAs(ctx, fx.student.email)
  student2 = await signedInAs(ctx, fx.student2.email)
  const [g] = await ctx.handle.db
    .select({ id: labGroups.id })
    .from(labGroups)
    .where(and(eq(labGroups.courseId, fx.courseId), eq(labGroups.name, 'G1')))
  partnerEmail = await addPerson('student', fx.sectionA, g!.id)
  partner = await signedInAs(ctx, partnerEmail)
  taB = await signedInAs(ctx, await addPerson('ta', fx.sectionB, null))
  solo = await createModuleAs(inst, fx.courseId, moduleText(`Recheck solo ${tag}`, false))
  await publishAs(inst, fx.courseId, solo)
  group = await createModuleAs(inst, fx.courseId, moduleText(`Recheck group ${tag}`, true))
  await publishAs(inst, fx.courseId, group)
  soloSub = await handIn(student, solo.id)
  groupSub = await handIn(student, group.id)
}, 120_000)
afterAll(async () => {
  await ctx.close()
})

const openCount = async (submissionId: number) =>
  (
    await ctx.handle.db
      .select()
      .from(recheckRequests)
      .where(and(eq(recheckRequests.submissionId, submissionId), eq(recheckRequests.status, 'open')))
  ).length

describe('asking for a re-check', () => {
  it('is refused before the grades are released (409), and the student is told why', async () => {
    const status = (await student.agent.get(`${R()}/submissions/${soloSub}/recheck`).expect(200)).body as RecheckStatus
    expect(status.canRequest).toBe(false)
    expect(status.reason).toContain('final')
    const res = await recheck(student, soloSub, { message: 'Please look at my impulse again.' })
    expect(res.status).toBe(409)
    expect(res.body.error.code).toBe('not_released')
    expect(await openCount(soloSub)).toBe(0)
  })

  it('checks the message, refuses someone else’s hand-in (404) and staff (403)', async () => {
    await release(solo.id)
    const long = await recheck(student, soloSub, { message: 'x'.repeat(2001) })
    expect(long.status).toBe(400)
    expect(long.body.error.message).toMatch(/^message: at most 2000/)
    const empty = await recheck(student, soloSub, { message: '   ' })
    expect(empty.status).toBe(400)
    expect(empty.body.error.message).toMatch(/^message: /)
    const missing = await recheck(student, soloSub, {})
    expect(missing.status).toBe(400)
    expect((await recheck(student2, soloSub, { message: 'Not mine, but still.' })).status).toBe(404)
    // A lab-group partner cannot ask on a hand-in of a module handed in one by one.
    expect((await recheck(partner, soloSub, { message: 'My partner’s.' })).status).toBe(404)
    expect((await student2.agent.get(`${R()}/submissions/${soloSub}/recheck`)).status).toBe(404)
    expect((await recheck(inst, soloSub, { message: 'Staff asking.' })).status).toBe(403)
    expect((await recheck(student, 999_999_999, { message: 'No such hand-in.' })).status).toBe(404)
    expect(await openCount(soloSub)).toBe(0)
  })

  it('a released result: one open request at a time; it reaches the review queue under "re-check requested"', async () => {
    const ok = await recheck(student, soloSub, { message: `The impulse check used the wrong window (${tag}).` })
    expect(ok.status).toBe(201)
    const body = ok.body as RecheckStatus
    expect(body.canRequest).toBe(false)
    expect(body.requests).toHaveLength(1)
    expect(body.requests[0]).toMatchObject({
      status: 'open',
      message: `The impulse check used the wrong window (${tag}).`,
      answerHtml: null,
    })
    const dup = await recheck(student, soloSub, { message: 'Again, please.' })
    expect(dup.status).toBe(409)
    expect(dup.body.error.code).toBe('recheck_open')
    expect(await openCount(soloSub)).toBe(1)

    const q = (await inst.agent.get(`${R()}/review?status=all&reason=recheck-requested`).expect(200)).body as ReviewPage
    expect(q.rows.map((r) => r.submissionId)).toEqual([soloSub])
    expect(q.rows[0]!.flagCodes).toContain('recheck-requested')
    const [s] = await ctx.handle.db
      .select({ reviewStatus: submissions.reviewStatus })
      .from(submissions)
      .where(eq(submissions.id, soloSub))
    expect(s!.reviewStatus).toBe('open')
    // The TA of the student's section sees it; the TA of the other section does not.
    const qa = (await ta.agent.get(`${R()}/review?status=all&reason=recheck-requested`).expect(200)).body as ReviewPage
    expect(qa.rows.map((r) => r.submissionId)).toEqual([soloSub])
    const qb = (await taB.agent.get(`${R()}/review?status=all&reason=recheck-requested`).expect(200)).body as ReviewPage
    expect(qb.rows).toEqual([])
    // The student sees the open request on "my marks".
    const mine = (await student.agent.get(`${R()}/my-grades`).expect(200)).body as MyGrades
    expect(mine.rows.find((r) => r.moduleId === solo.id)!.recheck).toMatchObject({ status: 'open' })
  })

  it('staff answer in Markdown (sanitised); the student reads it and gets it by e-mail; a second answer is refused', async () => {
    const status = (await ta.agent.get(`${R()}/submissions/${soloSub}/recheck`).expect(200)).body as RecheckStatus
    const id = status.requests[0]!.id
    const answer = (c: Client, body: unknown) =>
      c.agent
        .post(`${R()}/submissions/${soloSub}/recheck/${id}/answer`)
        .set('x-csrf-token', c.csrf)
        .send(body as object)
    expect((await answer(taB, { answer: 'Not my section.' })).status).toBe(404)
    expect((await answer(student, { answer: 'Answering myself.' })).status).toBe(403)
    const blank = await answer(ta, { answer: '' })
    expect(blank.status).toBe(400)
    expect(blank.body.error.message).toMatch(/^answer: /)
    const text = `Checked the window ${tag}: **the grade stands**. <script>alert(1)</script>`
    const ok = await answer(ta, { answer: text })
    expect(ok.status).toBe(200)
    const r = (ok.body as RecheckStatus).requests[0]!
    expect(r.status).toBe('answered')
    expect(r.answerHtml).toContain('<strong>the grade stands</strong>')
    expect(r.answerHtml).not.toMatch(/<script/i)
    expect(r.answeredBy).toBe(`ta ${fx.ta.email.split('.')[1]!.split('@')[0]}`)
    const again = await answer(inst, { answer: 'A second answer.' })
    expect(again.status).toBe(409)
    expect(again.body.error.code).toBe('recheck_answered')
    expect((await ctx.handle.db.select().from(recheckRequests).where(eq(recheckRequests.id, id)))[0]!.answer).toBe(text)

    const seen = (await student.agent.get(`${R()}/submissions/${soloSub}/recheck`).expect(200)).body as RecheckStatus
    expect(seen.requests[0]!.answerHtml).toContain('the grade stands')
    expect(seen.canRequest).toBe(true)
    expect(
      (await ctx.handle.db.select().from(recheckRequests).where(eq(recheckRequests.submissionId, soloSub))).length,
    ).toBe(1)

    const sender = createSmtpSender(ctx.config)
    try {
      for (let i = 0; i < 20; i++)
        if ((await drainOnce(ctx.handle.db, sender, createLogger('silent'), DEFAULT_OUTBOX_OPTIONS)) === 0) break
    } finally {
      sender.close()
    }
    const mail = await waitForMail((all) =>
      all.some((m) => m.to[0]?.address === fx.student.email && m.subject.includes('re-check request was answered')),
    )
    const mine = mail.filter(
      (m) => m.to[0]?.address === fx.student.email && m.subject.includes('re-check request was answered'),
    )
    expect(mine).toHaveLength(1)
    expect(mine[0]!.text).toContain(`Checked the window ${tag}`)
    expect(mine[0]!.text).toContain(`/c/${fx.courseSlug}/hand-ins/${soloSub}`)
    expect(mine[0]!.html).not.toMatch(/<script/i)
  })

  it('a lab-group partner may ask on the group’s hand-in; someone outside the group may not', async () => {
    await release(group.id)
    expect((await recheck(student2, groupSub, { message: 'Not my group.' })).status).toBe(404)
    const ok = await recheck(partner, groupSub, { message: 'Our peak thrust was read from the wrong column.' })
    expect(ok.status).toBe(201)
    // The group's open request is visible to the member who handed in, and blocks a second one.
    const st = (await student.agent.get(`${R()}/submissions/${groupSub}/recheck`).expect(200)).body as RecheckStatus
    expect(st.requests.map((r) => r.requestedBy)).toEqual([`student ${tag}`])
    expect((await recheck(student, groupSub, { message: 'Me too.' })).status).toBe(409)
  })
})

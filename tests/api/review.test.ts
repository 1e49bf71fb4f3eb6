import { eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { DEFAULT_DEMO_PASSWORD, DEMO_INSTRUCTOR, DEMO_SECTIONS, DEMO_STUDENTS } from '../../scripts/demo/scenario'
import { seedDemo } from '../../scripts/demo/seed-demo'
import { gradeChanges, submissionChecks, submissionFlags, submissions } from '../../server/db/schema'
import type { Client, TestContext } from '../helpers/app'
import { signedInAs, startTestApp } from '../helpers/app'

let ctx: TestContext
let courseId: number
let inst: Client
let taA: Client
let taB: Client
const R = () => `/api/courses/${courseId}`

beforeAll(async () => {
  ctx = startTestApp()
  courseId = (await seedDemo(ctx.handle.db)).courseId
  inst = await signedInAs(ctx, DEMO_INSTRUCTOR.email, DEFAULT_DEMO_PASSWORD)
  taA = await signedInAs(ctx, DEMO_SECTIONS[0].ta.email, DEFAULT_DEMO_PASSWORD)
  taB = await signedInAs(ctx, DEMO_SECTIONS[1].ta.email, DEFAULT_DEMO_PASSWORD)
})
afterAll(async () => {
  await ctx.close()
})

async function firstOpen(c: Client) {
  const q = await c.agent.get(`${R()}/review?status=all&sort=submittedAt&order=asc`).expect(200)
  return q.body
}

describe('review queue', () => {
  it('the instructor sees flagged submissions of every section; each TA only their own', async () => {
    const all = await firstOpen(inst)
    const a = await firstOpen(taA)
    const b = await firstOpen(taB)
    expect(all.total).toBeGreaterThanOrEqual(3)
    expect(a.total + b.total).toBe(all.total)
    expect(a.rows.every((r: { sectionName: string }) => r.sectionName === 'Section A')).toBe(true)
    expect(b.rows.every((r: { sectionName: string }) => r.sectionName === 'Section B')).toBe(true)
    expect(all.rows.flatMap((r: { flagCodes: string[] }) => r.flagCodes)).toContain('thrust-above-ideal')
    const forbidden = await taA.agent.get(`${R()}/review?sectionId=999`)
    expect(forbidden.status).toBe(403)
  })

  it('filters by reason and pages on the server', async () => {
    const byReason = await inst.agent.get(`${R()}/review?status=all&reason=identical-file`).expect(200)
    expect(byReason.body.rows.length).toBeGreaterThan(0)
    expect(byReason.body.rows.every((r: { flagCodes: string[] }) => r.flagCodes.includes('identical-file'))).toBe(true)
    const page = await inst.agent.get(`${R()}/review?status=all&pageSize=1&page=2`).expect(200)
    expect(page.body.rows).toHaveLength(1)
    expect(page.body.page).toBe(2)
    const bad = await inst.agent.get(`${R()}/review?pageSize=1000`)
    expect(bad.status).toBe(400)
    expect(bad.body.error.message).toContain('pageSize')
  })

  it('offers the instructor every section and a TA only their own; the reasons are those that occur, and the section filter narrows the queue', async () => {
    const all = (await inst.agent.get(`${R()}/review?status=all`).expect(200)).body
    expect(all.facets.sections.map((s: { name: string }) => s.name)).toEqual(
      expect.arrayContaining(DEMO_SECTIONS.map((s) => s.name)),
    )
    const a = (await taA.agent.get(`${R()}/review?status=all`).expect(200)).body
    expect(a.facets.sections.map((s: { name: string }) => s.name)).toEqual([DEMO_SECTIONS[0].name])
    // Every reason a row carries is offered, and nothing that no hand-in has (besides a re-check request).
    const codes = new Set(all.facets.reasons.map((r: { code: string }) => r.code))
    for (const r of all.rows as { flagCodes: string[] }[])
      for (const c of r.flagCodes) expect(codes.has(c), c).toBe(true)
    const flagged = new Set(
      (
        await ctx.handle.db
          .select({ code: submissionFlags.code })
          .from(submissionFlags)
          .innerJoin(submissions, eq(submissions.id, submissionFlags.submissionId))
          .where(eq(submissions.courseId, courseId))
      ).map((f) => f.code),
    )
    expect(new Set([...codes].filter((c) => c !== 'recheck-requested'))).toEqual(flagged)
    const sectionB = all.facets.sections.find((s: { name: string }) => s.name === DEMO_SECTIONS[1].name)
    const onlyB = (await inst.agent.get(`${R()}/review?status=all&sectionId=${sectionB.id}`).expect(200)).body
    expect(onlyB.total).toBe((await firstOpen(taB)).total)
    expect(onlyB.rows.every((r: { sectionName: string }) => r.sectionName === DEMO_SECTIONS[1].name)).toBe(true)
  })

  it('an override needs a reason and points within range, is audited, and a stale revision is refused', async () => {
    const { rows } = await firstOpen(taA)
    const id = rows[0].submissionId as number
    const extras = await taA.agent.get(`${R()}/submissions/${id}/review`).expect(200)
    const detail = await taA.agent.get(`${R()}/submissions/${id}`).expect(200)
    const check = (await ctx.handle.db.select().from(submissionChecks).where(eq(submissionChecks.submissionId, id)))[0]!
    const rev = extras.body.revision as number

    const noReason = await taA.agent
      .post(`${R()}/submissions/${id}/overrides`)
      .set('x-csrf-token', taA.csrf)
      .send({ checkId: check.id, points: 0, reason: '', revision: rev })
    expect(noReason.status).toBe(400)
    expect(noReason.body.error.message).toContain('reason')
    const tooMany = await taA.agent
      .post(`${R()}/submissions/${id}/overrides`)
      .set('x-csrf-token', taA.csrf)
      .send({ checkId: check.id, points: check.pointsPossible + 1, reason: 'Checked the log by hand.', revision: rev })
    expect(tooMany.status).toBe(400)
    expect(tooMany.body.error.code).toBe('points_out_of_range')
    const negative = await taA.agent
      .post(`${R()}/submissions/${id}/overrides`)
      .set('x-csrf-token', taA.csrf)
      .send({ checkId: check.id, points: -1, reason: 'Checked the log by hand.', revision: rev })
    expect(negative.status).toBe(400)
    expect(await ctx.handle.db.select().from(gradeChanges).where(eq(gradeChanges.submissionId, id))).toHaveLength(0)

    const ok = await taA.agent.post(`${R()}/submissions/${id}/overrides`).set('x-csrf-token', taA.csrf).send({
      checkId: check.id,
      points: check.pointsPossible,
      reason: 'The load cell was re-zeroed before the run; the value stands.',
      revision: rev,
    })
    expect(ok.status).toBe(200)
    expect(ok.body.revision).toBe(rev + 1)
    expect(ok.body.gradeChanges).toEqual([
      expect.objectContaining({
        target: check.label,
        oldPoints: check.pointsAwarded,
        newPoints: check.pointsPossible,
        changedBy: DEMO_SECTIONS[0].ta.displayName,
      }),
    ])
    const [after] = await ctx.handle.db.select().from(submissions).where(eq(submissions.id, id))
    expect(after!.rawScore).toBeCloseTo(
      (detail.body.rawScore as number) - check.pointsAwarded + check.pointsPossible,
      9,
    )

    // The instructor saved against the old revision: refused, nothing overwritten.
    const stale = await inst.agent
      .post(`${R()}/submissions/${id}/overrides`)
      .set('x-csrf-token', inst.csrf)
      .send({ checkId: check.id, points: 0, reason: 'Second opinion from an old page.', revision: rev })
    expect(stale.status).toBe(409)
    expect(stale.body.error.code).toBe('edit_conflict')
    expect(await ctx.handle.db.select().from(gradeChanges).where(eq(gradeChanges.submissionId, id))).toHaveLength(1)
  })

  it('a TA of another section cannot act on the submission, and a student cannot reach the queue', async () => {
    const { rows } = await firstOpen(taA)
    const id = rows[0].submissionId as number
    const extras = await inst.agent.get(`${R()}/submissions/${id}/review`).expect(200)
    const res = await taB.agent
      .post(`${R()}/submissions/${id}/comments`)
      .set('x-csrf-token', taB.csrf)
      .send({ body: 'Not my section.', revision: extras.body.revision })
    expect(res.status).toBe(404)
    const st = await signedInAs(ctx, DEMO_STUDENTS[0]!.email, DEFAULT_DEMO_PASSWORD)
    expect((await st.agent.get(`${R()}/review`)).status).toBe(403)
    // Nor read its details or its file: another section's submissions do not exist for them.
    const asA = await taA.agent.get(`${R()}/submissions/${id}`).expect(200)
    expect((await taB.agent.get(`${R()}/submissions/${id}`)).status).toBe(404)
    expect((await taB.agent.get(`${R()}/submissions/${id}/files/${asA.body.files[0].id}`)).status).toBe(404)
  })

  it('comments are sanitised Markdown; flags resolve and re-open', async () => {
    const { rows } = await firstOpen(inst)
    const id = rows[0].submissionId as number
    let extras = (await inst.agent.get(`${R()}/submissions/${id}/review`).expect(200)).body
    const c = await inst.agent
      .post(`${R()}/submissions/${id}/comments`)
      .set('x-csrf-token', inst.csrf)
      .send({ body: 'Good run. <script>alert(1)</script> Check $p_0$.', revision: extras.revision })
    expect(c.status).toBe(201)
    const html = c.body.comments.at(-1).html as string
    expect(html).not.toMatch(/<script/i)
    expect(html).toContain('katex')
    extras = c.body
    const detail = await inst.agent.get(`${R()}/submissions/${id}`).expect(200)
    const flag = detail.body.flags[0]
    const resolved = await inst.agent
      .post(`${R()}/submissions/${id}/flags/${flag.id}`)
      .set('x-csrf-token', inst.csrf)
      .send({ action: 'resolve', revision: extras.revision })
    expect(resolved.status).toBe(200)
    const again = await inst.agent.get(`${R()}/submissions/${id}`).expect(200)
    expect(again.body.flags.find((f: { id: number }) => f.id === flag.id).status).toBe('resolved')
    const done = await inst.agent
      .post(`${R()}/submissions/${id}/review-status`)
      .set('x-csrf-token', inst.csrf)
      .send({ status: 'resolved', revision: resolved.body.revision })
    expect(done.status).toBe(200)
    expect(done.body.reviewStatus).toBe('resolved')
    // The student who handed it in reads the comment on their result.
    const who = DEMO_STUDENTS.find((p) => p.displayName === rows[0].submittedBy)!
    const owner = await signedInAs(ctx, who.email, DEFAULT_DEMO_PASSWORD)
    const mine = await owner.agent.get(`${R()}/submissions/${id}`).expect(200)
    expect(mine.body.comments.at(-1).html).toContain('Good run.')
  })
})

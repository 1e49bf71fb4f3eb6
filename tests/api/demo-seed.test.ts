import { and, eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { DEMO_WRONG_RUNS } from '../../scripts/demo/demo-runs'
import { DEFAULT_DEMO_PASSWORD, DEMO_COURSE, DEMO_GROUP_WITHOUT_HAND_IN, DEMO_INSTRUCTOR, DEMO_STUDENT } from '../../scripts/demo/scenario'
import { seedDemo } from '../../scripts/demo/seed-demo'
import { courses, labGroups, modules, submissionFlags, submissions } from '../../server/db/schema'
import type { TestContext } from '../helpers/app'
import { signedInAs, startTestApp } from '../helpers/app'

let ctx: TestContext
let courseId: number

beforeAll(async () => {
  ctx = startTestApp()
  const r = await seedDemo(ctx.handle.db)
  courseId = r.courseId
})
afterAll(async () => {
  await ctx.close()
})

describe('the demo seed', () => {
  it('is idempotent: a second run changes nothing', async () => {
    const again = await seedDemo(ctx.handle.db)
    expect(again.created).toBe(false)
    const found = await ctx.handle.db.select().from(courses).where(and(eq(courses.code, DEMO_COURSE.code), eq(courses.term, DEMO_COURSE.term)))
    expect(found).toHaveLength(1)
  })

  it('publishes the fundamentals and cold-flow modules and leaves the hot-fire module a draft', async () => {
    const rows = await ctx.handle.db.select({ slug: modules.slug, status: modules.status }).from(modules).where(eq(modules.courseId, courseId))
    expect(Object.fromEntries(rows.map((r) => [r.slug, r.status]))).toEqual({
      'nozzle-flow-fundamentals': 'published',
      'cold-flow-characterisation': 'published',
      'hot-fire': 'draft',
    })
  })

  it('hands in one graded cold-flow run per lab group but one, and the wrong-on-purpose runs carry their flags', async () => {
    const rows = await ctx.handle.db
      .select({ id: submissions.id, status: submissions.status, group: labGroups.name, review: submissions.reviewStatus })
      .from(submissions)
      .innerJoin(labGroups, eq(labGroups.id, submissions.labGroupId))
      .where(eq(submissions.courseId, courseId))
    expect(rows).toHaveLength(7)
    expect(rows.every((r) => r.status === 'graded')).toBe(true)
    expect(rows.map((r) => r.group)).not.toContain(`Group ${DEMO_GROUP_WITHOUT_HAND_IN}`)
    for (const wrong of DEMO_WRONG_RUNS) {
      const row = rows.find((r) => r.group === `Group ${wrong.group}`)
      if (!row) continue
      const flags = await ctx.handle.db.select({ code: submissionFlags.code }).from(submissionFlags).where(eq(submissionFlags.submissionId, row.id))
      const codes = flags.map((f) => f.code)
      for (const f of wrong.flags) expect(codes, `${wrong.group} ${f}`).toContain(f)
      if (wrong.copiesGroup) expect(codes, wrong.group).toContain('identical-file')
      // In the queue (other test files may already have worked it).
      expect(row.review).not.toBe('none')
    }
  })

  it('staff see the hand-in count per module; students do not', async () => {
    const inst = await signedInAs(ctx, DEMO_INSTRUCTOR.email, DEFAULT_DEMO_PASSWORD)
    const list = await inst.agent.get(`/api/courses/${courseId}/modules`).expect(200)
    const cold = list.body.find((m: { slug: string }) => m.slug === 'cold-flow-characterisation')
    expect(cold.submissionCount).toBe(7)
    const st = await signedInAs(ctx, DEMO_STUDENT.email, DEFAULT_DEMO_PASSWORD)
    const mine = await st.agent.get(`/api/courses/${courseId}/modules`).expect(200)
    expect(mine.body.every((m: { submissionCount?: number }) => m.submissionCount === undefined)).toBe(true)
  })
})

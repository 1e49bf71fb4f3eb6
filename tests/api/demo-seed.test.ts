import { and, eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { DEMO_WRONG_RUNS } from '../../scripts/demo/demo-runs'
import { HOT_FIRE_STAND, HOT_FIRE_WRONG_RUNS } from '../../scripts/demo/hot-fire-runs'
import {
  DEFAULT_DEMO_PASSWORD,
  DEMO_COURSE,
  DEMO_GROUP_WITHOUT_HAND_IN,
  DEMO_INSTRUCTOR,
  DEMO_STUDENT,
} from '../../scripts/demo/scenario'
import { seedDemo } from '../../scripts/demo/seed-demo'
import {
  courses,
  labGroups,
  moduleVersions,
  modules,
  submissionChecks,
  submissionFlags,
  submissions,
} from '../../server/db/schema'
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
    const found = await ctx.handle.db
      .select()
      .from(courses)
      .where(and(eq(courses.code, DEMO_COURSE.code), eq(courses.institution, DEMO_COURSE.institution)))
    expect(found).toHaveLength(1)
  })

  it('publishes the fundamentals, cold-flow and hot-fire modules', async () => {
    const rows = await ctx.handle.db
      .select({
        slug: modules.slug,
        status: modules.status,
        createdAt: modules.createdAt,
        current: moduleVersions.number,
        vStatus: moduleVersions.status,
        publishedAt: moduleVersions.publishedAt,
      })
      .from(modules)
      .innerJoin(moduleVersions, and(eq(moduleVersions.moduleId, modules.id), eq(moduleVersions.number, 1)))
      .where(eq(modules.courseId, courseId))
    const bySlug = Object.fromEntries(rows.map((r) => [r.slug, r]))
    // The seed makes these three; browser tests that share the demo course may have added sheets of their own.
    const seeded = ['cold-flow-characterisation', 'hot-fire', 'nozzle-flow-fundamentals']
    expect(
      Object.keys(bySlug)
        .filter((slug) => seeded.includes(slug))
        .sort(),
    ).toEqual(seeded)
    // Version 1 of each, published at seed time.
    for (const slug of ['nozzle-flow-fundamentals', 'cold-flow-characterisation', 'hot-fire']) {
      expect(bySlug[slug]!.publishedAt, slug).not.toBeNull()
      expect(bySlug[slug]!.status, slug).toBe('published')
    }
  })

  it('hands in one graded cold-flow run per lab group but one, and the wrong-on-purpose runs carry their flags', async () => {
    const rows = await ctx.handle.db
      .select({
        id: submissions.id,
        status: submissions.status,
        group: labGroups.name,
        review: submissions.reviewStatus,
      })
      .from(submissions)
      .innerJoin(labGroups, eq(labGroups.id, submissions.labGroupId))
      .innerJoin(modules, eq(modules.id, submissions.moduleId))
      .where(and(eq(submissions.courseId, courseId), eq(modules.slug, 'cold-flow-characterisation')))
    // The group left without a seeded hand-in may have one from the browser journey by now.
    const seeded = rows.filter((r) => r.group !== `Group ${DEMO_GROUP_WITHOUT_HAND_IN}`)
    expect(seeded).toHaveLength(7)
    expect(rows.length - seeded.length).toBeLessThanOrEqual(1)
    expect(rows.every((r) => r.status === 'graded')).toBe(true)
    for (const wrong of DEMO_WRONG_RUNS) {
      const row = rows.find((r) => r.group === `Group ${wrong.group}`)
      if (!row) continue
      const flags = await ctx.handle.db
        .select({ code: submissionFlags.code })
        .from(submissionFlags)
        .where(eq(submissionFlags.submissionId, row.id))
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
    const all = await ctx.handle.db
      .select({ id: submissions.id })
      .from(submissions)
      .where(eq(submissions.moduleId, cold.id))
    expect(cold.submissionCount).toBe(all.length)
    expect(cold.submissionCount).toBeGreaterThanOrEqual(7)
    const st = await signedInAs(ctx, DEMO_STUDENT.email, DEFAULT_DEMO_PASSWORD)
    const mine = await st.agent.get(`/api/courses/${courseId}/modules`).expect(200)
    expect(mine.body.every((m: { submissionCount?: number }) => m.submissionCount === undefined)).toBe(true)
  })

  it('hands in one hot-fire run per lab group but one, graded with c* efficiency, and the faulty runs carry their flags', async () => {
    const db = ctx.handle.db
    const rows = await db
      .select({
        id: submissions.id,
        status: submissions.status,
        group: labGroups.name,
        review: submissions.reviewStatus,
      })
      .from(submissions)
      .innerJoin(labGroups, eq(labGroups.id, submissions.labGroupId))
      .innerJoin(modules, eq(modules.id, submissions.moduleId))
      .where(and(eq(submissions.courseId, courseId), eq(modules.slug, 'hot-fire')))
    const seeded = rows.filter((r) => r.group !== `Group ${DEMO_GROUP_WITHOUT_HAND_IN}`)
    expect(seeded).toHaveLength(7)
    expect(rows.every((r) => r.status === 'graded')).toBe(true)
    // Groups from both sections.
    expect(new Set(seeded.map((r) => r.group.slice(-2, -1)))).toEqual(new Set(['A', 'B']))
    const faulty = new Map(HOT_FIRE_WRONG_RUNS.map((w) => [`Group ${w.group}`, w]))
    for (const row of seeded) {
      const checks = await db
        .select({
          key: submissionChecks.resultKey,
          outcome: submissionChecks.outcome,
          expected: submissionChecks.expected,
        })
        .from(submissionChecks)
        .where(eq(submissionChecks.submissionId, row.id))
      const efficiency = checks.find((c) => c.key === 'cstar_efficiency')
      // Graded with c* efficiency, recomputed from the group's own data by the combustion library.
      expect(efficiency?.outcome, row.group).toBe('pass')
      const codes = (
        await db
          .select({ code: submissionFlags.code })
          .from(submissionFlags)
          .where(eq(submissionFlags.submissionId, row.id))
      ).map((f) => f.code)
      const wrong = faulty.get(row.group)
      if (!wrong) {
        expect(efficiency!.expected!, row.group).toBeGreaterThan(HOT_FIRE_STAND.cstarEfficiency[0] - 0.02)
        expect(efficiency!.expected!, row.group).toBeLessThan(1)
        expect(codes, row.group).toEqual([])
        continue
      }
      for (const f of wrong.flags) expect(codes, `${wrong.group} ${f}`).toContain(f)
      expect(row.review, row.group).not.toBe('none')
    }
  })
})

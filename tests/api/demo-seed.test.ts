import { and, eq, gt, inArray } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { DEMO_WRONG_RUNS } from '../../scripts/demo/demo-runs'
import { HOT_FIRE_STAND, HOT_FIRE_WRONG_RUNS } from '../../scripts/demo/hot-fire-runs'
import { DEMO_JET_GROUPS, DEMO_JET_WRONG_SCALE } from '../../scripts/demo/jet-runs'
import {
  DEFAULT_DEMO_PASSWORD,
  DEMO_COURSE,
  DEMO_GROUP_WITHOUT_HAND_IN,
  DEMO_INSTRUCTOR,
  DEMO_STUDENT,
} from '../../scripts/demo/scenario'
import { seedDemo } from '../../scripts/demo/seed-demo'
import { DEMO_ABORTED_RUN, DEMO_STANDS } from '../../scripts/demo/stand-sessions'
import {
  bookings,
  courses,
  labGroups,
  runEntries,
  runRecords,
  sections,
  standModules,
  standSlots,
  stands,
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

  it('publishes the fundamentals, cold-flow, hot-fire and jet modules', async () => {
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
    // The seed makes these four; browser tests that share the demo course may have added sheets of their own.
    const seeded = ['cold-flow-characterisation', 'hot-fire', 'nozzle-flow-fundamentals', 'reading-the-jet']
    expect(
      Object.keys(bySlug)
        .filter((slug) => seeded.includes(slug))
        .sort(),
    ).toEqual(seeded)
    // Version 1 of each, published at seed time.
    for (const slug of seeded) {
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

  it('hands in a photograph of the jet for a few groups; the group whose scale spans half the exit fails the spacing and ratio checks and is flagged to check its scale', async () => {
    const db = ctx.handle.db
    const rows = await db
      .select({ id: submissions.id, status: submissions.status, group: labGroups.name })
      .from(submissions)
      .innerJoin(labGroups, eq(labGroups.id, submissions.labGroupId))
      .innerJoin(modules, eq(modules.id, submissions.moduleId))
      .where(and(eq(submissions.courseId, courseId), eq(modules.slug, 'reading-the-jet')))
    const seeded = rows.filter((r) => DEMO_JET_GROUPS.some((g) => r.group === `Group ${g}`))
    // Groups can book the blow-down stand for the sheet (its schlieren bench stands beside it).
    const [jetSheet] = await db
      .select({ id: modules.id })
      .from(modules)
      .where(and(eq(modules.courseId, courseId), eq(modules.slug, 'reading-the-jet')))
    const allowedOn = await db
      .select({ name: stands.name })
      .from(standModules)
      .innerJoin(stands, eq(stands.id, standModules.standId))
      .where(eq(standModules.moduleId, jetSheet!.id))
    expect(allowedOn.map((s) => s.name)).toEqual(['Blow-down stand 1'])
    expect(seeded.map((r) => r.group).sort()).toEqual(DEMO_JET_GROUPS.map((g) => `Group ${g}`).sort())
    expect(seeded.every((r) => r.status === 'graded')).toBe(true)
    const inst = await signedInAs(ctx, DEMO_INSTRUCTOR.email, DEFAULT_DEMO_PASSWORD)
    for (const row of seeded) {
      const detail = await inst.agent.get(`/api/courses/${courseId}/submissions/${row.id}`).expect(200)
      // The photograph is stored with the marks handed in.
      expect(detail.body.images, row.group).toHaveLength(1)
      expect(detail.body.images[0]).toMatchObject({ key: 'jet', contentType: 'image/png', width: 720, height: 320 })
      expect(detail.body.images[0].marks.cellEnds.length, row.group).toBeGreaterThanOrEqual(2)
      const outcomes = Object.fromEntries(
        (detail.body.checks as { key: string; outcome: string }[]).map((c) => [c.key, c.outcome]),
      )
      const codes = (
        await db
          .select({ code: submissionFlags.code })
          .from(submissionFlags)
          .where(eq(submissionFlags.submissionId, row.id))
      ).map((f) => f.code)
      if (row.group === `Group ${DEMO_JET_WRONG_SCALE}`) {
        expect(outcomes.cell_measured, row.group).toBe('fail')
        expect(outcomes.cell_ratio, row.group).toBe('fail')
        expect(outcomes.cell_theory, row.group).toBe('pass')
        expect(codes, row.group).toContain('rule:check_the_scale')
      } else {
        expect(
          Object.values(outcomes).every((o) => o === 'pass'),
          `${row.group} ${JSON.stringify(outcomes)}`,
        ).toBe(true)
        expect(codes, row.group).toEqual([])
      }
    }
  })

  it('has two stands, a term of 30-minute slots for both sections, and the signed-off runs behind the hand-ins', async () => {
    const db = ctx.handle.db
    const standRows = await db
      .select({ id: stands.id, name: stands.name })
      .from(stands)
      .where(eq(stands.courseId, courseId))
    expect(standRows.map((r) => r.name).sort()).toEqual(DEMO_STANDS.map((s) => s.name).sort())
    const slots = await db
      .select({ id: standSlots.id, section: sections.name, minutes: standSlots.minutes })
      .from(standSlots)
      .innerJoin(sections, eq(sections.id, standSlots.sectionId))
      .where(eq(sections.courseId, courseId))
    expect(new Set(slots.map((s) => s.section))).toEqual(new Set(['Section A', 'Section B']))
    expect(slots.every((s) => s.minutes === 30)).toBe(true)
    // A term: more than ten weeks of six slots on two stands per section.
    expect(slots.length).toBeGreaterThanOrEqual(2 * 10 * 6 * 2)
    // A second seed adds no second term of slots.
    await seedDemo(db)
    const again = await db
      .select({ id: standSlots.id })
      .from(standSlots)
      .innerJoin(stands, eq(stands.id, standSlots.standId))
      .where(eq(stands.courseId, courseId))
    expect(again).toHaveLength(slots.length)

    // Every seeded hand-in of the two stand sheets points at a signed-off, completed run of its own group.
    const handIns = await db
      .select({
        group: submissions.labGroupId,
        slug: modules.slug,
        run: submissions.runRecordId,
        runGroup: bookings.labGroupId,
        outcome: runRecords.outcome,
        signedOffAt: runRecords.signedOffAt,
        checklist: runRecords.checklist,
      })
      .from(submissions)
      .innerJoin(modules, eq(modules.id, submissions.moduleId))
      .innerJoin(labGroups, eq(labGroups.id, submissions.labGroupId))
      .leftJoin(runRecords, eq(runRecords.id, submissions.runRecordId))
      .leftJoin(bookings, eq(bookings.id, runRecords.bookingId))
      .where(and(eq(submissions.courseId, courseId), inArray(modules.slug, ['cold-flow-characterisation', 'hot-fire'])))
    const seeded = handIns.filter((h) => h.run !== null)
    expect(seeded.length).toBeGreaterThanOrEqual(14)
    for (const h of seeded) {
      expect(h.runGroup, h.slug).toBe(h.group)
      expect(h.outcome, h.slug).toBe('completed')
      expect(h.signedOffAt, h.slug).not.toBeNull()
      expect(h.checklist!.length, h.slug).toBeGreaterThan(0)
      // Every item of the run's checklist was ticked before the sign-off.
      const ticks = await db
        .select({ item: runEntries.itemKey, kind: runEntries.kind })
        .from(runEntries)
        .where(eq(runEntries.runId, h.run!))
      expect(new Set(ticks.filter((t) => t.kind === 'tick').map((t) => t.item))).toEqual(
        new Set(h.checklist!.map((i) => i.key)),
      )
      expect(ticks.filter((t) => t.kind === 'sign-off')).toHaveLength(1)
    }

    // One run was aborted, with its reason.
    const aborted = await db
      .select({ reason: runRecords.outcomeReason, group: labGroups.name })
      .from(runRecords)
      .innerJoin(bookings, eq(bookings.id, runRecords.bookingId))
      .innerJoin(labGroups, eq(labGroups.id, bookings.labGroupId))
      .where(and(eq(runRecords.courseId, courseId), eq(runRecords.outcome, 'aborted')))
    expect(aborted).toEqual([{ reason: DEMO_ABORTED_RUN.reason, group: `Group ${DEMO_ABORTED_RUN.group}` }])

    // And the group without seeded hand-ins has bookings still to come.
    const upcoming = await db
      .select({ id: bookings.id })
      .from(bookings)
      .innerJoin(standSlots, eq(standSlots.id, bookings.slotId))
      .innerJoin(labGroups, eq(labGroups.id, bookings.labGroupId))
      .where(
        and(
          eq(labGroups.courseId, courseId),
          eq(labGroups.name, `Group ${DEMO_GROUP_WITHOUT_HAND_IN}`),
          eq(bookings.status, 'active'),
          gt(standSlots.startsAt, new Date()),
        ),
      )
    expect(upcoming.length).toBeGreaterThanOrEqual(1)
  })
})

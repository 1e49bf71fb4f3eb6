import { readFileSync } from 'node:fs'
import { and, eq, inArray } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { currentDueDates } from '../../scripts/demo/seed-demo'
import { gradingContext } from '../../server/app'
import { mailOutbox, submissionChecks, submissionFlags, submissions } from '../../server/db/schema'
import { GradingBudgetError, createGrader } from '../../server/grading/grading-pool'
import type { Grader } from '../../server/grading/grading-pool'
import { claimGradingJobs, releaseStaleGradingClaims } from '../../server/repositories/grading-jobs'
import { saveGrade } from '../../server/repositories/submissions'
import { gradeWaiting, runClaimed } from '../../server/services/grading-service'
import type { GradingContext } from '../../server/services/grading-service'
import { submitHandIn } from '../../server/services/submission-service'
import { createLogger } from '../../server/logger'
import { AssignmentSchema } from '../../shared/modules/schema'
import { GRADING_FAILED_MESSAGE } from '../../shared/schemas/submissions'
import type { Client, Fixture, TestContext } from '../helpers/app'
import { seedFixture, signedInAs, startTestApp } from '../helpers/app'
import { coldFlowCsv, coldFlowPayload } from '../helpers/cold-flow'
import { createModuleAs, publishAs } from '../helpers/modules'
import type { CreatedModule } from '../helpers/modules'

/**
 * Grading as a durable job: a stored hand-in is graded whoever picks it up (the request itself or
 * the background grader), exactly once, and a failure never shows its internal cause to people.
 */
let ctx: TestContext
let fx: Fixture
let inst: Client
let student: Client
let mod: CreatedModule
let grader: Grader
let grading: GradingContext
const COLD = currentDueDates(
  readFileSync(new URL('../../content/02-cold-flow-characterisation.md', import.meta.url), 'utf8'),
).replace(/^attempts: 3$/m, 'attempts: 20')

const studentEnrollment = () => ({
  courseId: fx.courseId,
  userId: fx.student.id,
  role: 'student' as const,
  sectionId: fx.sectionA,
  labGroupId: null as number | null,
})

/** Stores a hand-in through the real service without grading it (as if the request died right after the commit). */
async function storeOnly(): Promise<number> {
  const log = coldFlowCsv()
  const e = { ...studentEnrollment(), labGroupId: await groupOf(fx.student.id) }
  const d = await submitHandIn(ctx.handle.db, e, mod.id, coldFlowPayload(log), [
    { field: 'table:run', filename: 'run.csv', contentType: 'text/csv', bytes: Buffer.from(log.csv) },
  ])
  expect(d.status).toBe('received')
  return d.id
}

async function groupOf(userId: number): Promise<number | null> {
  const { enrollments } = await import('../../server/db/schema')
  const [row] = await ctx.handle.db
    .select({ g: enrollments.labGroupId })
    .from(enrollments)
    .where(and(eq(enrollments.userId, userId), eq(enrollments.courseId, fx.courseId)))
  return row?.g ?? null
}

const statusOf = async (id: number) =>
  (await ctx.handle.db.select({ s: submissions.status }).from(submissions).where(eq(submissions.id, id)))[0]!.s
const receipts = (id: number) =>
  ctx.handle.db
    .select()
    .from(mailOutbox)
    .where(eq(mailOutbox.dedupeKey, `submission-receipt:${id}`))

beforeAll(async () => {
  // This file runs the grading cycle itself, step by step.
  ctx = startTestApp({ GRADING_POLL_MS: '0' })
  fx = await seedFixture(ctx)
  inst = await signedInAs(ctx, fx.instructor.email)
  student = await signedInAs(ctx, fx.student.email)
  mod = await createModuleAs(inst, fx.courseId, COLD)
  await publishAs(inst, fx.courseId, mod)
  grader = createGrader({ timeoutMs: 20_000, memoryMb: 512, threads: 1 })
  grading = gradingContext(ctx.handle.db, { grader, logger: silentLogger(), appUrl: ctx.config.APP_URL })
})
afterAll(async () => {
  // Leave nothing waiting in the shared queue for a later file's background grader.
  await ctx.handle.db.update(submissions).set({ gradeAfter: null }).where(eq(submissions.courseId, fx.courseId))
  await gradeWaiting(ctx.handle.db, grading, 100, 60_000)
  await grader?.close()
  await ctx.close()
})

/** The failures below are caused on purpose; their log lines would only be noise. */
const silentLogger = () => createLogger('silent')

describe('grading as a durable job', () => {
  it('a hand-in stored but not graded by its request is graded by the background cycle, and its receipt is queued once', async () => {
    const id = await storeOnly()
    expect(await statusOf(id)).toBe('received')
    expect(await receipts(id)).toHaveLength(0)
    await gradeWaiting(ctx.handle.db, grading, 50, 60_000)
    expect(await statusOf(id)).toBe('graded')
    const checks = await ctx.handle.db.select().from(submissionChecks).where(eq(submissionChecks.submissionId, id))
    expect(checks.length).toBeGreaterThan(0)
    expect(await receipts(id)).toHaveLength(1)
    // Another cycle finds nothing to do and changes nothing.
    await gradeWaiting(ctx.handle.db, grading, 50, 60_000)
    expect(await receipts(id)).toHaveLength(1)
    const again = await ctx.handle.db.select().from(submissionChecks).where(eq(submissionChecks.submissionId, id))
    expect(again.map((c) => c.id)).toEqual(checks.map((c) => c.id))
  })

  it('a claim left by a worker that died goes back to the queue once stale, and the old claim can no longer write a grade', async () => {
    const id = await storeOnly()
    const [claim] = await claimGradingJobs(ctx.handle.db, 1, id)
    expect(claim).toBeDefined()
    expect(await statusOf(id)).toBe('grading')
    // Not stale yet: nothing released.
    expect(await releaseStaleGradingClaims(ctx.handle.db, 60_000)).toBe(0)
    await new Promise((r) => setTimeout(r, 30))
    expect(await releaseStaleGradingClaims(ctx.handle.db, 10)).toBeGreaterThanOrEqual(1)
    expect(await statusOf(id)).toBe('received')
    await gradeWaiting(ctx.handle.db, grading, 50, 60_000)
    expect(await statusOf(id)).toBe('graded')
    // The dead worker wakes up and tries to save its own result: refused, nothing changes.
    const wrote = await ctx.handle.db.transaction((tx) =>
      saveGrade(
        tx,
        claim!,
        { status: 'grading-failed', gradingError: 'late writer', rawScore: null, score: null, maxScore: null },
        [],
        [{ code: 'late', message: 'late writer', detail: null }],
      ),
    )
    expect(wrote).toBe(false)
    expect(await statusOf(id)).toBe('graded')
    const flags = await ctx.handle.db.select().from(submissionFlags).where(eq(submissionFlags.submissionId, id))
    expect(flags.map((f) => f.code)).not.toContain('late')
  })

  it('a database error while grading puts the job back in the queue instead of failing the hand-in', async () => {
    const id = await storeOnly()
    const [claim] = await claimGradingJobs(ctx.handle.db, 1, id)
    const deadlocking: Grader = {
      grade: () =>
        Promise.reject(
          Object.assign(new Error('Deadlock found when trying to get lock'), {
            errno: 1213,
            code: 'ER_LOCK_DEADLOCK',
            sqlMessage: 'Deadlock',
          }),
        ),
      idle: () => true,
      warmUp: () => Promise.resolve(),
      close: () => Promise.resolve(),
    }
    const outcome = await runClaimed(ctx.handle.db, { ...grading, grader: deadlocking }, claim!)
    expect(outcome).toBe('requeued')
    const [row] = await ctx.handle.db.select().from(submissions).where(eq(submissions.id, id))
    expect(row!.status).toBe('received')
    expect(row!.gradeAfter).not.toBeNull()
  })

  it('a failure shows people one plain sentence: no SQL, stack or hidden expected value reaches the student, the flag or the e-mail', async () => {
    const id = await storeOnly()
    const [claim] = await claimGradingJobs(ctx.handle.db, 1, id)
    const secret =
      'Failed query: insert into `submission_checks` (`expected`) values (114.8031) at Object.run (/srv/grade.ts:12:3)'
    const broken: Grader = {
      grade: () => Promise.reject(new TypeError(secret)),
      idle: () => true,
      warmUp: () => Promise.resolve(),
      close: () => Promise.resolve(),
    }
    expect(await runClaimed(ctx.handle.db, { ...grading, grader: broken }, claim!)).toBe('failed')
    const [row] = await ctx.handle.db.select().from(submissions).where(eq(submissions.id, id))
    expect(row!.status).toBe('grading-failed')
    // The cause is kept for the server's operators only.
    expect(row!.gradingError).toContain('Failed query')

    const seen = await student.agent.get(`/api/courses/${fx.courseId}/submissions/${id}`).expect(200)
    const text = JSON.stringify(seen.body)
    for (const leak of ['Failed query', 'insert into', 'submission_checks', '114.8031', 'grade.ts', 'TypeError'])
      expect(text).not.toContain(leak)
    expect(seen.body.flags.map((f: { message: string }) => f.message)).toEqual([GRADING_FAILED_MESSAGE])
    const [mail] = await receipts(id)
    expect(mail!.textBody).toContain(GRADING_FAILED_MESSAGE)
    for (const leak of ['Failed query', 'insert into', '114.8031'])
      expect(mail!.textBody + mail!.htmlBody).not.toContain(leak)
    const pdf = await student.agent.get(`/api/courses/${fx.courseId}/submissions/${id}/report.pdf`)
    expect(pdf.status).toBe(409)
    expect(pdf.body.error.message).toContain(GRADING_FAILED_MESSAGE)
  })

  it('a hand-in claimed more times than allowed (a worker that keeps dying on it) ends as could not be graded', async () => {
    const id = await storeOnly()
    await ctx.handle.db.update(submissions).set({ gradeAttempts: 6 }).where(eq(submissions.id, id))
    await gradeWaiting(ctx.handle.db, grading, 50, 60_000)
    expect(await statusOf(id)).toBe('grading-failed')
  })

  it('thirty hand-ins of one module at the same moment are all graded, none failed, one receipt each', async () => {
    const log = coldFlowCsv()
    const sends = Array.from({ length: 30 }, () =>
      student.agent
        .post(`/api/courses/${fx.courseId}/modules/${mod.id}/submissions`)
        .set('x-csrf-token', student.csrf)
        .field('payload', JSON.stringify(coldFlowPayload(log)))
        .attach('table:run', Buffer.from(log.csv), 'run.csv'),
    )
    const results = await Promise.all(sends)
    // 20 attempts in all for the group: the ones past the limit are refused cleanly (409), never half-stored.
    const ok = results.filter((r) => r.status === 201)
    const refused = results.filter((r) => r.status === 409)
    expect(ok.length + refused.length).toBe(30)
    const ids = ok.map((r) => r.body.id as number)
    // Whatever the request did not finish, one background cycle does.
    await gradeWaiting(ctx.handle.db, grading, 50, 60_000)
    const rows = await ctx.handle.db
      .select({ id: submissions.id, s: submissions.status })
      .from(submissions)
      .where(inArray(submissions.id, ids))
    expect(rows.filter((r) => r.s !== 'graded')).toEqual([])
    const mail = await ctx.handle.db
      .select({ k: mailOutbox.dedupeKey })
      .from(mailOutbox)
      .where(
        inArray(
          mailOutbox.dedupeKey,
          ids.map((i) => `submission-receipt:${i}`),
        ),
      )
    expect(mail).toHaveLength(ids.length)
  })
})

describe('the grading budget', () => {
  // A column broadcast against a column-vector literal: cheap to write, costly to evaluate.
  const assignment = (expected: string) =>
    AssignmentSchema.parse({
      tables: [{ key: 'log', label: 'Log', minRows: 2, columns: [{ key: 'x', label: 'x', unit: 'N' }] }],
      results: [{ key: 'r', label: 'Result', unit: 'N', expected, tolerance: { relative: 0.01 }, points: 1 }],
    })
  const column = (n: number) => ({ log: { x: Array.from({ length: n }, (_, i) => i / 1000) } })
  const literal = (k: number) => `[${Array.from({ length: k }, (_, i) => `[${i + 1}]`).join(', ')}]`

  it('an expression that runs past the time budget is stopped, and the thread is replaced for the next hand-in', async () => {
    const small = createGrader({ timeoutMs: 400, memoryMb: 256, threads: 1 })
    try {
      const slow = assignment(`sum(${literal(8)} .* x)`)
      const err = await small
        .grade({ assignment: slow, data: { tables: column(40_000), measurements: {} }, reported: { r: 1 } })
        .catch((e: unknown) => e)
      expect(err).toBeInstanceOf(GradingBudgetError)
      expect((err as GradingBudgetError).kind).toBe('time')
      const quick = await small.grade({
        assignment: assignment('2 * 3'),
        data: { tables: column(10), measurements: {} },
        reported: { r: 6 },
      })
      expect(quick.checks[0]!.pass).toBe(true)
    } finally {
      await small.close()
    }
  }, 60_000)

  it('an expression that grows past the memory budget is stopped with a budget error, not a crash of the server', async () => {
    const small = createGrader({ timeoutMs: 60_000, memoryMb: 64, threads: 1 })
    try {
      const hungry = assignment(`sum(${literal(60)} * [x])`)
      const err = await small
        .grade({ assignment: hungry, data: { tables: column(200_000), measurements: {} }, reported: { r: 1 } })
        .catch((e: unknown) => e)
      expect(err).toBeInstanceOf(GradingBudgetError)
      expect((err as GradingBudgetError).kind).toBe('memory')
    } finally {
      await small.close()
    }
  }, 90_000)
})

import { randomUUID } from 'node:crypto'
import { eq } from 'drizzle-orm'
import request from 'supertest'
import type TestAgent from 'supertest/lib/agent'
import { createApp, gradingContext } from '../../server/app'
import type { CreatedApp } from '../../server/app'
import { hashPassword } from '../../server/auth/password'
import type { Config } from '../../server/config'
import { appDbOptions, gradingBudget, loadConfig } from '../../server/config'
import { createDb } from '../../server/db/client'
import type { DbHandle } from '../../server/db/client'
import { courses, enrollments, labGroups, sections, users } from '../../server/db/schema'
import { createLogger } from '../../server/logger'
import { createGrader } from '../../server/grading/grading-pool'
import { DEFAULT_GRADING_WORKER_OPTIONS, startGradingWorker } from '../../server/grading/grading-worker'

/** The test database from the environment `npm test` sets up (never the demo database). */
export function testConfig(overrides: Partial<Record<string, string>> = {}): Config {
  return loadConfig({ ...process.env, CLIENT_DIST: '', ...overrides })
}

export interface TestContext {
  config: Config
  handle: DbHandle
  created: CreatedApp
  close: () => Promise<void>
}

export function startTestApp(overrides: Partial<Record<string, string>> = {}): TestContext {
  const config = testConfig(overrides)
  const handle = createDb(appDbOptions(config))
  const logger = createLogger(config.LOG_LEVEL)
  // The grading threads, as `npm start` runs them. The background grader only where a file asks
  // for it (GRADING_POLL_MS): files run one after another on one database, and a grader started
  // here would take up hand-ins an earlier file left waiting, in the middle of this file's checks.
  const grader = createGrader(gradingBudget(config))
  const worker =
    overrides.GRADING_POLL_MS !== undefined && config.GRADING_POLL_MS > 0
      ? startGradingWorker(handle.db, gradingContext(handle.db, { grader, logger, appUrl: config.APP_URL }), {
          ...DEFAULT_GRADING_WORKER_OPTIONS,
          pollMs: config.GRADING_POLL_MS,
        })
      : null
  const created = createApp({ config, db: handle.db, logger, grader, onHandInStored: () => worker?.kick() })
  return {
    config,
    handle,
    created,
    close: async () => {
      await worker?.stop()
      await created.close()
      await grader.close()
      await handle.close()
    },
  }
}

export const PASSWORD = 'correct horse battery staple'
let cachedHash: Promise<string> | null = null

/** A unique suffix so each test file's people and courses never collide with another's. */
export const uniq = () => randomUUID().slice(0, 8)

export interface Fixture {
  courseId: number
  /** The course's key in page addresses (MariaDB derives it from code and term). */
  courseSlug: string
  otherCourseId: number
  sectionA: number
  sectionB: number
  instructor: { id: number; email: string }
  ta: { id: number; email: string }
  student: { id: number; email: string }
  student2: { id: number; email: string }
  outsider: { id: number; email: string }
  admin: { id: number; email: string }
}

/**
 * A small course of our own for API tests: one instructor, one TA, two students in two
 * sections, a person enrolled in nothing, a site admin, and a second course none of them is in.
 */
export async function seedFixture(ctx: TestContext): Promise<Fixture> {
  const db = ctx.handle.db
  cachedHash ??= hashPassword(PASSWORD)
  const hash = await cachedHash
  const tag = uniq()
  const mk = async (role: string, isSiteAdmin = false) => {
    const email = `${role}.${tag}@test.example`
    const [row] = await db
      .insert(users)
      .values({ email, displayName: `${role} ${tag}`, passwordHash: hash, isSiteAdmin })
      .$returningId()
    return { id: row!.id, email }
  }
  const instructor = await mk('instructor')
  const ta = await mk('ta')
  const student = await mk('student')
  const student2 = await mk('student2')
  const outsider = await mk('outsider')
  const admin = await mk('admin', true)
  const [course] = await db
    .insert(courses)
    .values({
      code: `T${tag}`,
      title: 'Test propulsion lab',
      term: 'Test term',
      institution: 'Test University (fictional)',
      timeZone: 'UTC',
    })
    .$returningId()
  const [other] = await db
    .insert(courses)
    .values({
      code: `O${tag}`,
      title: 'Another course',
      term: 'Test term',
      institution: 'Test University (fictional)',
      timeZone: 'UTC',
    })
    .$returningId()
  const courseId = course!.id
  const [sa] = await db.insert(sections).values({ courseId, name: 'A' }).$returningId()
  const [sb] = await db.insert(sections).values({ courseId, name: 'B' }).$returningId()
  const [g1] = await db.insert(labGroups).values({ courseId, sectionId: sa!.id, name: 'G1' }).$returningId()
  await db.insert(enrollments).values([
    { userId: instructor.id, courseId, role: 'instructor' },
    { userId: ta.id, courseId, role: 'ta', sectionId: sa!.id },
    { userId: student.id, courseId, role: 'student', sectionId: sa!.id, labGroupId: g1!.id },
    { userId: student2.id, courseId, role: 'student', sectionId: sb!.id },
    { userId: outsider.id, courseId: other!.id, role: 'student' },
  ])
  const [keyed] = await db.select({ slug: courses.slug }).from(courses).where(eq(courses.id, courseId))
  return {
    courseId,
    courseSlug: keyed!.slug!,
    otherCourseId: other!.id,
    sectionA: sa!.id,
    sectionB: sb!.id,
    instructor,
    ta,
    student,
    student2,
    outsider,
    admin,
  }
}

export interface Client {
  agent: TestAgent
  csrf: string
}

/** A cookie-keeping client with a CSRF token, as the browser would have after loading the app. */
export async function anonymous(ctx: TestContext): Promise<Client> {
  const agent = request.agent(ctx.created.app)
  const res = await agent.get('/api/auth/session').expect(200)
  return { agent, csrf: (res.body as { csrfToken: string }).csrfToken }
}

export async function signedInAs(ctx: TestContext, email: string, password = PASSWORD): Promise<Client> {
  const c = await anonymous(ctx)
  const res = await c.agent.post('/api/auth/sign-in').set('x-csrf-token', c.csrf).send({ email, password })
  if (res.status !== 200) throw new Error(`sign-in as ${email} failed: ${res.status} ${JSON.stringify(res.body)}`)
  return { agent: c.agent, csrf: (res.body as { csrfToken: string }).csrfToken }
}

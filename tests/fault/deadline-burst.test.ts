// The fault suite: a class handing in at the deadline while the database and the mail server
// misbehave. Everything here runs against servers of this file's own (a MariaDB on a free loopback
// port with its own data folder, a mail catcher on free ports), so pausing and killing them never
// touches the shared test database. Bounded to about two minutes; it stops what it starts.
import { spawnSync } from 'node:child_process'
import { readFileSync, rmSync } from 'node:fs'
import { createServer } from 'node:http'
import type { Server } from 'node:http'
import type { AddressInfo } from 'node:net'
import { createServer as createNetServer } from 'node:net'
import path from 'node:path'
import { and, eq, gt, inArray, sql } from 'drizzle-orm'
import request from 'supertest'
import type TestAgent from 'supertest/lib/agent'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { currentDueDates } from '../../scripts/demo/seed-demo'
import { DATA, ROOT, dbEnv, nodeBin, startMaildev, startMariaDb, waitForHttp } from '../../scripts/lib/bootstrap.mjs'
import type { ProjectDb } from '../../scripts/lib/bootstrap.mjs'
import { createApp, gradingContext } from '../../server/app'
import type { CreatedApp } from '../../server/app'
import { hashPassword } from '../../server/auth/password'
import { appDbOptions, loadConfig } from '../../server/config'
import type { Config } from '../../server/config'
import { createDb } from '../../server/db/client'
import type { DbHandle } from '../../server/db/client'
import { courses, enrollments, mailOutbox, sections, submissions, users } from '../../server/db/schema'
import { createGrader } from '../../server/grading/grading-pool'
import type { Grader } from '../../server/grading/grading-pool'
import { startGradingWorker } from '../../server/grading/grading-worker'
import { createLogger } from '../../server/logger'
import { startOutboxWorker } from '../../server/mail/outbox-worker'
import { createSmtpSender } from '../../server/mail/transport'
import { coldFlowCsv, coldFlowPayload } from '../helpers/cold-flow'

const STUDENTS = 50
const PASSWORD = 'fault-suite-password-1'
const DB_PASSWORD = `fault-${Math.random().toString(36).slice(2, 10)}`

interface Person {
  email: string
  agent: TestAgent
  csrf: string
}

let mdb: ProjectDb
let dbName: string
let dbPort: number
let mail: ReturnType<typeof startMaildev>
let smtpPort: number
let webPort: number
let config: Config
let handle: DbHandle
let created: CreatedApp
let grader: Grader
let server: Server
let url: string
let gradingWorker: ReturnType<typeof startGradingWorker>
let outbox: ReturnType<typeof startOutboxWorker>
let courseId: number
let moduleId: number
let instructor: Person
const students: Person[] = []
const log = coldFlowCsv()

function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const s = createNetServer()
    s.once('error', reject)
    s.listen(0, '127.0.0.1', () => {
      const { port } = s.address() as AddressInfo
      s.close(() => resolve(port))
    })
  })
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms))

/** Polls until `check` is true; fails the test with `what` after `ms`. */
async function waitUntil(what: string, check: () => Promise<boolean>, ms = 60_000): Promise<void> {
  const until = Date.now() + ms
  for (;;) {
    try {
      if (await check()) return
    } catch {
      // The database may still be coming back.
    }
    if (Date.now() > until) throw new Error(`timed out waiting for: ${what}`)
    await sleep(250)
  }
}

const mariadbPid = () => Number(readFileSync(path.join(DATA, dbName, 'run', 'mariadb.pid'), 'utf8').trim())

async function signIn(email: string): Promise<Person> {
  const agent = request.agent(url)
  const s = await agent.get('/api/auth/session').expect(200)
  const res = await agent
    .post('/api/auth/sign-in')
    .set('x-csrf-token', s.body.csrfToken)
    .send({ email, password: PASSWORD })
  if (res.status !== 200) throw new Error(`sign-in as ${email}: ${res.status} ${JSON.stringify(res.body)}`)
  return { email, agent, csrf: res.body.csrfToken }
}

/** Every student hands in once, all at the same moment; the statuses come back in order. */
function burst(who: Person[]): Promise<{ status: number; id?: number; code?: string }[]> {
  return Promise.all(
    who.map((p) =>
      p.agent
        .post(`/api/courses/${courseId}/modules/${moduleId}/submissions`)
        .set('x-csrf-token', p.csrf)
        .field('payload', JSON.stringify(coldFlowPayload(log)))
        .attach('table:run', Buffer.from(log.csv), 'run.csv')
        // A hang fails the test instead of stalling it: a stalled database must answer 503 quickly.
        .timeout(30_000)
        .then(
          (r) => ({
            status: r.status,
            id: r.status === 201 ? (r.body.id as number) : undefined,
            code: r.body?.error?.code as string | undefined,
          }),
          (err: unknown) => {
            const e = err as Error & { code?: string; response?: { status: number } }
            // The message and code say where the exchange broke: before any answer, or during it.
            return { status: -1, code: `${e.message} (${e.code ?? 'no code'}, answer ${e.response?.status ?? 'none'})` }
          },
        ),
    ),
  )
}

async function statusCounts(): Promise<Record<string, number>> {
  const rows = await handle.db
    .select({ s: submissions.status, n: sql<number>`COUNT(*)`.mapWith(Number) })
    .from(submissions)
    .where(eq(submissions.moduleId, moduleId))
    .groupBy(submissions.status)
  return Object.fromEntries(rows.map((r) => [r.s, r.n]))
}

/** No hand-in left received or being graded: every one that was stored ended graded. */
async function allSettled(): Promise<boolean> {
  const c = await statusCounts()
  return (c.received ?? 0) === 0 && (c.grading ?? 0) === 0
}

beforeAll(async () => {
  dbPort = await freePort()
  dbName = `fault-test-${dbPort}`
  mdb = await startMariaDb({
    name: dbName,
    port: dbPort,
    database: 'isentrope_fault',
    user: 'isentrope_fault',
    password: DB_PASSWORD,
    fresh: true,
  })
  const env: NodeJS.ProcessEnv = { ...process.env, ...dbEnv(mdb) }
  delete env.DATABASE_URL
  const tsx = nodeBin('tsx/dist/cli.mjs')
  const migrated = spawnSync(tsx[0], [tsx[1], 'scripts/migrate.ts'], { cwd: ROOT, env, encoding: 'utf8' })
  if (migrated.status !== 0) throw new Error(`migrations failed: ${migrated.stderr}`)

  smtpPort = await freePort()
  webPort = await freePort()
  mail = startMaildev({ smtpPort, webPort, dir: `mail-fault-${webPort}` })
  await waitForHttp(`http://127.0.0.1:${webPort}/api/email`)

  server = createServer()
  await new Promise<void>((r) => server.listen(0, '127.0.0.1', () => r()))
  url = `http://127.0.0.1:${(server.address() as AddressInfo).port}`
  config = loadConfig({
    ...env,
    CLIENT_DIST: '',
    APP_URL: url,
    SMTP_HOST: '127.0.0.1',
    SMTP_PORT: String(smtpPort),
    LOG_LEVEL: 'silent',
    // Fail fast, as configured in production, only shorter so the suite stays short.
    DB_ACQUIRE_TIMEOUT_MS: '2000',
    DB_QUERY_TIMEOUT_MS: '3000',
  })
  handle = createDb(appDbOptions(config))
  const logger = createLogger('silent')
  outbox = startOutboxWorker(handle.db, createSmtpSender(config), logger, {
    pollMs: 300,
    batchSize: 20,
    maxAttempts: 30,
    baseBackoffMs: 300,
    maxBackoffMs: 1500,
  })
  grader = createGrader({ timeoutMs: 20_000, memoryMb: 512, threads: 1 })
  gradingWorker = startGradingWorker(
    handle.db,
    gradingContext(handle.db, { grader, logger, appUrl: url, onMailQueued: () => outbox.kick() }),
    {
      pollMs: 300,
      batchSize: 4,
      staleMs: 8000,
    },
  )
  created = createApp({
    config,
    db: handle.db,
    logger,
    grader,
    onMailQueued: () => outbox.kick(),
    onHandInStored: () => gradingWorker.kick(),
  })
  server.on('request', created.app)
  if (process.env.FAULT_DEBUG) {
    server.on('request', (req, res) => {
      const t0 = Date.now()
      res.on('close', () => {
        if (!res.writableFinished)
          console.log(
            'DEBUG unfinished',
            req.method,
            req.url,
            res.statusCode,
            res.headersSent,
            Date.now() - t0,
            'ms',
            req.complete,
          )
      })
      req.socket.on('error', (e) => console.log('DEBUG socket error', req.url, e.message))
    })
    server.on('clientError', (e) => console.log('DEBUG clientError', (e as Error).message))
  }

  // A course of our own: an instructor and 50 students in one section, an individual hand-in.
  const hash = await hashPassword(PASSWORD)
  const db = handle.db
  const [c] = await db
    .insert(courses)
    .values({
      code: 'FLT1',
      title: 'Fault suite lab',
      term: 'Test term',
      institution: 'Test University (fictional)',
      timeZone: 'UTC',
    })
    .$returningId()
  courseId = c!.id
  const [sec] = await db.insert(sections).values({ courseId, name: 'A' }).$returningId()
  const people = [
    { email: 'instructor@fault.example', role: 'instructor' as const },
    ...Array.from({ length: STUDENTS }, (_, i) => ({ email: `student${i}@fault.example`, role: 'student' as const })),
  ]
  for (const p of people) {
    const [u] = await db
      .insert(users)
      .values({ email: p.email, displayName: p.email.split('@')[0]!, passwordHash: hash })
      .$returningId()
    await db
      .insert(enrollments)
      .values({ userId: u!.id, courseId, role: p.role, sectionId: p.role === 'student' ? sec!.id : null })
  }
  instructor = await signIn('instructor@fault.example')
  for (let i = 0; i < STUDENTS; i++) students.push(await signIn(`student${i}@fault.example`))

  const source = currentDueDates(
    readFileSync(new URL('../../content/02-cold-flow-characterisation.md', import.meta.url), 'utf8'),
  )
    .replace(/^groupSubmission: true$/m, 'groupSubmission: false')
    .replace(/^attempts: 3$/m, 'attempts: 10')
  const made = await instructor.agent
    .post(`/api/courses/${courseId}/modules`)
    .set('x-csrf-token', instructor.csrf)
    .send({ source })
  if (made.status !== 201) throw new Error(`module: ${made.status} ${JSON.stringify(made.body)}`)
  moduleId = made.body.id
  await instructor.agent
    .post(`/api/courses/${courseId}/modules/${moduleId}/publish`)
    .set('x-csrf-token', instructor.csrf)
    .send({ versionId: made.body.current.id })
    .expect(200)
}, 120_000)

afterAll(async () => {
  try {
    const pid = mdb ? mariadbPid() : 0
    if (pid) process.kill(pid, 'SIGCONT')
  } catch {
    // Not paused, or already gone.
  }
  server?.closeAllConnections()
  await new Promise<void>((r) => (server ? server.close(() => r()) : r()))
  await gradingWorker?.stop()
  await outbox?.stop()
  await grader?.close()
  await created?.close()
  await handle?.close()
  if (mail && mail.child.exitCode === null) mail.child.kill('SIGTERM')
  await mdb?.stop()
  rmSync(path.join(DATA, dbName ?? 'none'), { recursive: true, force: true })
  rmSync(path.join(DATA, `mail-fault-${webPort}`), { recursive: true, force: true })
}, 60_000)

describe('a deadline burst', () => {
  it('50 students handing in at the same moment: 50 acknowledged, 50 graded, none failed, one receipt each', async () => {
    const results = await burst(students)
    expect(results.map((r) => r.status)).toEqual(results.map(() => 201))
    const ids = results.map((r) => r.id!)
    await waitUntil('every hand-in graded', allSettled)
    const rows = await handle.db
      .select({ id: submissions.id, s: submissions.status })
      .from(submissions)
      .where(inArray(submissions.id, ids))
    expect(rows.filter((r) => r.s === 'graded')).toHaveLength(STUDENTS)
    const receipts = await handle.db
      .select({ k: mailOutbox.dedupeKey })
      .from(mailOutbox)
      .where(
        inArray(
          mailOutbox.dedupeKey,
          ids.map((i) => `submission-receipt:${i}`),
        ),
      )
    expect(receipts).toHaveLength(STUDENTS)
  }, 120_000)

  it('MariaDB paused for 10 s in the middle of a burst: every answer is 201 or a quick 503, and every acknowledged hand-in is graded after it resumes', async () => {
    const before = await handle.db
      .select({ id: submissions.id })
      .from(submissions)
      .where(eq(submissions.moduleId, moduleId))
    const pid = mariadbPid()
    const sending = burst(students.slice(0, 30))
    await sleep(150)
    process.kill(pid, 'SIGSTOP')
    const paused = Date.now()
    // While paused, a fresh request fails fast with 503 instead of hanging.
    const probe = await students[40]!.agent
      .get(`/api/courses/${courseId}/modules/${moduleId}/submissions/mine`)
      .timeout(15_000)
      .then(
        (r) => r.status,
        () => -1,
      )
    expect(probe).toBe(503)
    await sleep(Math.max(0, 10_000 - (Date.now() - paused)))
    process.kill(pid, 'SIGCONT')
    const results = await sending
    if (process.env.FAULT_DEBUG)
      console.log('burst statuses', JSON.stringify(results.map((r) => r.status)), await statusCounts())
    expect(results.filter((r) => r.status !== 201 && r.status !== 503)).toEqual([])
    const acknowledged = results.filter((r) => r.status === 201).map((r) => r.id!)
    await waitUntil('every stored hand-in graded after the pause', allSettled)
    const rows = await handle.db
      .select({ id: submissions.id, s: submissions.status, userId: submissions.userId })
      .from(submissions)
      .where(eq(submissions.moduleId, moduleId))
    const fresh = rows.filter((r) => !before.some((b) => b.id === r.id))
    // Every acknowledged one is there and graded; nothing stored twice for one request.
    for (const id of acknowledged) expect(fresh.find((r) => r.id === id)?.s, `hand-in ${id}`).toBe('graded')
    expect(fresh.filter((r) => r.s !== 'graded')).toEqual([])
    expect(fresh.length).toBeLessThanOrEqual(30)
    expect(new Set(fresh.map((r) => r.userId)).size).toBe(fresh.length)
  }, 120_000)

  it('MariaDB killed in the middle of a burst and started again: no hand-in is left waiting, none is graded twice', async () => {
    const before = await handle.db
      .select({ id: submissions.id })
      .from(submissions)
      .where(eq(submissions.moduleId, moduleId))
    const sending = burst(students.slice(10, 40))
    await sleep(200)
    process.kill(mariadbPid(), 'SIGKILL')
    await sleep(1000)
    mdb = await startMariaDb({
      name: dbName,
      port: dbPort,
      database: 'isentrope_fault',
      user: 'isentrope_fault',
      password: DB_PASSWORD,
    })
    const results = await sending
    if (process.env.FAULT_DEBUG)
      console.log('burst statuses', JSON.stringify(results.map((r) => r.status)), await statusCounts())
    expect(results.filter((r) => r.status !== 201 && r.status !== 503)).toEqual([])
    const acknowledged = results.filter((r) => r.status === 201).map((r) => r.id!)
    gradingWorker.kick()
    await waitUntil('every stored hand-in graded after the restart', allSettled, 90_000)
    const rows = await handle.db
      .select({ id: submissions.id, s: submissions.status, userId: submissions.userId })
      .from(submissions)
      .where(eq(submissions.moduleId, moduleId))
    const fresh = rows.filter((r) => !before.some((b) => b.id === r.id))
    for (const id of acknowledged) expect(fresh.find((r) => r.id === id)?.s, `hand-in ${id}`).toBe('graded')
    expect(fresh.filter((r) => r.s !== 'graded')).toEqual([])
    expect(new Set(fresh.map((r) => r.userId)).size).toBe(fresh.length)
    // One set of checks per hand-in: a job that ran twice wrote its grade once.
    const [dupes] = (await handle.pool.query(
      'SELECT submission_id, result_key, COUNT(*) n FROM submission_checks GROUP BY submission_id, result_key HAVING n > 1',
    )) as unknown as [unknown[]]
    expect(dupes).toEqual([])
  }, 150_000)

  it('the mail server down while grades are released: every student gets the release e-mail exactly once after it returns', async () => {
    // Hand-ins of the earlier cases still being graded would queue receipts in the middle of this one.
    await waitUntil('earlier hand-ins graded', allSettled, 90_000)
    const [{ maxId }] = (await handle.db
      .select({ maxId: sql<number>`COALESCE(MAX(${mailOutbox.id}), 0)`.mapWith(Number) })
      .from(mailOutbox)) as [{ maxId: number }]
    mail.child.kill('SIGTERM')
    await new Promise((r) => (mail.child.exitCode !== null ? r(null) : mail.child.once('exit', r)))
    const released = await instructor.agent
      .post(`/api/courses/${courseId}/gradebook/modules/${moduleId}/release`)
      .set('x-csrf-token', instructor.csrf)
    expect(released.status).toBe(200)
    // Only the release's own messages: receipts and notices have other keys.
    const queued = () =>
      handle.db
        .select()
        .from(mailOutbox)
        .where(and(gt(mailOutbox.id, maxId), eq(mailOutbox.dedupeKey, `grades-released:${moduleId}`)))
    // The worker tries, fails (nothing listens), and keeps the messages for later.
    await waitUntil('send attempts failing while the mail server is down', async () => {
      const rows = await queued()
      return (
        rows.length >= STUDENTS && rows.every((m) => m.attempts >= 1 && m.status === 'pending' && m.lastError !== null)
      )
    })
    const subjects = new Set((await queued()).map((m) => m.subject))
    mail = startMaildev({ smtpPort, webPort, dir: `mail-fault-${webPort}-after` })
    await waitForHttp(`http://127.0.0.1:${webPort}/api/email`)
    await waitUntil(
      'every queued message sent',
      async () => {
        const rows = await queued()
        if (process.env.FAULT_DEBUG) {
          const seen = new Map<string, number>()
          for (const m of rows)
            seen.set(
              `${m.status} ${m.attempts} ${m.lastError}`,
              (seen.get(`${m.status} ${m.attempts} ${m.lastError}`) ?? 0) + 1,
            )
          console.log('DEBUG outbox', new Date().toISOString(), JSON.stringify([...seen]))
        }
        return rows.every((m) => m.status === 'sent')
      },
      60_000,
    )
    const inbox = (await (await fetch(`http://127.0.0.1:${webPort}/api/email`)).json()) as {
      subject: string
      to: { address: string }[]
    }[]
    const releaseMail = inbox.filter((m) => subjects.has(m.subject))
    const perStudent = new Map<string, number>()
    for (const m of releaseMail) for (const t of m.to) perStudent.set(t.address, (perStudent.get(t.address) ?? 0) + 1)
    const rows = await queued()
    for (const s of students) {
      const row = rows.find((m) => m.toAddress === s.email && subjects.has(m.subject))
      expect(perStudent.get(s.email), `${s.email}: ${JSON.stringify(row)}`).toBe(1)
    }
    rmSync(path.join(DATA, `mail-fault-${webPort}-after`), { recursive: true, force: true })
  }, 120_000)
})

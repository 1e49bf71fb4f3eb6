// Throughput of the hand-in endpoint on loopback: N concurrent students each post a 5,000-row
// cold-flow log (multipart), measured end to end (upload, parse, store, grade, respond). A hand-in
// counts as a success only when it ends graded (whether the request or the background grader
// graded it); failed and stuck ones are counted apart.
// Run by `npm run bench` with a project-owned bench database; stops by itself.
import { readFileSync } from 'node:fs'
import { currentDueDates } from '../../scripts/demo/seed-demo'
import { createServer } from 'node:http'
import type { AddressInfo } from 'node:net'
import { inArray } from 'drizzle-orm'
import { createApp, gradingContext } from '../../server/app'
import { hashPassword } from '../../server/auth/password'
import { appDbOptions, gradingBudget, loadConfig } from '../../server/config'
import { createDb } from '../../server/db/client'
import { courses, enrollments, labGroups, submissions, users } from '../../server/db/schema'
import { createGrader } from '../../server/grading/grading-pool'
import { DEFAULT_GRADING_WORKER_OPTIONS, startGradingWorker } from '../../server/grading/grading-worker'
import { createLogger } from '../../server/logger'
import { createModule, publishModule } from '../../server/services/module-service'
import { coldFlowCsv, coldFlowPayload } from '../../tests/helpers/cold-flow'

const STUDENTS = Number(process.env.BENCH_STUDENTS ?? 50)
const ROUNDS = Number(process.env.BENCH_ROUNDS ?? 4)

const config = loadConfig({ ...process.env, CLIENT_DIST: '', LOG_LEVEL: 'silent', DB_POOL_SIZE: '20' })
const handle = createDb(appDbOptions(config))
const db = handle.db
const logger = createLogger('silent')
// As `npm start` runs it: grading threads shared by the requests and the background grader.
const grader = createGrader(gradingBudget(config))
await grader.warmUp()
const worker = startGradingWorker(db, gradingContext(db, { grader, logger, appUrl: 'http://127.0.0.1' }), {
  ...DEFAULT_GRADING_WORKER_OPTIONS,
  pollMs: 500,
  batchSize: 4 * config.GRADING_THREADS,
})
const created = createApp({ config, db, logger, grader, onHandInStored: () => worker.kick() })
const server = createServer(created.app)
await new Promise<void>((r) => server.listen(0, '127.0.0.1', () => r()))
const base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`

// A course of our own for the bench, with STUDENTS students each in their own group.
const tag = Date.now().toString(36)
const password = 'bench-password-1'
const hash = await hashPassword(password)
const [course] = await db
  .insert(courses)
  .values({ code: `B${tag}`, title: 'Bench course', term: 'Bench', institution: 'Bench (fictional)', timeZone: 'UTC' })
  .$returningId()
const courseId = course!.id
const [inst] = await db
  .insert(users)
  .values({ email: `inst.${tag}@bench.example`, displayName: 'Bench instructor', passwordHash: hash })
  .$returningId()
await db.insert(enrollments).values({ userId: inst!.id, courseId, role: 'instructor' })
const emails: string[] = []
for (let i = 0; i < STUDENTS; i++) {
  const email = `s${i}.${tag}@bench.example`
  const [u] = await db
    .insert(users)
    .values({ email, displayName: `Student ${i}`, passwordHash: hash })
    .$returningId()
  const [g] = await db
    .insert(labGroups)
    .values({ courseId, name: `G${i}` })
    .$returningId()
  await db.insert(enrollments).values({ userId: u!.id, courseId, role: 'student', labGroupId: g!.id })
  emails.push(email)
}
const source = currentDueDates(
  readFileSync(new URL('../../content/02-cold-flow-characterisation.md', import.meta.url), 'utf8'),
).replace('attempts: 3', 'attempts: 100')
const ie = { courseId, userId: inst!.id, role: 'instructor' as const, sectionId: null, labGroupId: null }
const mod = await createModule(db, ie, source)
await publishModule(db, ie, mod.id, mod.current.id, base)

const log = coldFlowCsv({ step: 6 / 5000, duration: 6 })
const body = JSON.stringify(coldFlowPayload(log))
console.log(
  `Hand-in throughput — ${STUDENTS} concurrent students × ${ROUNDS} hand-ins, ${log.t.length}-row log (${(log.csv.length / 1024).toFixed(0)} KB), loopback`,
)

async function session(email: string): Promise<{ cookie: string; csrf: string }> {
  const s = await fetch(`${base}/api/auth/session`)
  let cookie = (s.headers.getSetCookie() ?? []).map((c) => c.split(';')[0]).join('; ')
  const { csrfToken } = (await s.json()) as { csrfToken: string }
  const r = await fetch(`${base}/api/auth/sign-in`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', 'x-csrf-token': csrfToken, cookie },
    body: JSON.stringify({ email, password }),
  })
  if (!r.ok) throw new Error(`sign-in failed: ${r.status}`)
  const jar = new Map(cookie.split('; ').map((c) => [c.split('=')[0]!, c]))
  for (const c of r.headers.getSetCookie()) jar.set(c.split('=')[0]!, c.split(';')[0]!)
  cookie = [...jar.values()].join('; ')
  return { cookie, csrf: ((await r.json()) as { csrfToken: string }).csrfToken }
}

const sessions = await Promise.all(emails.map(session))
const latencies: number[] = []
const ids: number[] = []
let errors = 0
const statuses = new Map<number, number>()
const started = performance.now()
await Promise.all(
  sessions.map(async (s) => {
    for (let round = 0; round < ROUNDS; round++) {
      const form = new FormData()
      form.append('payload', body)
      form.append('table:run', new Blob([log.csv], { type: 'text/csv' }), 'run.csv')
      const t0 = performance.now()
      const res = await fetch(`${base}/api/courses/${courseId}/modules/${mod.id}/submissions`, {
        method: 'POST',
        headers: { cookie: s.cookie, 'x-csrf-token': s.csrf },
        body: form,
      })
      const answer = (await res.json()) as { id?: number }
      latencies.push(performance.now() - t0)
      if (res.status === 201 && answer.id) ids.push(answer.id)
      statuses.set(res.status, (statuses.get(res.status) ?? 0) + 1)
      if (res.status !== 201) errors++
    }
  }),
)
const answered = (performance.now() - started) / 1000

// Wait (up to two minutes) for the background grader to finish what the requests left.
const counts = async () => {
  const rows = ids.length
    ? await db.select({ s: submissions.status }).from(submissions).where(inArray(submissions.id, ids))
    : []
  const c = { graded: 0, failed: 0, stuck: 0 }
  for (const r of rows) {
    if (r.s === 'graded') c.graded++
    else if (r.s === 'grading-failed') c.failed++
    else c.stuck++
  }
  return c
}
let c = await counts()
for (const until = Date.now() + 120_000; c.stuck > 0 && Date.now() < until; c = await counts()) {
  await new Promise((r) => setTimeout(r, 250))
}
const elapsed = (performance.now() - started) / 1000
latencies.sort((a, b) => a - b)
const q = (p: number) => latencies[Math.min(latencies.length - 1, Math.floor(p * latencies.length))]!
const total = STUDENTS * ROUNDS
console.log(`  requests ${latencies.length}   statuses ${JSON.stringify(Object.fromEntries(statuses))}`)
console.log(
  `  graded ${c.graded} of ${total}   could not be graded ${c.failed}   stuck (still waiting) ${c.stuck}   refused ${total - ids.length}`,
)
console.log(
  `  answered in ${answered.toFixed(1)} s, all graded after ${elapsed.toFixed(1)} s: ${(c.graded / elapsed).toFixed(1)} graded hand-ins/s`,
)
console.log(
  `  answer latency p50 ${q(0.5).toFixed(0)} ms   p95 ${q(0.95).toFixed(0)} ms   max ${latencies.at(-1)!.toFixed(0)} ms`,
)
errors += total - c.graded

// Health while hostile inputs are refused: the event loop must stay free (goal: health < 1 s).
{
  const s = sessions[0]!
  const healthMs: number[] = []
  let polling = true
  const poll = (async () => {
    while (polling) {
      const t0 = performance.now()
      await (await fetch(`${base}/api/health`)).arrayBuffer()
      healthMs.push(performance.now() - t0)
      await new Promise((r) => setTimeout(r, 100))
    }
  })()
  const post = async (parts: [string, Blob | string, string?][]) => {
    const form = new FormData()
    form.append('payload', body)
    for (const [name, value, filename] of parts)
      if (typeof value === 'string') form.append(name, value)
      else form.append(name, value, filename)
    const res = await fetch(`${base}/api/courses/${courseId}/modules/${mod.id}/submissions`, {
      method: 'POST',
      headers: { cookie: s.cookie, 'x-csrf-token': s.csrf },
      body: form,
    })
    await res.arrayBuffer()
    return res.status
  }
  const MB19 = 19 * 1024 * 1024
  // A chunked body (no Content-Length) whose one file part runs to 95 MB: refused while it streams.
  const chunked = async () => {
    const boundary = 'bench-boundary'
    const chunk = new Uint8Array(1024 * 1024).fill(0x31)
    let sent = 0
    const stream = new ReadableStream<Uint8Array>({
      pull(controller) {
        if (sent === 0)
          controller.enqueue(
            new TextEncoder().encode(
              `--${boundary}\r\nContent-Disposition: form-data; name="payload"\r\n\r\n${body}\r\n`,
            ),
          )
        if (sent >= 95) {
          controller.enqueue(new TextEncoder().encode(`\r\n--${boundary}--\r\n`))
          controller.close()
          return
        }
        if (sent === 0)
          controller.enqueue(
            new TextEncoder().encode(
              `\r\n--${boundary}\r\nContent-Disposition: form-data; name="table:run"; filename="big.csv"\r\n\r\n`,
            ),
          )
        controller.enqueue(chunk)
        sent++
      },
    })
    try {
      const res = await fetch(`${base}/api/courses/${courseId}/modules/${mod.id}/submissions`, {
        method: 'POST',
        headers: {
          cookie: s.cookie,
          'x-csrf-token': s.csrf,
          'content-type': `multipart/form-data; boundary=${boundary}`,
        },
        body: stream,
        duplex: 'half',
      } as RequestInit)
      await res.arrayBuffer()
      return res.status
    } catch {
      return 'connection closed by the server'
    }
  }
  const t0 = performance.now()
  const statuses = await Promise.all([
    post([['table:run', new Blob(['time_s' + ','.repeat(MB19)], { type: 'text/csv' }), 'commas.csv']]),
    post([['table:run', new Blob(['time_s,thrust_N\n' + '\n'.repeat(MB19)], { type: 'text/csv' }), 'blank.csv']]),
    chunked(),
  ])
  const refusedIn = performance.now() - t0
  await new Promise((r) => setTimeout(r, 300))
  polling = false
  await poll
  healthMs.sort((a, b) => a - b)
  console.log(
    `Health while hostile uploads are refused (19 MB of commas, 19 MB of blank lines, a 95 MB chunked upload)`,
  )
  console.log(`  answers ${JSON.stringify(statuses)} in ${refusedIn.toFixed(0)} ms`)
  console.log(
    `  health: ${healthMs.length} probes, median ${healthMs[Math.floor(healthMs.length / 2)]!.toFixed(0)} ms, max ${healthMs.at(-1)!.toFixed(0)} ms (goal < 1000 ms)`,
  )
}

server.closeAllConnections()
await new Promise<void>((r) => server.close(() => r()))
await worker.stop()
await created.close()
await grader.close()
await handle.close()
process.exit(errors === 0 ? 0 : 1)

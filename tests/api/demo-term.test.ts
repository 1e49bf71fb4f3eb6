import { count, eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import yauzl from 'yauzl'
import { seedDemo } from '../../scripts/demo/seed-demo'
import { DEFAULT_DEMO_PASSWORD, DEMO_INSTRUCTOR } from '../../scripts/demo/scenario'
import { courses, modules, submissions } from '../../server/db/schema'
import type { RolloverPlan, RolloverResult } from '../../shared/schemas/course-rollover'
import type { Client, TestContext } from '../helpers/app'
import { signedInAs, startTestApp, uniq } from '../helpers/app'

// The demo course from one term to the next, as its instructor would do it: roll it over, then
// take the end-of-term archive of the old one. Nothing here closes the demo course, which other
// files read.

let ctx: TestContext
let inst: Client
let courseId: number

beforeAll(async () => {
  ctx = startTestApp()
  courseId = (await seedDemo(ctx.handle.db)).courseId
  inst = await signedInAs(ctx, DEMO_INSTRUCTOR.email, DEFAULT_DEMO_PASSWORD)
}, 120_000)
afterAll(async () => {
  await ctx?.close()
})

/** The entries of a zip held in memory, by name. */
function unzip(bytes: Buffer): Promise<Map<string, Buffer>> {
  return new Promise((resolve, reject) => {
    yauzl.fromBuffer(bytes, { lazyEntries: true }, (err, zip) => {
      if (err || !zip) return reject(err ?? new Error('no zip'))
      const out = new Map<string, Buffer>()
      zip.on('entry', (entry: yauzl.Entry) => {
        zip.openReadStream(entry, (e, stream) => {
          if (e || !stream) return reject(e ?? new Error('no stream'))
          const parts: Buffer[] = []
          stream.on('data', (c: Buffer) => parts.push(c))
          stream.on('end', () => {
            out.set(entry.fileName, Buffer.concat(parts))
            zip.readEntry()
          })
        })
      })
      zip.on('end', () => resolve(out))
      zip.on('error', reject)
      zip.readEntry()
    })
  })
}

describe('the demo course from term to term', () => {
  it('rolls over to a new term: every issued lab sheet comes along being prepared, no hand-ins', async () => {
    const code = `NX${uniq()}`.slice(0, 20)
    const body = {
      code,
      title: 'Demo course, next term',
      term: 'Next term',
      startDate: '2027-05-03',
      shiftWeeks: 26,
      copyTas: true,
    }
    const preview = await inst.agent
      .post(`/api/courses/${courseId}/rollover/preview`)
      .set('x-csrf-token', inst.csrf)
      .send(body)
    expect(preview.status, JSON.stringify(preview.body)).toBe(200)
    const plan = preview.body as RolloverPlan
    const db = ctx.handle.db
    const issued = await db
      .select({ n: count() })
      .from(modules)
      .where(eq(modules.courseId, courseId))
      .then((r) => r[0]!.n)
    expect(issued).toBeGreaterThan(0)

    const done = await inst.agent.post(`/api/courses/${courseId}/rollover`).set('x-csrf-token', inst.csrf).send(body)
    expect(done.status, JSON.stringify(done.body)).toBe(201)
    const next = (done.body as RolloverResult).courseId
    const copied = await db.select({ status: modules.status }).from(modules).where(eq(modules.courseId, next))
    expect(copied.length).toBeGreaterThan(0)
    // What the preview listed is what was made.
    expect(copied.length).toBe(plan.sheets.length)
    expect(copied.every((m) => m.status === 'draft')).toBe(true)
    const handIns = await db
      .select({ n: count() })
      .from(submissions)
      .where(eq(submissions.courseId, next))
      .then((r) => r[0]!.n)
    expect(handIns).toBe(0)
    const [row] = await db.select({ code: courses.code }).from(courses).where(eq(courses.id, next))
    expect(row!.code).toBe(code)
  }, 60_000)

  it('downloads the old term as one archive whose manifest counts the demo hand-ins', async () => {
    const res = await inst.agent
      .get(`/api/courses/${courseId}/archive.zip`)
      .buffer(true)
      .parse((r, done) => {
        const parts: Buffer[] = []
        r.on('data', (c: Buffer) => parts.push(c))
        r.on('end', () => done(null, Buffer.concat(parts)))
      })
    expect(res.status).toBe(200)
    const entries = await unzip(res.body as Buffer)
    const manifest = JSON.parse(entries.get('manifest.json')!.toString('utf8')) as { counts: { handIns: number } }
    const stored = await ctx.handle.db
      .select({ n: count() })
      .from(submissions)
      .where(eq(submissions.courseId, courseId))
      .then((r) => r[0]!.n)
    expect(stored).toBeGreaterThan(0)
    expect(manifest.counts.handIns).toBe(stored)
  }, 120_000)
})

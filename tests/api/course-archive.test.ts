import { createHash } from 'node:crypto'
import { readFileSync } from 'node:fs'
import type { Response } from 'supertest'
import { and, count, eq } from 'drizzle-orm'
import Papa from 'papaparse'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { currentDueDates } from '../../scripts/demo/seed-demo'
import {
  courses,
  gradeChanges,
  recheckRequests,
  sections,
  submissionChecks,
  submissionComments,
  submissionFiles,
  submissionFlags,
  submissionImages,
  submissions,
} from '../../server/db/schema'
import type { ArchiveManifest } from '../../server/services/course-archive-service'
import type { Client, Fixture, TestContext } from '../helpers/app'
import { anonymous, seedFixture, signedInAs, startTestApp } from '../helpers/app'
import { coldFlowCsv, coldFlowPayload } from '../helpers/cold-flow'
import type { CreatedModule } from '../helpers/modules'
import { createModuleAs, publishAs } from '../helpers/modules'
import { readZip } from '../helpers/pdf'
import { JET_SHEET, jetPayload, jetPhotoFile } from '../helpers/jet-photo'

/** The demo cold-flow sheet as an individual hand-in (the second fixture student is in no lab group). */
const COLD = currentDueDates(
  readFileSync(new URL('../../content/02-cold-flow-characterisation.md', import.meta.url), 'utf8'),
)
  .replace(/^title: .*$/m, 'title: Cold flow for the archive')
  .replace(/^groupSubmission: true$/m, 'groupSubmission: false')

let ctx: TestContext
let fx: Fixture
let inst: Client
let ta: Client
let student: Client
let student2: Client
let mod: CreatedModule
let courseCode = ''
const C = () => `/api/courses/${fx.courseId}`
const sha = (b: Buffer) => createHash('sha256').update(b).digest('hex')

/** Collects any response body as bytes (supertest parses only JSON and text on its own). */
function binary(res: Response, cb: (err: Error | null, body: Buffer) => void) {
  const chunks: Buffer[] = []
  res.on('data', (c: Buffer) => chunks.push(c))
  res.on('end', () => cb(null, Buffer.concat(chunks)))
}

async function download(c: Client, url = `${C()}/archive.zip`) {
  const res = await c.agent
    .get(url)
    .buffer(true)
    .parse(binary as never)
  return { status: res.status, headers: res.headers as Record<string, string>, body: res.body as Buffer }
}

async function handIn(c: Client, thrustScale = 1) {
  const log = coldFlowCsv({ thrustScale })
  return c.agent
    .post(`${C()}/modules/${mod.id}/submissions`)
    .set('x-csrf-token', c.csrf)
    .field('payload', JSON.stringify(coldFlowPayload(log)))
    .attach('table:run', Buffer.from(log.csv), 'run log.csv')
}

/** Rows of this course in a table, counted by the database itself. */
async function dbCounts() {
  const db = ctx.handle.db
  const one = async (q: Promise<{ n: number }[]>) => (await q)[0]!.n
  const viaSubmission = (t: typeof submissionChecks | typeof submissionFlags | typeof submissionComments) =>
    one(
      db
        .select({ n: count() })
        .from(t)
        .innerJoin(submissions, eq(submissions.id, t.submissionId))
        .where(eq(submissions.courseId, fx.courseId)),
    )
  return {
    handIns: await one(db.select({ n: count() }).from(submissions).where(eq(submissions.courseId, fx.courseId))),
    files: await one(db.select({ n: count() }).from(submissionFiles).where(eq(submissionFiles.courseId, fx.courseId))),
    photos: await one(
      db.select({ n: count() }).from(submissionImages).where(eq(submissionImages.courseId, fx.courseId)),
    ),
    checks: await viaSubmission(submissionChecks),
    flags: await viaSubmission(submissionFlags),
    comments: await viaSubmission(submissionComments),
    staffChanges: await one(
      db
        .select({ n: count() })
        .from(gradeChanges)
        .innerJoin(submissions, eq(submissions.id, gradeChanges.submissionId))
        .where(eq(submissions.courseId, fx.courseId)),
    ),
    recheckRequests: await one(
      db.select({ n: count() }).from(recheckRequests).where(eq(recheckRequests.courseId, fx.courseId)),
    ),
    graded: await one(
      db
        .select({ n: count() })
        .from(submissions)
        .where(and(eq(submissions.courseId, fx.courseId), eq(submissions.status, 'graded'))),
    ),
  }
}

beforeAll(async () => {
  ctx = startTestApp()
  fx = await seedFixture(ctx)
  inst = await signedInAs(ctx, fx.instructor.email)
  ta = await signedInAs(ctx, fx.ta.email)
  student = await signedInAs(ctx, fx.student.email)
  student2 = await signedInAs(ctx, fx.student2.email)
  const [c] = await ctx.handle.db.select({ code: courses.code }).from(courses).where(eq(courses.id, fx.courseId))
  courseCode = c!.code
  mod = await createModuleAs(inst, fx.courseId, COLD)
  await publishAs(inst, fx.courseId, mod)

  // Two attempts by one student (the second with thrust scaled up, so it carries flags), one by another.
  const first = await handIn(student)
  const second = await handIn(student, 1.6)
  const other = await handIn(student2)
  for (const r of [first, second, other]) {
    if (r.status !== 201) throw new Error(`hand-in failed: ${r.status} ${JSON.stringify(r.body)}`)
  }
  // One hand-in of a sheet with a photograph.
  const jetSheet = await createModuleAs(inst, fx.courseId, JET_SHEET)
  await publishAs(inst, fx.courseId, jetSheet)
  const jet = await jetPhotoFile()
  const withPhoto = await student.agent
    .post(`${C()}/modules/${jetSheet.id}/submissions`)
    .set('x-csrf-token', student.csrf)
    .field('payload', JSON.stringify(jetPayload({ jet: jet.marks })))
    .attach('photo:jet', jet.bytes, 'jet.png')
  if (withPhoto.status !== 201) throw new Error(`photo hand-in failed: ${withPhoto.status}`)
  const flagged = second.body.id as number
  if (!(second.body.flags as unknown[]).length) throw new Error('the scaled-up hand-in carries no flag')

  // Staff work on the flagged hand-in: a comment, an override of one check, a resolved flag.
  let extras = (await ta.agent.get(`${C()}/submissions/${flagged}/review`).expect(200)).body
  await ta.agent
    .post(`${C()}/submissions/${flagged}/comments`)
    .set('x-csrf-token', ta.csrf)
    .send({ body: 'Zero the load cell before the run, please.', revision: extras.revision })
    .expect(201)
  extras = (await ta.agent.get(`${C()}/submissions/${flagged}/review`).expect(200)).body
  const [check] = await ctx.handle.db.select().from(submissionChecks).where(eq(submissionChecks.submissionId, flagged))
  await ta.agent
    .post(`${C()}/submissions/${flagged}/overrides`)
    .set('x-csrf-token', ta.csrf)
    .send({ checkId: check!.id, points: 0, reason: 'The log shows the gauge zero drifted.', revision: extras.revision })
    .expect(200)
  extras = (await inst.agent.get(`${C()}/submissions/${flagged}/review`).expect(200)).body
  await inst.agent
    .post(`${C()}/submissions/${flagged}/flags/${second.body.flags[0].id}`)
    .set('x-csrf-token', inst.csrf)
    .send({ action: 'resolve', revision: extras.revision })
    .expect(200)
  // A re-check can be asked for once the marks are final.
  await inst.agent.post(`${C()}/gradebook/modules/${mod.id}/release`).set('x-csrf-token', inst.csrf).expect(200)
  const rq = await student.agent
    .post(`${C()}/submissions/${flagged}/recheck`)
    .set('x-csrf-token', student.csrf)
    .send({ message: 'Please look at the impulse again.' })
  if (rq.status !== 201) throw new Error(`re-check request failed: ${rq.status} ${JSON.stringify(rq.body)}`)
})

afterAll(async () => {
  await ctx?.close()
})

describe('the end-of-term archive', () => {
  it('holds every hand-in, raw file, check, flag, comment, staff change and re-check request, with a manifest that matches the database and the bytes', async () => {
    const res = await download(inst)
    expect(res.status).toBe(200)
    expect(res.headers['content-type']).toBe('application/zip')
    expect(res.headers['content-disposition']).toMatch(
      /^attachment; filename="?[a-z0-9-]+_[a-z0-9-]+_archive-[\d-]+\.zip"?$/,
    )
    const entries = await readZip(res.body)
    const byName = new Map(entries.map((e) => [e.name, e.bytes]))

    // The manifest is written last and lists every other entry with its size and sha256.
    expect(entries.at(-1)!.name).toBe('manifest.json')
    const manifest = JSON.parse(byName.get('manifest.json')!.toString('utf8')) as ArchiveManifest
    expect(manifest.files.map((f) => f.path).sort()).toEqual(
      entries
        .map((e) => e.name)
        .filter((n) => n !== 'manifest.json')
        .sort(),
    )
    for (const f of manifest.files) {
      const bytes = byName.get(f.path)!
      expect(bytes.length, f.path).toBe(f.size)
      expect(sha(bytes), f.path).toBe(f.sha256)
    }

    // The counts are the database's.
    const n = await dbCounts()
    expect(n.handIns).toBe(4)
    expect(n.photos).toBe(1)
    expect(n.flags).toBeGreaterThan(0)
    expect(n.comments).toBe(1)
    expect(n.staffChanges).toBe(1)
    expect(n.recheckRequests).toBe(1)
    expect(manifest.counts).toMatchObject({
      handIns: n.handIns,
      files: n.files,
      photos: n.photos,
      checks: n.checks,
      flags: n.flags,
      comments: n.comments,
      staffChanges: n.staffChanges,
      recheckRequests: n.recheckRequests,
      rosterEntries: 4,
    })
    expect(manifest.counts.feedbackReports + manifest.reportsNotMade.length).toBe(n.graded)
    expect(manifest.course).toMatchObject({ id: fx.courseId, code: courseCode })

    // Each table as JSON lines and as CSV, row for row.
    const tables = {
      'hand-ins': n.handIns,
      files: n.files,
      photos: n.photos,
      checks: n.checks,
      flags: n.flags,
      comments: n.comments,
      'staff-changes': n.staffChanges,
      'recheck-requests': n.recheckRequests,
    }
    for (const [base, rows] of Object.entries(tables)) {
      const lines = byName.get(`${base}.jsonl`)!.toString('utf8').trim().split('\n')
      expect(
        lines.map((l) => JSON.parse(l) as unknown),
        base,
      ).toHaveLength(rows)
      const csv = Papa.parse(
        byName
          .get(`${base}.csv`)!
          .toString('utf8')
          .replace(/^\uFEFF/, ''),
        {
          header: true,
          skipEmptyLines: true,
        },
      )
      expect(csv.errors, base).toEqual([])
      expect(csv.data, base).toHaveLength(rows)
    }
    const changes = byName.get('staff-changes.jsonl')!.toString('utf8')
    expect(changes).toContain('The log shows the gauge zero drifted.')
    expect(changes).toContain(fx.ta.email)
    expect(byName.get('comments.csv')!.toString('utf8')).toContain('Zero the load cell before the run, please.')
    expect(byName.get('recheck-requests.jsonl')!.toString('utf8')).toContain('Please look at the impulse again.')

    // Every raw file byte for byte, its sha256 the one stored with the hand-in.
    const stored = await ctx.handle.db
      .select({
        id: submissionFiles.id,
        submissionId: submissionFiles.submissionId,
        sha256: submissionFiles.sha256,
        bytes: submissionFiles.bytes,
      })
      .from(submissionFiles)
      .where(eq(submissionFiles.courseId, fx.courseId))
    expect(stored).toHaveLength(3)
    for (const f of stored) {
      const path = `files/${f.submissionId}/${f.id}_run_log.csv`
      const bytes = byName.get(path)
      expect(bytes, path).toBeDefined()
      expect(sha(bytes!)).toBe(f.sha256)
      expect(bytes!.equals(f.bytes)).toBe(true)
      expect(manifest.files.find((m) => m.path === path)!.sha256).toBe(f.sha256)
    }
    // Each photograph as stored (re-encoded, without metadata), with its marks in the hand-ins table.
    const pictures = await ctx.handle.db
      .select({ id: submissionImages.id, submissionId: submissionImages.submissionId, bytes: submissionImages.bytes })
      .from(submissionImages)
      .where(eq(submissionImages.courseId, fx.courseId))
    for (const p of pictures) {
      const path = `photos/${p.submissionId}/${p.id}_jet.png`
      expect(byName.get(path)?.equals(p.bytes), path).toBe(true)
    }
    expect(byName.get('hand-ins.jsonl')!.toString('utf8')).toContain('"exitPlane"')
    const parsed = byName
      .get('parsed-values.jsonl')!
      .toString('utf8')
      .trim()
      .split('\n')
      .map((l) => JSON.parse(l) as { fileId: number; columns: Record<string, number[]> })
    expect(parsed.map((p) => p.fileId).sort()).toEqual(stored.map((f) => f.id).sort())
    expect(Object.keys(parsed[0]!.columns).length).toBeGreaterThan(0)

    // The roster and the gradebook, and one feedback report per graded hand-in.
    const roster = byName.get('roster.csv')!.toString('utf8')
    for (const p of [fx.instructor, fx.ta, fx.student, fx.student2]) expect(roster).toContain(p.email)
    expect(byName.get('gradebook.csv')!.toString('utf8')).toContain(fx.student2.email)
    const reports = entries.filter((e) => e.name.startsWith('feedback-reports/'))
    expect(reports).toHaveLength(manifest.counts.feedbackReports)
    expect(reports.length).toBeGreaterThan(0)
    for (const r of reports) expect(r.bytes.subarray(0, 5).toString('latin1')).toBe('%PDF-')
  })

  it('goes to the course’s instructor or a site administrator only', async () => {
    expect((await download(await signedInAs(ctx, fx.admin.email))).status).toBe(200)
    expect((await download(ta)).status).toBe(403)
    expect((await download(student)).status).toBe(403)
    // A course you do not teach: not enrolled → 404; the instructor of this one gets 404 for another.
    expect((await download(await signedInAs(ctx, fx.outsider.email))).status).toBe(404)
    expect((await download(inst, `/api/courses/${fx.otherCourseId}/archive.zip`)).status).toBe(404)
    expect((await download(await anonymous(ctx))).status).toBe(401)
  })
})

describe('closing a course', () => {
  const close = (c: Client, confirmCode: unknown) =>
    c.agent.post(`${C()}/close`).set('x-csrf-token', c.csrf).send({ confirmCode })
  const closedAt = async () =>
    (await ctx.handle.db.select({ at: courses.closedAt }).from(courses).where(eq(courses.id, fx.courseId)))[0]!.at

  it('needs the instructor and the course code typed as confirmation', async () => {
    const wrong = await close(inst, 'NOT-THE-CODE')
    expect(wrong.status).toBe(400)
    expect(wrong.body.error.code).toBe('confirmation_mismatch')
    expect(wrong.body.error.message).toContain('confirmCode')
    expect(wrong.body.error.message).toContain(courseCode)
    const missing = await inst.agent.post(`${C()}/close`).set('x-csrf-token', inst.csrf).send({})
    expect(missing.status).toBe(400)
    expect(missing.body.error.message).toContain('confirmCode')
    expect((await close(ta, courseCode)).status).toBe(403)
    expect((await close(student, courseCode)).status).toBe(403)
    expect(await closedAt()).toBeNull()
  })

  it('makes every write answer 409, hides the course from students and keeps it readable for staff', async () => {
    const before = await dbCounts()
    const ok = await close(inst, courseCode.toLowerCase())
    expect(ok.status).toBe(200)
    expect(ok.body.closedAt).toEqual(expect.any(String))
    expect(await closedAt()).not.toBeNull()

    const refused = async (res: { status: number; body: { error?: { code: string; message: string } } }) => {
      expect(res.status).toBe(409)
      expect(res.body.error!.code).toBe('course_closed')
      expect(res.body.error!.message).toMatch(/closed/)
    }
    await refused(await handIn(student))
    const [sub] = await ctx.handle.db
      .select({ id: submissions.id })
      .from(submissions)
      .where(eq(submissions.courseId, fx.courseId))
    await refused(
      await student.agent
        .post(`${C()}/submissions/${sub!.id}/recheck`)
        .set('x-csrf-token', student.csrf)
        .send({ message: 'Once more, please.' }),
    )
    await refused(
      await ta.agent
        .post(`${C()}/submissions/${sub!.id}/comments`)
        .set('x-csrf-token', ta.csrf)
        .send({ body: 'Late note.', revision: 0 }),
    )
    await refused(
      await inst.agent.post(`${C()}/sections`).set('x-csrf-token', inst.csrf).send({ name: 'Late section' }),
    )
    await refused(
      await inst.agent
        .post(`${C()}/roster/import`)
        .set('x-csrf-token', inst.csrf)
        .send({ csv: `email,name\nlate.${courseCode}@test.example,Late Student\n` }),
    )
    await refused(
      await inst.agent
        .put(`${C()}/gradebook/modules/${mod.id}/weight`)
        .set('x-csrf-token', inst.csrf)
        .send({ weight: 2 }),
    )
    await refused(await inst.agent.post(`${C()}/modules/${mod.id}/unpublish`).set('x-csrf-token', inst.csrf))
    await refused(await close(inst, courseCode))
    // Nothing was stored.
    expect(await dbCounts()).toEqual(before)
    expect(await ctx.handle.db.select().from(sections).where(eq(sections.courseId, fx.courseId))).toHaveLength(2)

    // Students: gone from the list and from reading; staff: listed, marked closed, still readable.
    const mine = (await student.agent.get('/api/courses').expect(200)).body as { id: number }[]
    expect(mine.map((c) => c.id)).not.toContain(fx.courseId)
    expect((await student.agent.get(C())).status).toBe(404)
    expect((await student.agent.get(`/api/course-keys/${fx.courseSlug}`)).status).toBe(404)
    const staffList = (await ta.agent.get('/api/courses').expect(200)).body as { id: number; closedAt: string | null }[]
    expect(staffList.find((c) => c.id === fx.courseId)!.closedAt).toEqual(expect.any(String))
    expect((await ta.agent.get(C()).expect(200)).body.course.closedAt).toEqual(expect.any(String))
    await ta.agent.get(`${C()}/submissions/${sub!.id}`).expect(200)
    await inst.agent.get(`${C()}/gradebook`).expect(200)
    expect((await download(inst)).status).toBe(200)
  })

  it('can be reopened by the instructor only, after which writes work again', async () => {
    const reopen = (c: Client) => c.agent.post(`${C()}/reopen`).set('x-csrf-token', c.csrf)
    expect((await reopen(ta)).status).toBe(403)
    expect((await reopen(student)).status).toBe(403)
    const ok = await reopen(inst)
    expect(ok.status).toBe(200)
    expect(ok.body.closedAt).toBeNull()
    expect(await closedAt()).toBeNull()
    expect((await reopen(inst)).status).toBe(409)
    const mine = (await student.agent.get('/api/courses').expect(200)).body as { id: number }[]
    expect(mine.map((c) => c.id)).toContain(fx.courseId)
    expect((await handIn(student2)).status).toBe(201)
  })
})

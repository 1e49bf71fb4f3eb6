import { readFileSync } from 'node:fs'
import { eq } from 'drizzle-orm'
import type { Response } from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { currentDueDates } from '../../scripts/demo/seed-demo'
import { enrollments, labGroups, modules, submissions, users } from '../../server/db/schema'
import type { SubmissionDetail } from '../../shared/schemas/submissions'
import type { Client, Fixture, TestContext } from '../helpers/app'
import { PASSWORD, anonymous, seedFixture, signedInAs, startTestApp, uniq } from '../helpers/app'
import { hashPassword } from '../../server/auth/password'
import { coldFlowCsv, coldFlowPayload } from '../helpers/cold-flow'
import { createModuleAs, publishAs } from '../helpers/modules'
import type { CreatedModule } from '../helpers/modules'
import { JET_SHEET, jetPayload, jetPhotoFile } from '../helpers/jet-photo'
import { pdfFonts, pdfImages, readPdf, readZip, squash } from '../helpers/pdf'

const COLD = currentDueDates(
  readFileSync(new URL('../../content/02-cold-flow-characterisation.md', import.meta.url), 'utf8'),
)
/** The same module, but its results wait until the staff make the marks final. */
const COLD_AFTER_RELEASE = COLD.replace(/^title: .*$/m, 'title: Cold-flow run, results after release').replace(
  /^results: .*$/m,
  'results: when-final',
)

let ctx: TestContext
let fx: Fixture
let inst: Client
let student: Client
let groupMate: Client
let student2: Client
let taA: Client
let taB: Client
let outsider: Client
let g2Student: Client
let mod: CreatedModule
let hiddenMod: CreatedModule
let subG1: number
let subG1Later: number
let subG2First: number
let subG2: number
let subHidden: number
const people: Record<string, string> = {}
const comment = `Recalibrate the load cell before the next run (${uniq()}).`

const C = () => `/api/courses/${fx.courseId}`

/** Collects any response body as bytes (supertest parses only JSON and text on its own). */
function binary(res: Response, cb: (err: Error | null, body: Buffer) => void) {
  const chunks: Buffer[] = []
  res.on('data', (c: Buffer) => chunks.push(c))
  res.on('end', () => cb(null, Buffer.concat(chunks)))
}

async function download(c: Client, url: string) {
  const res = await c.agent
    .get(url)
    .buffer(true)
    .parse(binary as never)
  const body = res.body as Buffer
  return {
    status: res.status,
    headers: res.headers as Record<string, string>,
    body,
    json: () => JSON.parse(body.toString('utf8')) as { error: { code: string; message: string } },
  }
}

async function handIn(c: Client, moduleId: number, thrustScale: number): Promise<number> {
  const log = coldFlowCsv({ thrustScale })
  const res = await c.agent
    .post(`${C()}/modules/${moduleId}/submissions`)
    .set('x-csrf-token', c.csrf)
    .field('payload', JSON.stringify(coldFlowPayload(log)))
    .attach('table:run', Buffer.from(log.csv), 'run.csv')
  if (res.status !== 201) throw new Error(`hand-in failed: ${res.status} ${JSON.stringify(res.body)}`)
  return res.body.id as number
}

/** A person of our own, enrolled in the fixture course. */
async function enrol(
  role: 'student' | 'ta',
  name: string,
  sectionId: number,
  labGroupId: number | null,
): Promise<Client> {
  const email = `${name.toLowerCase().replace(/\W+/g, '.')}.${uniq()}@test.example`
  const displayName = `${name} ${uniq()}`
  const [u] = await ctx.handle.db
    .insert(users)
    .values({ email, displayName, passwordHash: await hashPassword(PASSWORD) })
    .$returningId()
  await ctx.handle.db.insert(enrollments).values({ userId: u!.id, courseId: fx.courseId, role, sectionId, labGroupId })
  people[name] = displayName
  return signedInAs(ctx, email)
}

beforeAll(async () => {
  ctx = startTestApp()
  fx = await seedFixture(ctx)
  const db = ctx.handle.db
  inst = await signedInAs(ctx, fx.instructor.email)
  student = await signedInAs(ctx, fx.student.email)
  student2 = await signedInAs(ctx, fx.student2.email)
  taA = await signedInAs(ctx, fx.ta.email)
  outsider = await signedInAs(ctx, fx.outsider.email)
  const [g1] = await db.select({ id: labGroups.id }).from(labGroups).where(eq(labGroups.courseId, fx.courseId))
  const [g2] = await db
    .insert(labGroups)
    .values({ courseId: fx.courseId, sectionId: fx.sectionB, name: 'G2' })
    .$returningId()
  groupMate = await enrol('student', 'Anežka Dvořák', fx.sectionA, g1!.id)
  g2Student = await enrol('student', 'Osric Pennick', fx.sectionB, g2!.id)
  taB = await enrol('ta', 'Section B TA', fx.sectionB, null)

  mod = await createModuleAs(inst, fx.courseId, COLD)
  await publishAs(inst, fx.courseId, mod)
  hiddenMod = await createModuleAs(inst, fx.courseId, COLD_AFTER_RELEASE)
  await publishAs(inst, fx.courseId, hiddenMod)

  // G1: thrust 1.6 times too high, so the hand-in carries flags.
  subG1 = await handIn(student, mod.id, 1.6)
  subG2First = await handIn(g2Student, mod.id, 1.0)
  subG2 = await handIn(g2Student, mod.id, 1.01)
  subHidden = await handIn(student, hiddenMod.id, 1.0)

  // The section A TA comments (Markdown) and sets the total, through the review API.
  let rev = (await taA.agent.get(`${C()}/submissions/${subG1}/review`).expect(200)).body.revision as number
  const c = await taA.agent
    .post(`${C()}/submissions/${subG1}/comments`)
    .set('x-csrf-token', taA.csrf)
    .send({
      body: `**${comment}** See the [calibration sheet](https://lab.example/cal).\n\n- Zero it with no load.\n- Hang the 2 kg mass.`,
      revision: rev,
    })
  expect(c.status).toBe(201)
  rev = c.body.revision
  const o = await taA.agent
    .post(`${C()}/submissions/${subG1}/overrides`)
    .set('x-csrf-token', taA.csrf)
    .send({ checkId: null, points: 4.5, reason: 'Thrust rescaled by hand after the calibration check.', revision: rev })
  expect(o.status).toBe(200)

  // A later G1 attempt that is not graded (a grading thread holds it, claimed just now): it neither
  // gets a report nor counts in the archive.
  subG1Later = await handIn(groupMate, mod.id, 1.0)
  await db
    .update(submissions)
    .set({ status: 'grading', gradeClaimedAt: new Date() })
    .where(eq(submissions.id, subG1Later))
}, 120_000)
afterAll(async () => {
  // The hand-in held in 'grading' above goes back to graded, so no later file's grader takes it up.
  await ctx.handle.db
    .update(submissions)
    .set({ status: 'graded', gradeClaimedAt: null })
    .where(eq(submissions.id, subG1Later))
  await ctx.close()
})

describe('feedback report (PDF)', () => {
  it('prints the course, the module, the score the API reports, every check, the flags and the staff comment', async () => {
    const detail = (await student.agent.get(`${C()}/submissions/${subG1}`).expect(200)).body as SubmissionDetail
    const course = (await student.agent.get(C()).expect(200)).body.course as {
      code: string
      title: string
      term: string
      institution: string
    }
    const res = await download(student, `${C()}/submissions/${subG1}/report.pdf`)
    expect(res.status).toBe(200)
    expect(res.headers['content-type']).toBe('application/pdf')
    expect(res.headers['content-disposition']).toMatch(/^attachment; filename="?[a-z0-9-]+_g1_attempt-1\.pdf"?$/)
    expect(res.body.subarray(0, 5).toString('latin1')).toBe('%PDF-')

    const pdf = await readPdf(res.body)
    for (const s of [course.code, course.title, course.term, course.institution, detail.moduleTitle])
      expect(pdf.text).toContain(squash(s))
    expect(pdf.text).toContain(`version ${detail.moduleVersion}`)
    // The staff's total (4.5 of the maximum) as the API reports it, with the note that staff set it.
    expect(detail.score).toBe(4.5)
    expect(pdf.text).toContain(`${detail.score} of ${detail.maxScore} points`)
    expect(pdf.text).toContain('The course staff adjusted this score')
    expect(detail.checks.length).toBeGreaterThan(3)
    for (const c of detail.checks) expect(pdf.text).toContain(squash(c.label))
    expect(detail.flags.length).toBeGreaterThan(0)
    for (const f of detail.flags) expect(pdf.text).toContain(squash(f.message))
    // The comment's Markdown as plain text: no asterisks, the link's address after its words, the list.
    // (Compared without spaces: the address may wrap at a slash.)
    const bare = (s: string) => s.replace(/\s+/g, '')
    expect(bare(pdf.text)).toContain(bare(`${comment} See the calibration sheet (https://lab.example/cal).`))
    expect(pdf.text).not.toContain(`**${comment}`)
    expect(pdf.text).toContain('• Zero it with no load.')
    // The lab group and its members (one name needs the latin-ext font file).
    expect(pdf.text).toContain('G1')
    expect(pdf.text).toContain(people['Anežka Dvořák'])
    expect(pdf.text).toMatch(/Generated by Isentrope on /)
    expect(pdf.text).toContain(`Page 1 of ${pdf.pages}`)
    // This module hides expected values from students, and so does its report, whoever downloads it.
    const staffCopy = await readPdf((await download(inst, `${C()}/submissions/${subG1}/report.pdf`)).body)
    expect(staffCopy.text).not.toContain('Expected')
    expect(pdf.text).not.toContain('Expected')
  })

  it('embeds the app’s own fonts and no standard PDF font', async () => {
    const res = await download(student, `${C()}/submissions/${subG1}/report.pdf`)
    const { baseFonts, fontFiles } = pdfFonts(res.body)
    const families = new Set(baseFonts.map((f) => f.replace(/^[A-Z]{6}\+/, '').split('-')[0]))
    expect(families).toEqual(new Set(['NotoSerif', 'SourceSans3', 'JetBrainsMono']))
    // Every font is a subset (the six-letter tag) with its own embedded program.
    expect(baseFonts.every((f) => /^[A-Z]{6}\+/.test(f))).toBe(true)
    expect(fontFiles).toBe(baseFonts.length)
    expect(baseFonts.some((f) => /Helvetica|Times|Courier|Symbol|ZapfDingbats/.test(f))).toBe(false)
  })

  it('draws the thrust chart as vector paths, with no image', async () => {
    const detail = (await student.agent.get(`${C()}/submissions/${subG1}`).expect(200)).body as SubmissionDetail
    const res = await download(student, `${C()}/submissions/${subG1}/report.pdf`)
    const pdf = await readPdf(res.body)
    const chartPage = pdf.pageTexts.findIndex((t) => t.includes('Your run against the ideal nozzle'))
    expect(chartPage).toBeGreaterThanOrEqual(0)
    expect(pdf.pageTexts[chartPage]).toContain('Time (s)')
    expect(pdf.pageTexts[chartPage]).toContain('Thrust (N)')
    expect(pdf.pageTexts[chartPage]).toContain('Ideal thrust for the logged chamber pressure (N)')
    const ops = pdf.operators[chartPage]!
    // The series, grid, ticks and frame are path constructions that are stroked.
    expect(ops.constructPath ?? 0).toBeGreaterThan(20)
    // The logged thrust is one path through every plotted sample: at least an x and a y for each.
    expect(detail.chart!.time.length).toBeGreaterThan(50)
    expect(pdf.longestPath[chartPage]).toBeGreaterThanOrEqual(2 * detail.chart!.time.length)
    for (const page of pdf.operators) {
      expect(Object.keys(page).filter((op) => /Image/.test(op))).toEqual([])
    }
  })

  it('answers its submitter, the lab group, the instructor and the TA of the section; 404 for everyone else', async () => {
    const url = `${C()}/submissions/${subG1}/report.pdf`
    const who: [string, Client, number][] = [
      ['submitter', student, 200],
      ['lab-group member', groupMate, 200],
      ['TA of the section', taA, 200],
      ['instructor', inst, 200],
      ['another student', student2, 404],
      ['student of another group', g2Student, 404],
      ['TA of another section', taB, 404],
      ['outsider', outsider, 404],
      ['anonymous', await anonymous(ctx), 401],
    ]
    for (const [name, c, status] of who) {
      const res = await download(c, url)
      expect(res.status, name).toBe(status)
      if (status === 200) expect(res.headers['content-type'], name).toBe('application/pdf')
      if (status === 404) expect(res.json().error.code, name).toBe('not_found')
    }
    // The TA of section B reads the reports of their own section.
    expect((await download(taB, `${C()}/submissions/${subG2}/report.pdf`)).status).toBe(200)
  })

  it('is refused to a student until the marks are final, and served once they are', async () => {
    const url = `${C()}/submissions/${subHidden}/report.pdf`
    const before = await download(student, url)
    expect(before.status).toBe(409)
    expect(before.json().error.code).toBe('results_hidden')
    expect(before.json().error.message).toContain('make the marks final')
    // Staff read it at once.
    expect((await download(inst, url)).status).toBe(200)
    await ctx.handle.db.update(modules).set({ gradesReleasedAt: new Date() }).where(eq(modules.id, hiddenMod.id))
    const after = await download(student, url)
    expect(after.status).toBe(200)
    expect((await readPdf(after.body)).text).toContain('Cold-flow run, results after release')
  })

  it('is refused while a hand-in is not graded, with the reason', async () => {
    const received = await download(groupMate, `${C()}/submissions/${subG1Later}/report.pdf`)
    expect(received.status).toBe(409)
    expect(received.json().error.code).toBe('not_graded')
    expect(received.json().error.message).toContain('still being graded')
    await ctx.handle.db.update(submissions).set({ status: 'grading-failed' }).where(eq(submissions.id, subG1Later))
    const failed = await download(inst, `${C()}/submissions/${subG1Later}/report.pdf`)
    expect(failed.status).toBe(409)
    expect(failed.json().error.message).toContain('could not be graded automatically')
    await ctx.handle.db
      .update(submissions)
      .set({ status: 'grading', gradeClaimedAt: new Date() })
      .where(eq(submissions.id, subG1Later))
  })

  it('names a bad or unknown submission id', async () => {
    const bad = await download(student, `${C()}/submissions/abc/report.pdf`)
    expect(bad.status).toBe(400)
    expect(bad.json().error.message).toContain('submissionId')
    expect((await download(student, `${C()}/submissions/999999999/report.pdf`)).status).toBe(404)
  })
})

describe('all reports of a module (zip)', () => {
  it('gives the instructor one valid PDF per lab group, from its latest graded attempt, and nothing else', async () => {
    const res = await download(inst, `${C()}/modules/${mod.id}/reports.zip`)
    expect(res.status).toBe(200)
    expect(res.headers['content-type']).toBe('application/zip')
    expect(res.headers['content-disposition']).toMatch(
      /^attachment; filename="?[a-z0-9-]+_[a-z0-9-]+_feedback-reports\.zip"?$/,
    )
    const entries = await readZip(res.body)
    // G1's attempt 2 is not graded, so attempt 1 counts; G2's attempt 2 replaces its first.
    expect(entries.map((e) => e.name).sort()).toEqual([
      expect.stringMatching(/_g1_attempt-1\.pdf$/),
      expect.stringMatching(/_g2_attempt-2\.pdf$/),
    ])
    for (const e of entries) {
      expect(e.bytes.subarray(0, 5).toString('latin1')).toBe('%PDF-')
      const pdf = await readPdf(e.bytes)
      expect(pdf.text).toContain(e.name.includes('_g1_') ? people['Anežka Dvořák']! : people['Osric Pennick']!)
    }
    const g2 = await readPdf(entries.find((e) => e.name.includes('_g2_'))!.bytes)
    const latest = (await inst.agent.get(`${C()}/submissions/${subG2}`).expect(200)).body as SubmissionDetail
    expect(g2.text).toContain(`Attempt ${latest.attempt} of ${latest.attemptsAllowed}`)
    expect(subG2First).toBeLessThan(subG2)
  })

  it('is for instructors only: TA and student 403, outsider 404, unknown module 404', async () => {
    const url = `${C()}/modules/${mod.id}/reports.zip`
    expect((await download(taA, url)).status).toBe(403)
    expect((await download(student, url)).status).toBe(403)
    expect((await download(outsider, url)).status).toBe(404)
    expect((await download(await anonymous(ctx), url)).status).toBe(401)
    expect((await download(inst, `${C()}/modules/999999999/reports.zip`)).status).toBe(404)
  })
})

// Last in the file: its hand-in wakes the background grader, which would grade the hand-in the
// tests above keep waiting ('received') on purpose.
describe('feedback report: the uncertainty of the expected values', () => {
  /** The demo module with its expected values shown to students. */
  const COLD_SHOWN = COLD.replace(/^title: .*$/m, 'title: Cold-flow run, expected values shown').replace(
    /^showExpected: false$/m,
    'showExpected: true',
  )
  let shownSub = 0
  beforeAll(async () => {
    expect(COLD_SHOWN).toContain('showExpected: true')
    const shown = await createModuleAs(inst, fx.courseId, COLD_SHOWN)
    await publishAs(inst, fx.courseId, shown)
    shownSub = await handIn(g2Student, shown.id, 1.0)
  })

  it('prints each expected value as "expected ± U unit (k = 2)" and which inputs dominate its uncertainty', async () => {
    const detail = (await g2Student.agent.get(`${C()}/submissions/${shownSub}`).expect(200)).body as SubmissionDetail
    const pdf = await readPdf((await download(g2Student, `${C()}/submissions/${shownSub}/report.pdf`)).body)
    expect(pdf.text).toContain('± ')
    expect(pdf.text).toContain('k = 2')
    expect(pdf.text).toContain('Where the uncertainty comes from')
    // The expanded uncertainty the API gives, written as the page writes it (two significant figures).
    const peak = detail.checks.find((c) => c.key === 'peak_thrust')!
    expect(peak.uncertainty!.expanded).toBeGreaterThan(0)
    const U = Number(peak.uncertainty!.expanded!.toPrecision(2))
    expect(pdf.text).toContain(`± ${U} N (k = 2)`)
    // The words for the peak thrust: only the load cell reaches it.
    expect(pdf.text).toMatch(/Peak thrust: (mostly|all from) the thrust column's (gain|offset)/)
  })

  it('where the module hides expected values, names the dominant inputs without the figures', async () => {
    const pdf = await readPdf((await download(g2Student, `${C()}/submissions/${subG2}/report.pdf`)).body)
    expect(pdf.text).toContain('Where the uncertainty comes from')
    expect(pdf.text).toMatch(/Peak thrust: (mostly|all from) the thrust column's (gain|offset)/)
    expect(pdf.text).not.toContain('k = 2')
  })
})

describe('feedback report of a hand-in with a photograph', () => {
  async function photoReport(sheet: string) {
    const jetMod = await createModuleAs(inst, fx.courseId, sheet)
    await publishAs(inst, fx.courseId, jetMod)
    const photo = await jetPhotoFile('png')
    const res = await student.agent
      .post(`${C()}/modules/${jetMod.id}/submissions`)
      .set('x-csrf-token', student.csrf)
      .field('payload', JSON.stringify(jetPayload({ jet: photo.marks })))
      .attach('photo:jet', photo.bytes, 'jet.png')
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    expect(res.body.status).toBe('graded')
    const pdf = await download(student, `${C()}/submissions/${res.body.id}/report.pdf`)
    expect(pdf.status).toBe(200)
    return pdf.body
  }

  it('prints the stored picture at its pixel size, its label, and the measured spacing beside the theory', async () => {
    const bytes = await photoReport(JET_SHEET)
    // The test picture: 480 × 200 pixels, cells 72 px apart on a scale of 48 px for 8 mm (12 mm,
    // 1.5 exit diameters); the sheet's theory result expects 12 mm, so the ratio is 1.
    expect(pdfImages(bytes).map((i) => [i.width, i.height])).toEqual([[480, 200]])
    const pdf = await readPdf(bytes)
    expect(pdf.text).toContain('Shadowgraph of the jet')
    const lines = pdf.lines.flat()
    expect(lines).toContain('Mean cell spacing 12 mm (1.5 D) 12 mm (1.5 D) 1')
    // The Mach disk is marked 6 mm from the exit; the sheet names no theory for it.
    expect(lines).toContain('Exit plane to the Mach disk 6 mm (0.75 D) not shown —')
  })

  it('leaves the theory out where the sheet hides expected values from students', async () => {
    const hidden = JET_SHEET.replace('showExpected: true', 'showExpected: false').replace(
      /^title: .*$/m,
      'title: Reading the jet, expected values hidden',
    )
    const pdf = await readPdf(await photoReport(hidden))
    expect(pdf.lines.flat()).toContain('Mean cell spacing 12 mm (1.5 D) not shown —')
  })
})

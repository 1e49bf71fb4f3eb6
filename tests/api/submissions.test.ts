import { readFileSync } from 'node:fs'
import { currentDueDates } from '../../scripts/demo/seed-demo'
import { eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { hashPassword } from '../../server/auth/password'
import {
  enrollments,
  labGroups,
  mailOutbox,
  submissionChecks,
  submissionFiles,
  submissionFlags,
  submissions,
  users,
} from '../../server/db/schema'
import type { Client, Fixture, TestContext } from '../helpers/app'
import { PASSWORD, seedFixture, signedInAs, startTestApp, uniq } from '../helpers/app'
import { coldFlowCsv, coldFlowPayload, trapezoid } from '../helpers/cold-flow'
import { createModuleAs, publishAs } from '../helpers/modules'
import type { CreatedModule } from '../helpers/modules'

let ctx: TestContext
let fx: Fixture
let inst: Client
let student: Client
let student2: Client
let ta: Client
let mod: CreatedModule
const COLD = currentDueDates(
  readFileSync(new URL('../../content/02-cold-flow-characterisation.md', import.meta.url), 'utf8'),
)

const payload = coldFlowPayload

function handIn(
  c: Client,
  files: { field: string; name: string; body: Buffer | string }[],
  body: unknown,
  moduleId = mod.id,
) {
  let req = c.agent
    .post(`/api/courses/${fx.courseId}/modules/${moduleId}/submissions`)
    .set('x-csrf-token', c.csrf)
    .field('payload', typeof body === 'string' ? body : JSON.stringify(body))
  for (const f of files) req = req.attach(f.field, Buffer.isBuffer(f.body) ? f.body : Buffer.from(f.body), f.name)
  return req
}

beforeAll(async () => {
  ctx = startTestApp({ UPLOAD_LIMIT_MB: '2' })
  fx = await seedFixture(ctx)
  inst = await signedInAs(ctx, fx.instructor.email)
  student = await signedInAs(ctx, fx.student.email)
  student2 = await signedInAs(ctx, fx.student2.email)
  ta = await signedInAs(ctx, fx.ta.email)
  mod = await createModuleAs(inst, fx.courseId, COLD)
  await publishAs(inst, fx.courseId, mod)
})
afterAll(async () => {
  await ctx.close()
})

describe('handing in a cold-flow run', () => {
  it('stores the raw file with its sha256, grades from the submission’s own data, and shows the checks at once', async () => {
    const log = coldFlowCsv()
    const res = await handIn(student, [{ field: 'table:run', name: 'run1.csv', body: log.csv }], payload(log))
    expect(res.status).toBe(201)
    const d = res.body
    expect(d.status).toBe('graded')
    expect(d.attempt).toBe(1)
    expect(d.resultsVisible).toBe(true)
    const byKey = Object.fromEntries(d.checks.map((c: { key: string }) => [c.key, c]))
    // Impulse and peak thrust were computed here independently (trapezoid rule and a 5-sample
    // moving median written out in the test helper): both pass.
    expect(byKey.impulse.outcome).toBe('pass')
    expect(byKey.peak_thrust.outcome).toBe('pass')
    // The deliberately wrong values fail.
    for (const k of ['burn_time', 'mean_thrust', 'cf_mean', 'air_mass', 'isp', 'exit_mach', 'regime'])
      expect(byKey[k].outcome, k).toBe('fail')
    // showExpected is false in this module: the student does not see expected values.
    expect(byKey.impulse.expected).toBeNull()
    expect(d.score).toBe(3)
    expect(d.maxScore).toBe(12)
    expect(d.chart.time.length).toBeGreaterThan(10)
    expect(d.chart.thrust.length).toBe(d.chart.time.length)

    const [file] = await ctx.handle.db.select().from(submissionFiles).where(eq(submissionFiles.submissionId, d.id))
    expect(file!.bytes.toString('utf8')).toBe(log.csv)
    const { createHash } = await import('node:crypto')
    expect(file!.sha256).toBe(createHash('sha256').update(log.csv).digest('hex'))
    // The receipt e-mail is queued for the lab group (student is in G1 alone in this fixture).
    const mail = await ctx.handle.db
      .select()
      .from(mailOutbox)
      .where(eq(mailOutbox.dedupeKey, `submission-receipt:${d.id}`))
    expect(mail.map((m) => m.toAddress)).toEqual([fx.student.email])
    expect(mail[0]!.textBody).toContain('Score: 3 of 12')
  })

  it('staff see the expected values; another student cannot see the submission at all', async () => {
    const mine = await student.agent.get(`/api/courses/${fx.courseId}/modules/${mod.id}/submissions/mine`).expect(200)
    const id = mine.body.submissions[0].id
    const staff = await ta.agent.get(`/api/courses/${fx.courseId}/submissions/${id}`).expect(200)
    expect(staff.body.checks.find((c: { key: string }) => c.key === 'impulse').expected).toBeGreaterThan(0)
    await student2.agent.get(`/api/courses/${fx.courseId}/submissions/${id}`).expect(404)
    const file = await student.agent
      .get(`/api/courses/${fx.courseId}/submissions/${id}/files/${staff.body.files[0].id}`)
      .expect(200)
    expect(file.headers['content-disposition']).toMatch(/attachment/)
    await student2.agent
      .get(`/api/courses/${fx.courseId}/submissions/${id}/files/${staff.body.files[0].id}`)
      .expect(404)
  })

  it('flags an impossible thrust for staff review', async () => {
    const log = coldFlowCsv({ thrustScale: 1.6 })
    const res = await handIn(student, [{ field: 'table:run', name: 'run2.csv', body: log.csv }], payload(log))
    expect(res.status).toBe(201)
    const codes = res.body.flags.map((f: { code: string }) => f.code)
    expect(codes).toContain('thrust-above-ideal')
    const [row] = await ctx.handle.db.select().from(submissions).where(eq(submissions.id, res.body.id))
    expect(row!.reviewStatus).toBe('open')
  })

  it('refuses a hand-in past the attempts limit and stores nothing', async () => {
    const log = coldFlowCsv()
    const third = await handIn(student, [{ field: 'table:run', name: 'run3.csv', body: log.csv }], payload(log))
    expect(third.status).toBe(201)
    const before = await ctx.handle.db.select().from(submissions).where(eq(submissions.moduleId, mod.id))
    const fourth = await handIn(student, [{ field: 'table:run', name: 'run4.csv', body: log.csv }], payload(log))
    expect(fourth.status).toBe(409)
    expect(fourth.body.error.code).toBe('attempts_used')
    const after = await ctx.handle.db.select().from(submissions).where(eq(submissions.moduleId, mod.id))
    expect(after.length).toBe(before.length)
  })

  it('a student without a lab group cannot hand in a group module', async () => {
    const log = coldFlowCsv()
    const res = await handIn(student2, [{ field: 'table:run', name: 'x.csv', body: log.csv }], payload(log))
    expect(res.status).toBe(409)
    expect(res.body.error.code).toBe('no_lab_group')
  })
})

describe('the module as a student reads it', () => {
  it('a regime result keeps only its margin: the grading expressions stay with staff', async () => {
    const asStudent = await student.agent.get(`/api/courses/${fx.courseId}/modules/${mod.id}`).expect(200)
    const regime = asStudent.body.frontMatter.assignment.results.find((r: { key: string }) => r.key === 'regime')
    expect(regime.regime).toEqual({ margin: 0.02 })
    expect(regime.expected).toBeUndefined()
    const asStaff = await inst.agent.get(`/api/courses/${fx.courseId}/modules/${mod.id}`).expect(200)
    const full = asStaff.body.frontMatter.assignment.results.find((r: { key: string }) => r.key === 'regime')
    expect(full.regime.pressureRatio).toBe('p_ambient / max(p_chamber)')
  })

  it('carries none of the staff-only fields of the spec: tolerances, partial credit, uncertainties, zeroing, review rules', async () => {
    const STAFF_ONLY = [
      'expected',
      'tolerance',
      'partial',
      'uncertainty',
      'tare',
      'reviewRules',
      'pressureRatio',
      'areaRatio',
    ]
    /** Every key anywhere in a JSON value. */
    const keysOf = (v: unknown): string[] =>
      Array.isArray(v)
        ? v.flatMap(keysOf)
        : v !== null && typeof v === 'object'
          ? Object.entries(v).flatMap(([k, x]) => [k, ...keysOf(x)])
          : []
    const asStaff = await inst.agent.get(`/api/courses/${fx.courseId}/modules/${mod.id}`).expect(200)
    // The module declares each of them, so their absence below is the stripping, not an empty spec.
    for (const k of STAFF_ONLY) expect(keysOf(asStaff.body.frontMatter), k).toContain(k)
    const asStudent = await student.agent.get(`/api/courses/${fx.courseId}/modules/${mod.id}`).expect(200)
    const seen = keysOf(asStudent.body.frontMatter)
    for (const k of STAFF_ONLY) expect(seen, k).not.toContain(k)
    // What the hand-in form needs is still there.
    const a = asStudent.body.frontMatter.assignment
    expect(a.tables[0].columns.map((c: { key: string }) => c.key)).toEqual(
      asStaff.body.frontMatter.assignment.tables[0].columns.map((c: { key: string }) => c.key),
    )
    expect(a.results.every((r: { points: unknown }) => typeof r.points === 'number')).toBe(true)
    expect(asStudent.body.frontMatter.attempts).toBe(asStaff.body.frontMatter.attempts)
  })
})

describe('bad hand-ins: a clear 4xx naming the field, and nothing stored', () => {
  let other: CreatedModule
  let count = 0
  beforeAll(async () => {
    // A second copy of the module without group hand-in, so student2 can be refused for file problems.
    other = await createModuleAs(
      inst,
      fx.courseId,
      COLD.replace('groupSubmission: true', 'groupSubmission: false').replace('attempts: 3', 'attempts: 50'),
    )
    await publishAs(inst, fx.courseId, other)
  })
  const stored = async () =>
    (await ctx.handle.db.select().from(submissions).where(eq(submissions.moduleId, other.id))).length
  async function refused(files: { field: string; name: string; body: Buffer | string }[], body: unknown, status = 422) {
    const before = await stored()
    const res = await handIn(student2, files, body, other.id)
    expect(res.status).toBe(status)
    expect(await stored()).toBe(before)
    count++
    return res.body.error as {
      code: string
      message: string
      details?: { issues: { field: string; row?: number; column?: string; message: string }[]; more: number }
    }
  }
  const log = coldFlowCsv()

  it('an empty file', async () => {
    const e = await refused([{ field: 'table:run', name: 'empty.csv', body: '' }], payload(log))
    expect(e.details!.issues[0]!.field).toBe('table:run')
    expect(e.details!.issues[0]!.message).toMatch(/empty/i)
  })

  it('a PNG renamed .csv', async () => {
    const png = Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13, 73, 72, 68, 82])
    const e = await refused([{ field: 'table:run', name: 'plot.csv', body: png }], payload(log))
    expect(e.details!.issues[0]!.message).toMatch(/not a CSV/i)
  })

  it('a units row under the header', async () => {
    const lines = log.csv.split('\n')
    const withUnits = [lines[0], 's,N,kPa,kPa', ...lines.slice(1)].join('\n')
    const e = await refused([{ field: 'table:run', name: 'units.csv', body: withUnits }], payload(log))
    expect(e.details!.issues.some((i) => i.row === 2 && /unit/i.test(i.message))).toBe(true)
  })

  it('semicolons and decimal commas', async () => {
    const euro = log.csv.replace(/,/g, ';').replace(/(\d)\.(\d)/g, '$1,$2')
    const e = await refused([{ field: 'table:run', name: 'euro.csv', body: euro }], payload(log))
    expect(e.details!.issues[0]!.message).toMatch(/;/)
  })

  it('a missing column', async () => {
    const noChamber = log.csv
      .split('\n')
      .map((l) => l.split(',').slice(0, 3).join(','))
      .join('\n')
    const e = await refused([{ field: 'table:run', name: 'three.csv', body: noChamber }], payload(log))
    expect(e.details!.issues[0]!.message).toContain('p_chamber_kPa')
  })

  it('text in a number column, and a formula-looking cell kept as text', async () => {
    const lines = log.csv.split('\n')
    lines[5] = lines[5]!.replace(/^[^,]+,[^,]+/, (m) => `${m.split(',')[0]},abc`)
    lines[8] = lines[8]!.replace(/^[^,]+,[^,]+/, (m) => `${m.split(',')[0]},=1+1`)
    const e = await refused([{ field: 'table:run', name: 'text.csv', body: lines.join('\n') }], payload(log))
    const rows = e.details!.issues.map((i) => [i.row, i.column])
    expect(rows).toContainEqual([6, 'thrust_N'])
    expect(rows).toContainEqual([9, 'thrust_N'])
  })

  it('NaN and Infinity cells', async () => {
    const lines = log.csv.split('\n')
    lines[3] = lines[3]!.replace(/,[^,]+$/, ',NaN')
    lines[4] = lines[4]!.replace(/,[^,]+$/, ',Infinity')
    const e = await refused([{ field: 'table:run', name: 'nan.csv', body: lines.join('\n') }], payload(log))
    const rows = e.details!.issues.filter((i) => i.column === 'p_chamber_kPa').map((i) => i.row)
    expect(rows).toEqual(expect.arrayContaining([4, 5]))
  })

  it('time that does not increase', async () => {
    const lines = log.csv.split('\n')
    const a = lines[10]!.split(',')
    const b = lines[11]!.split(',')
    ;[a[0], b[0]] = [b[0]!, a[0]!]
    lines[10] = a.join(',')
    lines[11] = b.join(',')
    const e = await refused([{ field: 'table:run', name: 'time.csv', body: lines.join('\n') }], payload(log))
    expect(e.details!.issues.some((i) => /increas/i.test(i.message))).toBe(true)
  })

  it('an upload far over the size limit is refused before it is read', async () => {
    const big = Buffer.alloc(6 * 1024 * 1024, 'a')
    const e = await refused([{ field: 'table:run', name: 'big.csv', body: big }], payload(log), 413)
    expect(e.code).toBe('upload_too_large')
  })

  it('a measurement typed in a unit of the wrong kind names the field', async () => {
    const body = payload(log)
    body.measurements.d_throat = { value: 6, unit: 'kPa' }
    const e = await refused([{ field: 'table:run', name: 'ok.csv', body: log.csv }], body)
    expect(e.details!.issues).toContainEqual(expect.objectContaining({ field: 'measurements.d_throat' }))
  })

  it('a value outside the plausible range names the field', async () => {
    const body = payload(log)
    body.measurements.d_throat = { value: 60, unit: 'mm' }
    const e = await refused([{ field: 'table:run', name: 'ok.csv', body: log.csv }], body)
    expect(e.details!.issues).toContainEqual(
      expect.objectContaining({ field: 'measurements.d_throat', message: expect.stringMatching(/maximum/) }),
    )
  })

  it('a regime that is not one of the five', async () => {
    const body = payload(log)
    body.reported.regime = { value: 7, unit: '1' }
    const e = await refused([{ field: 'table:run', name: 'ok.csv', body: log.csv }], body)
    expect(e.details!.issues).toContainEqual(
      expect.objectContaining({
        field: 'reported.regime',
        message: expect.stringMatching(/choose one of the regimes/),
      }),
    )
  })

  it('a missing file and a malformed payload', async () => {
    const e = await refused([], payload(log))
    expect(e.details!.issues).toContainEqual(expect.objectContaining({ field: 'table:run' }))
    const bad = await refused([{ field: 'table:run', name: 'ok.csv', body: log.csv }], '{not json', 400)
    expect(bad.message).toMatch(/payload/)
  })

  it('a hand-in to a draft module or another course’s module is a 404', async () => {
    const draft = await createModuleAs(inst, fx.courseId, COLD.replace('title: Cold-flow', 'title: Draft cold-flow'))
    const before = await stored()
    const res = await handIn(student2, [{ field: 'table:run', name: 'ok.csv', body: log.csv }], payload(log), draft.id)
    expect(res.status).toBe(404)
    const outsider = await signedInAs(ctx, fx.outsider.email)
    const res2 = await handIn(outsider, [{ field: 'table:run', name: 'ok.csv', body: log.csv }], payload(log), other.id)
    expect(res2.status).toBe(404)
    expect(await stored()).toBe(before)
  })

  it('staff cannot hand in', async () => {
    const res = await handIn(ta, [{ field: 'table:run', name: 'ok.csv', body: log.csv }], payload(log), other.id)
    expect(res.status).toBe(403)
    expect(count).toBeGreaterThan(10)
  })
})

describe('near-copies of another group’s log (fingerprints stored with each file)', () => {
  let copyMod: CreatedModule
  const group: Record<string, Client> = {}
  const original = coldFlowCsv({ noise: 101 })
  let firstId = 0

  /** A student of our own in a lab group of our own. */
  async function groupStudent(name: string): Promise<Client> {
    const db = ctx.handle.db
    const [g] = await db
      .insert(labGroups)
      .values({ courseId: fx.courseId, sectionId: fx.sectionA, name })
      .$returningId()
    const email = `${name.toLowerCase()}.${uniq()}@test.example`
    const [u] = await db
      .insert(users)
      .values({ email, displayName: `${name} student`, passwordHash: await hashPassword(PASSWORD) })
      .$returningId()
    await db
      .insert(enrollments)
      .values({ userId: u!.id, courseId: fx.courseId, role: 'student', sectionId: fx.sectionA, labGroupId: g!.id })
    return signedInAs(ctx, email)
  }

  /**
   * The hand-in's flags once its grading job has finished: the copy check runs after the grade is
   * saved, and the receipt e-mail is queued after it, so the receipt marks the end.
   */
  async function flagsOf(submissionId: number) {
    await expect
      .poll(
        async () =>
          (
            await ctx.handle.db
              .select()
              .from(mailOutbox)
              .where(eq(mailOutbox.dedupeKey, `submission-receipt:${submissionId}`))
          ).length,
        {
          timeout: 30_000,
        },
      )
      .toBeGreaterThan(0)
    return ctx.handle.db.select().from(submissionFlags).where(eq(submissionFlags.submissionId, submissionId))
  }

  beforeAll(async () => {
    copyMod = await createModuleAs(inst, fx.courseId, COLD.replace('title: Cold-flow', 'title: Near-copy cold-flow'))
    await publishAs(inst, fx.courseId, copyMod)
    for (const name of ['N1', 'N2', 'N3', 'N4']) group[name] = await groupStudent(name)
  })

  it('stores a fingerprint with the file; an edited copy (one digit changed) is flagged near-copy, naming the other group', async () => {
    const first = await handIn(
      group.N1!,
      [{ field: 'table:run', name: 'n1.csv', body: original.csv }],
      payload(original),
      copyMod.id,
    )
    expect(first.status).toBe(201)
    firstId = first.body.id
    const [file] = await ctx.handle.db
      .select()
      .from(submissionFiles)
      .where(eq(submissionFiles.submissionId, first.body.id))
    expect(file!.fingerprint?.columns.thrust?.length).toBeGreaterThan(60)

    const lines = original.csv.split('\n')
    const cells = lines[100]!.split(',')
    cells[1] = `${cells[1]![0] === '9' ? '1' : '9'}${cells[1]!.slice(1)}`
    lines[100] = cells.join(',')
    const edited = lines.join('\n')
    expect(edited).not.toBe(original.csv)
    const copy = await handIn(
      group.N2!,
      [{ field: 'table:run', name: 'n2.csv', body: edited }],
      payload(original),
      copyMod.id,
    )
    expect(copy.status).toBe(201)
    const flag = (await flagsOf(copy.body.id)).find((f) => f.code === 'near-copy')
    expect(flag?.message).toContain('N1')
    expect(flag?.detail).toMatchObject({ otherSubmissionId: first.body.id })
    expect((await flagsOf(copy.body.id)).some((f) => f.code === 'identical-file')).toBe(false)
    const [row] = await ctx.handle.db.select().from(submissions).where(eq(submissions.id, copy.body.id))
    expect(row!.reviewStatus).toBe('open')
  })

  it('an honest run of the same nozzle (its own noise) is not flagged', async () => {
    const honest = coldFlowCsv({ noise: 202 })
    const res = await handIn(
      group.N3!,
      [{ field: 'table:run', name: 'n3.csv', body: honest.csv }],
      payload(honest),
      copyMod.id,
    )
    expect(res.status).toBe(201)
    expect((await flagsOf(res.body.id)).map((f) => f.code)).not.toContain('near-copy')
  })

  it('a file stored before fingerprints existed is fingerprinted when first compared, and its copy is found', async () => {
    expect(firstId).toBeGreaterThan(0)
    await ctx.handle.db
      .update(submissionFiles)
      .set({ fingerprint: null })
      .where(eq(submissionFiles.submissionId, firstId))
    const lines = original.csv.split('\n')
    const shifted = [
      lines[0],
      ...lines
        .slice(1)
        .filter((l) => l !== '')
        .map((l) => {
          const [t, ...rest] = l.split(',')
          return [(Number(t) + 7.25).toFixed(3), ...rest].join(',')
        }),
    ].join('\n')
    const res = await handIn(
      group.N4!,
      [{ field: 'table:run', name: 'n4.csv', body: shifted }],
      payload(original),
      copyMod.id,
    )
    expect(res.status).toBe(201)
    expect((await flagsOf(res.body.id)).map((f) => f.code)).toContain('near-copy')
    const [file] = await ctx.handle.db.select().from(submissionFiles).where(eq(submissionFiles.submissionId, firstId))
    expect(file!.fingerprint).not.toBeNull()
  })
})

describe('measurement uncertainty of the expected values', () => {
  /**
   * A module of our own: the load cell with a 0.05 N zero and a 0.5 % gain, the throat measured to
   * 0.01 mm, expected values shown; the impulse twice, each with a coverage tolerance (k = 2) over
   * a floor of 0.01 %, so one report can land inside and the other outside 2·u_c.
   */
  const SOURCE = `---
title: Impulse with its uncertainty
groupSubmission: true
showExpected: true
assignment:
  tables:
    - key: run
      label: Run log
      columns:
        - { key: t, label: Time, unit: s, role: time }
        - { key: thrust, label: Thrust, unit: N, role: thrust, uncertainty: { absolute: 0.05, relative: 0.005 } }
        - { key: p_receiver, label: Receiver pressure, unit: kPa, pressure: gauge }
        - { key: p_chamber, label: Chamber pressure, unit: kPa, pressure: gauge }
  measurements:
    - { key: p_ambient, label: Barometric pressure, unit: kPa, pressure: absolute, role: ambient-pressure }
    - { key: d_throat, label: Throat diameter, unit: mm, uncertainty: { absolute: 0.01 } }
  results:
    - key: impulse_in
      label: Total impulse (inside 2 u)
      unit: N*s
      expected: totalImpulse(t, thrust)
      tolerance: { relative: 0.0001, coverage: 2 }
      points: 1
    - key: impulse_out
      label: Total impulse (outside 2 u)
      unit: N*s
      expected: totalImpulse(t, thrust)
      tolerance: { relative: 0.0001, coverage: 2 }
      points: 1
    - key: throat_area
      label: Throat area
      unit: mm2
      expected: areaFromDiameter(d_throat)
      tolerance: { relative: 0.01 }
      points: 1
---

Invented test module.
`
  const log = coldFlowCsv()
  // Closed forms, independent of the engine: the gain scales the impulse (u = 0.5 % of I), the
  // zero offset integrates over the log's duration (u = 0.05 N × T); the throat area has
  // u(A)/A = 2·u(d)/d with d = 6 mm.
  const impulse = trapezoid(log.t, log.thrust)
  const duration = log.t[log.t.length - 1]! - log.t[0]!
  const uGain = 0.005 * impulse
  const uOffset = 0.05 * duration
  const uImpulse = Math.hypot(uGain, uOffset)
  const area = (Math.PI * 36) / 4
  const uArea = area * 2 * (0.01 / 6)
  let shown: CreatedModule
  let id = 0

  beforeAll(async () => {
    shown = await createModuleAs(inst, fx.courseId, SOURCE)
    await publishAs(inst, fx.courseId, shown)
    const full = payload(log)
    const body = {
      mappings: full.mappings,
      measurements: { p_ambient: full.measurements.p_ambient, d_throat: full.measurements.d_throat },
      reported: {
        impulse_in: { value: impulse + 1.9 * uImpulse, unit: 'N*s' },
        impulse_out: { value: impulse - 2.1 * uImpulse, unit: 'N*s' },
        throat_area: { value: area, unit: 'mm2' },
      },
    }
    const res = await handIn(student, [{ field: 'table:run', name: 'u.csv', body: log.csv }], body, shown.id)
    expect(res.status).toBe(201)
    id = res.body.id
  })

  type Check = {
    key: string
    expected: number
    tolerance: number
    outcome: string
    uncertainty: {
      standard: number | null
      expanded: number | null
      coverage: number
      contributions: { key: string; part: string; label: string; share: number }[]
    } | null
  }
  const byKey = (checks: Check[]) => Object.fromEntries(checks.map((c) => [c.key, c]))

  it('returns each check’s standard and expanded uncertainty, coverage factor and largest contributions', async () => {
    const d = (await student.agent.get(`/api/courses/${fx.courseId}/submissions/${id}`).expect(200)).body
    const c = byKey(d.checks)
    const u = c.impulse_in!.uncertainty!
    expect(u.standard! / uImpulse).toBeCloseTo(1, 9)
    expect(u.expanded! / (2 * uImpulse)).toBeCloseTo(1, 9)
    expect(u.coverage).toBe(2)
    expect(u.contributions.map((x) => [x.key, x.part, x.label])).toEqual([
      ['thrust', uGain > uOffset ? 'gain' : 'offset', 'Thrust'],
      ['thrust', uGain > uOffset ? 'offset' : 'gain', 'Thrust'],
    ])
    expect(u.contributions[0]!.share / (Math.max(uGain, uOffset) ** 2 / uImpulse ** 2)).toBeCloseTo(1, 9)
    expect(c.throat_area!.uncertainty!.standard! / uArea).toBeCloseTo(1, 9)
    expect(c.throat_area!.uncertainty!.contributions).toEqual([
      { key: 'd_throat', part: 'value', label: 'Throat diameter', share: 1 },
    ])
  })

  it('grades a coverage tolerance: 1.9 u_c from the expected value passes, 2.1 u_c fails', async () => {
    const d = (await student.agent.get(`/api/courses/${fx.courseId}/submissions/${id}`).expect(200)).body
    const c = byKey(d.checks)
    expect(c.impulse_in!.tolerance / (2 * uImpulse)).toBeCloseTo(1, 9)
    expect(c.impulse_in!.outcome).toBe('pass')
    expect(c.impulse_out!.outcome).toBe('fail')
    expect(d.score).toBe(2)
  })

  it('stores the uncertainty with each check', async () => {
    const rows = await ctx.handle.db.select().from(submissionChecks).where(eq(submissionChecks.submissionId, id))
    const row = rows.find((r) => r.resultKey === 'impulse_in')!
    expect(row.standardUncertainty! / uImpulse).toBeCloseTo(1, 9)
    expect(row.coverageFactor).toBe(2)
    expect(row.uncertaintyContributions!.map((x) => x.part).sort()).toEqual(['gain', 'offset'])
  })

  it('where expected values are hidden the student gets the contributing inputs but no figures; staff get the figures', async () => {
    // The demo module (content/02) hides expected values and declares its instruments' uncertainties.
    const mine = await student.agent.get(`/api/courses/${fx.courseId}/modules/${mod.id}/submissions/mine`).expect(200)
    const sid = mine.body.submissions[0].id
    const asStudent = byKey(
      (await student.agent.get(`/api/courses/${fx.courseId}/submissions/${sid}`).expect(200)).body.checks,
    )
    const asTa = byKey((await ta.agent.get(`/api/courses/${fx.courseId}/submissions/${sid}`).expect(200)).body.checks)
    const s = asStudent.peak_thrust!.uncertainty!
    expect(asStudent.peak_thrust!.expected).toBeNull()
    expect(s.standard).toBeNull()
    expect(s.expanded).toBeNull()
    expect(s.contributions.length).toBeGreaterThan(0)
    expect(s.contributions.every((x) => x.key === 'thrust')).toBe(true)
    const t = asTa.peak_thrust!.uncertainty!
    expect(t.standard).toBeGreaterThan(0)
    expect(t.expanded).toBe(2 * t.standard!)
    expect(t.contributions).toEqual(s.contributions)
  })
})

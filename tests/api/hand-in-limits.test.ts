import { readFileSync } from 'node:fs'
import { eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { currentDueDates } from '../../scripts/demo/seed-demo'
import { submissions } from '../../server/db/schema'
import type { Client, Fixture, TestContext } from '../helpers/app'
import { seedFixture, signedInAs, startTestApp } from '../helpers/app'
import { coldFlowCsv, coldFlowPayload } from '../helpers/cold-flow'
import { createModuleAs, publishAs } from '../helpers/modules'
import type { CreatedModule } from '../helpers/modules'

/**
 * Absurd typed values and hostile log files: each is a 422 that names the field (and the row and
 * column, or the limit), with a short body, and nothing is stored (no attempt is used).
 */

let ctx: TestContext
let fx: Fixture
let student: Client
let mod: CreatedModule
const COLD = currentDueDates(
  readFileSync(new URL('../../content/02-cold-flow-characterisation.md', import.meta.url), 'utf8'),
)
const log = coldFlowCsv()

type Issue = { field: string; row?: number; column?: string; message: string }
type Refusal = { status: number; code: string; message: string; issues: Issue[]; more: number; bodyLength: number }

beforeAll(async () => {
  ctx = startTestApp()
  fx = await seedFixture(ctx)
  const inst = await signedInAs(ctx, fx.instructor.email)
  student = await signedInAs(ctx, fx.student2.email)
  // Handed in by each student (student2 is in no lab group), with attempts to spare.
  mod = await createModuleAs(
    inst,
    fx.courseId,
    COLD.replace('groupSubmission: true', 'groupSubmission: false').replace('attempts: 3', 'attempts: 50'),
  )
  await publishAs(inst, fx.courseId, mod)
})
afterAll(async () => {
  await ctx.close()
})

const stored = async () =>
  (await ctx.handle.db.select().from(submissions).where(eq(submissions.moduleId, mod.id))).length

/** Hands in `csv` with `body`; expects a refusal and that no submission was stored. */
async function refused(csv: string, body: unknown): Promise<Refusal> {
  const before = await stored()
  const res = await student.agent
    .post(`/api/courses/${fx.courseId}/modules/${mod.id}/submissions`)
    .set('x-csrf-token', student.csrf)
    .field('payload', JSON.stringify(body))
    .attach('table:run', Buffer.from(csv), 'run.csv')
  expect(await stored()).toBe(before)
  const error = res.body.error ?? {}
  return {
    status: res.status,
    code: error.code,
    message: error.message,
    issues: error.details?.issues ?? [],
    more: error.details?.more,
    bodyLength: res.text.length,
  }
}

function withMeasurement(key: string, value: { value: number; unit: string; pressure?: 'gauge' | 'absolute' }) {
  const body = coldFlowPayload(log)
  body.measurements[key] = value
  return body
}

describe('typed values that cannot be right are a 422 naming the field, never a 500', () => {
  it('a temperature below absolute zero (−300 °C)', async () => {
    const r = await refused(log.csv, withMeasurement('t_air', { value: -300, unit: 'degC' }))
    expect(r.status).toBe(422)
    expect(r.issues).toEqual([
      {
        field: 'measurements.t_air',
        message: expect.stringMatching(/^Air \(room\) temperature: -300 degC is below absolute zero/),
      },
    ])
  })

  it('a pressure of 1e308 psi, which is not a finite number in pascals', async () => {
    const r = await refused(log.csv, withMeasurement('p_initial', { value: 1e308, unit: 'psi', pressure: 'gauge' }))
    expect(r.status).toBe(422)
    expect(r.issues).toEqual([
      { field: 'measurements.p_initial', message: expect.stringMatching(/1e\+308 psi is too large/) },
    ])
  })

  it('a barometric pressure of 1e308 kPa', async () => {
    const r = await refused(log.csv, withMeasurement('p_ambient', { value: 1e308, unit: 'kPa', pressure: 'absolute' }))
    expect(r.status).toBe(422)
    expect(r.issues.map((i) => i.field)).toContain('measurements.p_ambient')
    expect(r.issues.find((i) => i.field === 'measurements.p_ambient')?.message).toMatch(/too large/)
  })

  it('a diameter of 1e308 in, which is not a finite number in the spec’s mm', async () => {
    const r = await refused(log.csv, withMeasurement('d_throat', { value: 1e308, unit: 'in' }))
    expect(r.status).toBe(422)
    expect(r.issues).toEqual([{ field: 'measurements.d_throat', message: expect.stringMatching(/too large/) }])
  })

  it('a gauge reading that is below 0 absolute with the barometric pressure given', async () => {
    // −200 kPa gauge with a barometer of 84 kPa is −116 kPa absolute.
    const r = await refused(log.csv, withMeasurement('p_final', { value: -200, unit: 'kPa', pressure: 'gauge' }))
    expect(r.status).toBe(422)
    expect(r.issues).toEqual([
      { field: 'measurements.p_final', message: expect.stringMatching(/-116 kPa absolute.*cannot be below 0/) },
    ])
  })

  it('a negative pressure typed as absolute', async () => {
    const r = await refused(log.csv, withMeasurement('p_final', { value: -5, unit: 'kPa', pressure: 'absolute' }))
    expect(r.status).toBe(422)
    expect(r.issues).toEqual([
      { field: 'measurements.p_final', message: expect.stringMatching(/absolute pressure cannot be below 0/) },
    ])
  })

  it('a negative diameter and a negative volume', async () => {
    const body = withMeasurement('d_exit', { value: -9, unit: 'mm' })
    body.measurements.v_receiver = { value: -40, unit: 'L' }
    const r = await refused(log.csv, body)
    expect(r.status).toBe(422)
    expect(r.issues).toEqual([
      { field: 'measurements.d_exit', message: expect.stringMatching(/a diameter cannot be negative/) },
      { field: 'measurements.v_receiver', message: expect.stringMatching(/a volume cannot be negative/) },
    ])
  })

  it('a reported impulse of 1e308 lbf*s is refused, not stored as NULL', async () => {
    const r = await refused(log.csv, coldFlowPayload(log, { impulse: { value: 1e308, unit: 'lbf*s' } }))
    expect(r.status).toBe(422)
    expect(r.issues).toEqual([
      { field: 'reported.impulse', message: expect.stringMatching(/^Total impulse: 1e\+308 lbf\*s is too large/) },
    ])
  })

  it('a reported mass that is negative', async () => {
    const r = await refused(log.csv, coldFlowPayload(log, { air_mass: { value: -0.1, unit: 'kg' } }))
    expect(r.status).toBe(422)
    expect(r.issues).toEqual([
      { field: 'reported.air_mass', message: expect.stringMatching(/a mass cannot be negative/) },
    ])
  })

  it('a log value that overflows when converted to SI names its row and column', async () => {
    const lines = log.csv.split('\n')
    // 1e308 kPa is 1e311 Pa: not a finite number.
    lines[6] = lines[6]!.replace(/,[^,]+$/, ',1e308')
    const r = await refused(lines.join('\n'), coldFlowPayload(log))
    expect(r.status).toBe(422)
    expect(r.issues).toEqual([
      {
        field: 'table:run',
        row: 7,
        column: 'p_chamber_kPa',
        message: expect.stringMatching(/^Row 7, column "p_chamber_kPa": "1e308" is too large/),
      },
    ])
    expect(r.more).toBe(0)
  })
})

describe('hostile log files are refused early, naming the limit, with a short answer', () => {
  it('a header of one name and 1.5 MB of commas', async () => {
    const r = await refused(`time_s${','.repeat(1_500_000)}\n0,0,0,0\n`, coldFlowPayload(log))
    expect(r.status).toBe(422)
    expect(r.issues).toEqual([
      {
        field: 'table:run',
        row: 1,
        message: expect.stringMatching(
          /^Row 1 is 1,500,006 characters long; a line of a log may have at most 4,096 characters/,
        ),
      },
    ])
    expect(r.bodyLength).toBeLessThan(2048)
  })

  it('a header of 65 columns', async () => {
    const header = `${log.csv.split('\n')[0]},${Array.from({ length: 61 }, (_, i) => `extra${i + 1}`).join(',')}`
    const r = await refused([header, ...log.csv.split('\n').slice(1)].join('\n'), coldFlowPayload(log))
    expect(r.status).toBe(422)
    expect(r.issues).toEqual([
      { field: 'table:run', row: 1, message: expect.stringMatching(/names 65 columns; a log may have at most 64/) },
    ])
  })

  it('a formula cell with quotes in it is named once, at its row, and the rest of the file is still read', async () => {
    const lines = log.csv.split('\n')
    lines[11] = lines[11]!.replace(/^([^,]+),[^,]+/, '$1,=HYPERLINK("http://x.example/a","click")')
    const r = await refused(lines.join('\n'), coldFlowPayload(log))
    expect(r.status).toBe(422)
    expect(r.issues).toEqual([
      {
        field: 'table:run',
        row: 12,
        column: 'thrust_N',
        message: expect.stringMatching(/^Row 12, column "thrust_N": ".*" is a spreadsheet formula, not a number/),
      },
    ])
    expect(r.more).toBe(0)
    expect(r.message).toMatch(/^One problem/)
  })
})

describe('the count of problems not listed', () => {
  it('is 0 when the only problem is a whole-file one', async () => {
    const noChamber = log.csv
      .split('\n')
      .map((l) => l.split(',').slice(0, 3).join(','))
      .join('\n')
    const r = await refused(noChamber, coldFlowPayload(log))
    expect(r.status).toBe(422)
    expect(r.issues).toHaveLength(1)
    expect(r.more).toBe(0)
    expect(r.message).toMatch(/^One problem/)
  })

  it('counts every problem once when there are more than are listed', async () => {
    // 30 rows with text in the thrust column, and a value field problem: 31 problems, 20 listed.
    const lines = log.csv.split('\n')
    for (let i = 1; i <= 30; i++) lines[i] = lines[i]!.replace(/^([^,]+),[^,]+/, '$1,abc')
    const r = await refused(lines.join('\n'), withMeasurement('d_throat', { value: 60, unit: 'mm' }))
    expect(r.status).toBe(422)
    expect(r.issues).toHaveLength(20)
    expect(r.more).toBe(11)
    expect(r.message).toMatch(/^31 problems/)
  })
})

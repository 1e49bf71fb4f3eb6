import { describe, expect, it } from 'vitest'
import { checkHandIn } from '../../../shared/grading/check-hand-in'
import type { HandInLog, HandInPayload, TypedValue } from '../../../shared/grading/check-hand-in'
import { parseLog } from '../../../shared/grading/csv'
import { AssignmentSchema } from '../../../shared/modules/schema'
import { StudentAssignmentSchema } from '../../../shared/schemas/student-module-spec'
import { PSI } from '../../../shared/physics/constants'
import { expectClose } from '../../helpers/expect-close'

const spec = AssignmentSchema.parse({
  tables: [
    {
      key: 'run',
      label: 'Run log',
      minRows: 3,
      columns: [
        { key: 't', label: 'Time', unit: 's', role: 'time' },
        { key: 'thrust', label: 'Thrust', unit: 'N', role: 'thrust' },
        { key: 'p_chamber', label: 'Chamber pressure', unit: 'kPa', pressure: 'gauge', role: 'chamber-pressure' },
      ],
    },
  ],
  measurements: [
    {
      key: 'p_ambient',
      label: 'Barometer',
      unit: 'kPa',
      pressure: 'absolute',
      role: 'ambient-pressure',
      min: 60,
      max: 110,
    },
    { key: 'p_initial', label: 'Charge pressure', unit: 'kPa', pressure: 'absolute', min: 100, max: 1500 },
    { key: 'd_throat', label: 'Throat diameter', unit: 'mm', role: 'throat-diameter' },
    { key: 'air_t', label: 'Air temperature', unit: 'degC' },
  ],
  results: [
    { key: 'impulse', label: 'Total impulse', unit: 'N*s', expected: '1', tolerance: { relative: 0.05 }, points: 2 },
    { key: 'mdot', label: 'Mass flow', unit: 'kg/s', expected: '1', tolerance: { relative: 0.05 }, points: 2 },
    {
      key: 'regime',
      label: 'Expansion regime',
      unit: '1',
      expected: '3',
      tolerance: { absolute: 0 },
      points: 1,
      regime: { pressureRatio: '0.1', areaRatio: '2' },
    },
  ],
})

const CSV = 'time (s),thrust [N],pc (kPa)\n0,0,0\n0.01,5,300\n0.02,6,310\n0.03,0,0\n'
const MAPPING = {
  t: { header: 'time (s)', unit: 's' },
  thrust: { header: 'thrust [N]', unit: 'N' },
  p_chamber: { header: 'pc (kPa)', unit: 'kPa', pressure: 'gauge' as const },
}
const bytes = (text: string) => new TextEncoder().encode(text)

function log(text: string, mapping = MAPPING, filename = 'run.csv'): HandInLog {
  return {
    state: 'read',
    filename,
    size: bytes(text).length,
    head: bytes(text).slice(0, 8192),
    parse: () => parseLog(text, spec.tables[0]!, mapping),
  }
}

function good(): HandInPayload {
  return {
    mappings: { run: MAPPING },
    measurements: {
      p_ambient: { value: 84.2, unit: 'kPa' },
      p_initial: { value: 600, unit: 'kPa' },
      d_throat: { value: 4.2, unit: 'mm' },
      air_t: { value: 21, unit: 'degC' },
    },
    reported: {
      impulse: { value: 1.5, unit: 'N*s' },
      mdot: { value: 12, unit: 'g/s' },
      regime: { value: 3, unit: '1' },
    },
  }
}

function withMeasurement(key: string, typed: TypedValue | undefined): HandInPayload {
  const p = good()
  if (typed) p.measurements[key] = typed
  else delete p.measurements[key]
  return p
}
function withResult(key: string, typed: TypedValue | undefined): HandInPayload {
  const p = good()
  if (typed) p.reported[key] = typed
  else delete p.reported[key]
  return p
}

/** The single problem of a check, which must concern `field`. */
function only(payload: HandInPayload, files: Record<string, HandInLog | undefined> = { run: log(CSV) }) {
  const v = checkHandIn(spec, payload, files)
  expect(v.issues, JSON.stringify(v.issues)).toHaveLength(1)
  return v.issues[0]!
}

describe('a hand-in with every value and a good log', () => {
  const v = checkHandIn(spec, good(), { run: log(CSV) })

  it('has no problems', () => {
    expect(v.issues).toEqual([])
    expect(v.totalIssues).toBe(0)
  })

  it('gives the measurements in SI (Pa, m, K) and the results in their spec unit', () => {
    expect(v.measurements.p_ambient).toBeCloseTo(84_200, 9)
    expect(v.measurements.d_throat).toBeCloseTo(0.0042, 12)
    expect(v.measurements.air_t).toBeCloseTo(294.15, 9)
    // 12 g/s is 0.012 kg/s, the result's own unit.
    expect(v.reported.mdot).toBeCloseTo(0.012, 12)
    expect(v.reported.regime).toBe(3)
  })

  it('gives the log columns in SI and records the gauge reading of a gauge column as the spec reads it', () => {
    expect(v.tables.run?.p_chamber).toEqual([0, 300_000, 310_000, 0])
    expect(v.tables.run?.t).toEqual([0, 0.01, 0.02, 0.03])
    expect(v.logs.run?.rowCount).toBe(4)
    expect(v.pressures).toEqual({})
  })
})

describe('typed measurements: each rule names the field and its label', () => {
  it('a missing value', () => {
    expect(only(withMeasurement('d_throat', undefined))).toEqual({
      field: 'measurements.d_throat',
      message: 'Throat diameter: enter a value.',
    })
  })

  it('text that is not a number, quoted as typed', () => {
    expect(only(withMeasurement('d_throat', { value: Number.NaN, unit: 'mm', text: ' 4,2mm ' }))).toEqual({
      field: 'measurements.d_throat',
      message: 'Throat diameter: “4,2mm” is not a number; write it with a point for decimals, like 84.2.',
    })
  })

  it('a unit of another kind', () => {
    const issue = only(withMeasurement('d_throat', { value: 4.2, unit: 'kPa' }))
    expect(issue.field).toBe('measurements.d_throat')
    expect(issue.message).toBe('Throat diameter: kPa is not a unit of the right kind; use mm or a unit like it.')
  })

  it('a value that is not finite once in SI', () => {
    const issue = only(withMeasurement('p_initial', { value: 1e308, unit: 'psi' }))
    expect(issue).toEqual({
      field: 'measurements.p_initial',
      message: expect.stringMatching(/^Charge pressure: 1e\+308 psi is too large/),
    })
  })

  it('a temperature below absolute zero', () => {
    expect(only(withMeasurement('air_t', { value: -300, unit: 'degC' })).message).toMatch(
      /^Air temperature: -300 degC is below absolute zero/,
    )
  })

  it('a negative diameter', () => {
    expect(only(withMeasurement('d_throat', { value: -1, unit: 'mm' })).message).toBe(
      'Throat diameter: -1 mm is negative; a diameter cannot be negative.',
    )
  })

  it('an absolute pressure below 0', () => {
    expect(only(withMeasurement('p_initial', { value: -5, unit: 'kPa', pressure: 'absolute' })).message).toBe(
      'Charge pressure: -5 kPa absolute is below 0; an absolute pressure cannot be below 0.',
    )
  })

  it('a gauge pressure that is below 0 absolute with the barometer reading', () => {
    // -100 kPa gauge with 84.2 kPa ambient is -15.8 kPa absolute.
    expect(only(withMeasurement('p_initial', { value: -100, unit: 'kPa', pressure: 'gauge' })).message).toBe(
      'Charge pressure: -100 kPa gauge is -15.8 kPa absolute with the barometer of 84.2 kPa; an absolute pressure cannot be below 0.',
    )
  })

  it('a gauge reading of an absolute quantity, converted with the barometer, in SI as read', () => {
    // 70 psi gauge = 482.633 kPa gauge = 566.833 kPa absolute with 84.2 kPa ambient: inside 100–1500.
    const v = checkHandIn(spec, withMeasurement('p_initial', { value: 70, unit: 'psi', pressure: 'gauge' }), {
      run: log(CSV),
    })
    expect(v.issues).toEqual([])
    expectClose(v.measurements.p_initial as number, 70 * PSI, 1e-12)
    expect(v.pressures).toEqual({ p_initial: 'gauge' })
  })

  it('a gauge reading of an absolute quantity without the barometer reading', () => {
    const p = withMeasurement('p_initial', { value: 70, unit: 'psi', pressure: 'gauge' })
    delete p.measurements.p_ambient
    const v = checkHandIn(spec, p, { run: log(CSV) })
    expect(v.issues).toEqual([
      { field: 'measurements.p_ambient', message: 'Barometer: enter a value.' },
      {
        field: 'measurements.p_initial',
        message: 'Charge pressure: give the ambient pressure so a gauge reading can be converted to absolute.',
      },
    ])
  })

  it('below the plausible minimum and above the plausible maximum, in the spec unit and sense', () => {
    expect(only(withMeasurement('p_ambient', { value: 50, unit: 'kPa' })).message).toBe(
      'Barometer: 50 kPa is below the plausible minimum of 60 kPa.',
    )
    // 2 bar gauge is 284.2 kPa absolute: fine; 20 bar gauge is 2084.2 kPa absolute: too high.
    expect(
      checkHandIn(spec, withMeasurement('p_initial', { value: 2, unit: 'bar', pressure: 'gauge' }), { run: log(CSV) })
        .issues,
    ).toEqual([])
    expect(only(withMeasurement('p_initial', { value: 20, unit: 'bar', pressure: 'gauge' })).message).toBe(
      'Charge pressure: 2084.2 kPa is above the plausible maximum of 1500 kPa.',
    )
  })
})

describe('reported results', () => {
  it('a missing result; a missing regime asks for the regime', () => {
    expect(only(withResult('impulse', undefined))).toEqual({
      field: 'reported.impulse',
      message: 'Total impulse: enter your result.',
    })
    expect(only(withResult('regime', undefined))).toEqual({
      field: 'reported.regime',
      message: 'Expansion regime: choose the regime.',
    })
  })

  it('text that is not a number', () => {
    expect(only(withResult('impulse', { value: Number.NaN, unit: 'N*s', text: 'abc' })).message).toBe(
      'Total impulse: “abc” is not a number; write it with a point for decimals, like 0.672.',
    )
  })

  it('a unit of another kind', () => {
    expect(only(withResult('mdot', { value: 1, unit: 'N*s' })).message).toBe(
      'Mass flow: N*s is not a unit of the right kind; use kg/s.',
    )
  })

  it('a value too large for SI', () => {
    expect(only(withResult('impulse', { value: 1e308, unit: 'lbf*s' })).message).toMatch(
      /^Total impulse: 1e\+308 lbf\*s is too large/,
    )
  })

  it('a regime code that is none of the regimes', () => {
    expect(only(withResult('regime', { value: 9, unit: '1' })).message).toMatch(
      /^Expansion regime: choose one of the regimes \(1 /,
    )
  })
})

describe('the log file of each table', () => {
  it('no file attached', () => {
    expect(only(good(), {})).toEqual({ field: 'table:run', message: 'Run log: attach the log file (CSV).' })
  })

  it('a file still being read, and one the browser could not read', () => {
    expect(only(good(), { run: { state: 'reading', filename: 'a.csv' } }).message).toBe(
      'Run log: a.csv is still being read; wait a moment.',
    )
    expect(only(good(), { run: { state: 'unreadable', filename: 'a.csv', reason: 'permission denied' } }).message).toBe(
      'Run log: a.csv could not be read (permission denied); choose it again.',
    )
  })

  it('an empty file', () => {
    expect(only(good(), { run: log('', MAPPING, 'empty.csv') })).toEqual({
      field: 'table:run',
      message: 'Run log: empty.csv is empty.',
    })
  })

  it('a binary file is refused without being parsed', () => {
    const png = new Uint8Array([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 0])
    let parsed = false
    const issue = only(good(), {
      run: {
        state: 'read',
        filename: 'photo.png',
        size: png.length,
        head: png,
        parse: () => {
          parsed = true
          return parseLog('', spec.tables[0]!, MAPPING)
        },
      },
    })
    expect(issue.field).toBe('table:run')
    expect(issue.message).toMatch(/^Run log: photo\.png: This file is .*not a CSV text file/)
    expect(parsed).toBe(false)
  })

  it('no mapping for the table', () => {
    const p = good()
    p.mappings = {}
    expect(only(p).message).toBe("Run log: match the file's columns to the log's quantities.")
  })

  it("the log's own problems keep their row and column", () => {
    const bad = CSV.replace('0.01,5,300', '0.01,n/a,300')
    const issue = only(good(), { run: log(bad) })
    expect(issue).toMatchObject({ field: 'table:run', row: 3, column: 'thrust [N]' })
    expect(issue.message).toContain('n/a')
  })

  it('counts the problems a log found but did not list', () => {
    const rows = ['time (s),thrust [N],pc (kPa)', ...Array.from({ length: 60 }, (_, i) => `${i / 100},x,1`)]
    const v = checkHandIn(spec, good(), { run: log(`${rows.join('\n')}\n`) })
    expect(v.issues.length).toBeLessThan(60)
    expect(v.totalIssues).toBe(60)
  })
})

describe("the student's view of the spec is enough for the check", () => {
  it('gives the same problems and values as the full spec', () => {
    const student = StudentAssignmentSchema.parse(spec)
    const p = withMeasurement('d_throat', { value: -1, unit: 'mm' })
    p.reported.regime = { value: 7, unit: '1' }
    const bad = CSV.replace('0.01,5,300', '0.01,n/a,300')
    const full = checkHandIn(spec, p, { run: log(bad) })
    expect(full.issues).toHaveLength(3)
    expect(checkHandIn(student, p, { run: log(bad) })).toEqual(full)
  })
})

describe('the moment a photograph was taken', () => {
  const withPhoto = AssignmentSchema.parse({
    ...spec,
    measurements: [...spec.measurements, { key: 't_photo', label: 'Time of the photograph', unit: 's' }],
    images: [{ key: 'jet', label: 'Shadowgraph of the jet', takenAt: 't_photo' }],
  })
  const at = (value: number, unit = 's') => {
    const p = good()
    p.measurements.t_photo = { value, unit }
    return p
  }

  it('passes within the run log, in any time unit', () => {
    expect(checkHandIn(withPhoto, at(0.015), { run: log(CSV) }).issues).toEqual([])
    expect(checkHandIn(withPhoto, at(20, 'ms'), { run: log(CSV) }).issues).toEqual([])
  })

  it('is refused outside the run log, naming the field, the log and its span', () => {
    const v = checkHandIn(withPhoto, at(2.5), { run: log(CSV) })
    expect(v.issues).toEqual([
      {
        field: 'measurements.t_photo',
        message:
          'Time of the photograph: 2.5 s is outside run log (0 to 0.03 s); give the time of "Shadowgraph of the jet" in the log\'s own time.',
      },
    ])
    // The student's view of the spec gives the same problem in the browser.
    expect(checkHandIn(StudentAssignmentSchema.parse(withPhoto), at(2.5), { run: log(CSV) }).issues).toEqual(v.issues)
  })
})

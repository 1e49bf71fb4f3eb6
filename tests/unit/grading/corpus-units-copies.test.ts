/**
 * Corpus of generated stand logs (invented test data, see stand-logs.ts): load cells logged in
 * grams, kilogram-force and pound-force, read right and read wrong; and another group's log copied
 * with a digit edited, its time shifted, or its columns rescaled. Each log's truth comes from the
 * closed forms in stand-logs.ts; each expected result, flag and non-flag is checked.
 */
import { describe, expect, it } from 'vitest'
import { parseLog, suggestMapping } from '../../../shared/grading/csv'
import type { ColumnMapping } from '../../../shared/grading/csv'
import { NEAR_COPY_CORRELATION, logFingerprint, nearCopy, nearCopyMessage } from '../../../shared/grading/fingerprint'
import type { LogFingerprint } from '../../../shared/grading/fingerprint'
import { THRUST_BELOW_IDEAL_FRACTION, gradeSubmission } from '../../../shared/grading/grade'
import type { GradeResult } from '../../../shared/grading/grade'
import { DEMO_WRONG_RUNS, coldFlowAssignment, demoRuns } from '../../../scripts/demo/demo-runs'
import { expectClose } from '../../helpers/expect-close'
import { NEWTONS_PER, REST, csvOf, rowsOf, standAssignment, standLog } from './stand-logs'
import type { StandLog } from './stand-logs'

const assignment = standAssignment()
const table = assignment.tables[0]!
const PSI = 4.4482216152605 / 0.00064516

function parsed(
  log: { csv: string; headers: readonly string[] },
  override: Partial<Record<string, { unit: string }>> = {},
) {
  const suggested = suggestMapping(log.headers, table)
  const mapping: ColumnMapping = Object.fromEntries(
    Object.entries(suggested).map(([k, e]) => [k, override[k] ? { ...e, ...override[k] } : e]),
  )
  const r = parseLog(log.csv, table, mapping)
  if (!r.ok) throw new Error(r.errors.map((e) => e.message).join('; '))
  return { r, mapping }
}

function grade(log: StandLog, override: Partial<Record<string, { unit: string }>> = {}): GradeResult {
  const { r } = parsed(log, override)
  return gradeSubmission({
    assignment,
    data: { tables: { run: r.columns }, measurements: log.measurements, pressures: r.pressures },
    reported: {},
  })
}

function trapezoid(t: readonly number[], f: readonly number[]): number {
  let s = 0
  for (let i = 1; i < t.length; i++) s += ((f[i]! + f[i - 1]!) / 2) * (t[i]! - t[i - 1]!)
  return s
}

function codes(g: GradeResult): string[] {
  return g.flags.map((f) => f.code)
}

describe('load cells logged in grams and kilogram-force, mapped as suggested', () => {
  const grams = standLog({ forceUnit: 'gf', thrustHeader: 'load [g]', seed: 11 })
  const kilograms = standLog({ forceUnit: 'kgf', thrustHeader: 'thrust (kg)', seed: 12 })

  it('the mapping suggests gf and kgf for headers "load [g]" and "thrust (kg)"', () => {
    expect(parsed(grams).mapping.thrust).toEqual({ header: 'load [g]', unit: 'gf' })
    expect(parsed(kilograms).mapping.thrust).toEqual({ header: 'thrust (kg)', unit: 'kgf' })
  })

  it.each([
    ['grams', grams],
    ['kilogram-force', kilograms],
  ])(
    '%s: the thrust arrives in newtons, the impulse is the trapezoid of the true thrust, and no thrust flag is raised',
    (_, log) => {
      const { r } = parsed(log)
      const thrust = r.columns.thrust!
      thrust.forEach((f, i) => expectClose(f, log.truth.thrustN[i]!, 1e-12, `sample ${i}`))
      const g = grade(log)
      expectClose(g.checks[0]!.expected!, trapezoid(log.truth.t, log.truth.thrustN), 1e-9, 'impulse')
      expect(codes(g)).not.toContain('thrust-below-ideal')
      expect(codes(g)).not.toContain('thrust-above-ideal')
    },
  )
})

describe('thrust well below the ideal: a force unit read wrong', () => {
  it('a load cell logged in lbf but read as newtons is flagged, with the ratio 0.92/4.448 and the likely cause named', () => {
    const log = standLog({ forceUnit: 'lbf', seed: 21 })
    expect(parsed(log).mapping.thrust?.unit).toBe('lbf')
    expect(codes(grade(log))).not.toContain('thrust-below-ideal')
    const flag = grade(log, { thrust: { unit: 'N' } }).flags.find((f) => f.code === 'thrust-below-ideal')
    expect(flag).toBeDefined()
    // The logged numbers are the thrust in lbf: read as N, 1/4.4482216152605 of the truth.
    expectClose(flag!.detail!.ratio as number, 0.92 / NEWTONS_PER.lbf, 0.03)
    expect(flag!.message).toMatch(/kgf but read as newtons/)
    expect(flag!.message).toMatch(/lbf/)
    expect(flag!.message).toMatch(/9\.81/)
    expect(flag!.message).toMatch(/4\.45/)
  })

  it('a load cell logged in kgf but read as newtons is flagged (ratio 0.92/9.80665)', () => {
    const log = standLog({ forceUnit: 'kgf', thrustHeader: 'thrust (kg)', seed: 22 })
    const flag = grade(log, { thrust: { unit: 'N' } }).flags.find((f) => f.code === 'thrust-below-ideal')
    expectClose(flag!.detail!.ratio as number, 0.92 / NEWTONS_PER.kgf, 0.03)
  })

  it(`judges the choked part of the run through a median: a poor nozzle at 45 % of the ideal passes, one at 35 % does not (threshold ${THRUST_BELOW_IDEAL_FRACTION * 100} %)`, () => {
    expect(codes(grade(standLog({ efficiency: 0.45, seed: 23 })))).not.toContain('thrust-below-ideal')
    expect(codes(grade(standLog({ efficiency: 0.35, seed: 23 })))).toContain('thrust-below-ideal')
  })

  it('a ringing spike at the valve opening does not rescue a wrong unit, nor does a dropout flag a right one', () => {
    const wrong = standLog({ forceUnit: 'lbf', seed: 24 })
    const rows = rowsOf(wrong.csv)
    rows[1 + REST + 6]![1] = '500'
    expect(codes(grade({ ...wrong, csv: csvOf(rows) }, { thrust: { unit: 'N' } }))).toContain('thrust-below-ideal')
    const right = standLog({ seed: 25 })
    const dropped = rowsOf(right.csv)
    for (let i = 0; i < 3; i++) dropped[1 + REST + 200 + i * 50]![1] = '0'
    expect(codes(grade({ ...right, csv: csvOf(dropped) }))).not.toContain('thrust-below-ideal')
  })

  it('says nothing about a run whose nozzle never chokes (chamber below pa/0.9088, the choke limit of ε = 1.6875)', () => {
    // NACA 1135 Table I: A/A* = 1.6875 at M = 0.3722 (subsonic), p/p0 = 0.9088; 84 kPa / 0.9088 = 92.4 kPa.
    const log = standLog({ startPressure: 91e3, tau: 1e9, efficiency: 0.05, seed: 26 })
    expect(codes(grade(log))).not.toContain('thrust-below-ideal')
  })
})

// ---------------------------------------------------------------------------------------------
// Near-copies.

function fingerprint(
  log: { csv: string; headers: readonly string[] },
  override: Partial<Record<string, { unit: string }>> = {},
): LogFingerprint {
  const fp = logFingerprint(table, parsed(log, override).r.columns)
  if (!fp) throw new Error('no fingerprint')
  // Stored as JSON with the file: compare what comes back.
  return JSON.parse(JSON.stringify(fp)) as LogFingerprint
}

function pearson(x: readonly number[], y: readonly number[]): number {
  const n = x.length
  const mx = x.reduce((s, v) => s + v, 0) / n
  const my = y.reduce((s, v) => s + v, 0) / n
  let sxy = 0
  let sxx = 0
  let syy = 0
  for (let i = 0; i < n; i++) {
    sxy += (x[i]! - mx) * (y[i]! - my)
    sxx += (x[i]! - mx) ** 2
    syy += (y[i]! - my) ** 2
  }
  return sxy / Math.sqrt(sxx * syy)
}

describe('near-copies of another group’s log', () => {
  const original = standLog({ seed: 31 })
  const a = fingerprint(original)

  it('a byte-identical file matches itself in every column', () => {
    const m = nearCopy(a, fingerprint(original))
    expect(m?.columns.map((c) => c.key).sort()).toEqual(['p_chamber', 'thrust'])
  })

  it('an edited copy (one digit of one thrust value changed, inside the run) is flagged after rounding', () => {
    const rows = rowsOf(original.csv)
    const cell = rows[1 + REST + 100]![1]!
    // The first digit, e.g. 31.415 → 91.415.
    rows[1 + REST + 100]![1] = `${cell[0] === '9' ? '1' : '9'}${cell.slice(1)}`
    expect(csvOf(rows)).not.toBe(original.csv)
    const m = nearCopy(a, fingerprint({ ...original, csv: csvOf(rows) }))
    const thrust = m?.columns.find((c) => c.key === 'thrust')
    expect(thrust?.how).toBe('rounded')
    expect(thrust!.roundedShare).toBeGreaterThan(0.99)
    expect(thrust!.roundedShare).toBeLessThan(1)
  })

  it('a time-shifted copy (12.34 s added, the first 60 rows cut) is flagged', () => {
    const rows = rowsOf(original.csv)
    const shifted = [rows[0]!, ...rows.slice(61).map((r) => [(Number(r[0]) + 12.34).toFixed(2), ...r.slice(1)])]
    const m = nearCopy(a, fingerprint({ ...original, csv: csvOf(shifted) }))
    expect(m?.columns.map((c) => c.key).sort()).toEqual(['p_chamber', 'thrust'])
  })

  it('a copy of a kgf log rescaled to newtons (× 9.80665, 3 decimals) is flagged: in SI its values are the original’s to 1 mN', () => {
    const kgfLog = standLog({ forceUnit: 'kgf', thrustHeader: 'thrust (kg)', seed: 32 })
    const rows = rowsOf(kgfLog.csv)
    const headers = ['t', 'thrust [N]', rows[0]![2]!]
    const inNewtons = [headers, ...rows.slice(1).map((r) => [r[0]!, (Number(r[1]) * 9.80665).toFixed(3), r[2]!])]
    const m = nearCopy(fingerprint(kgfLog), fingerprint({ csv: csvOf(inNewtons), headers }))
    const thrust = m?.columns.find((c) => c.key === 'thrust')
    expect(thrust?.how).toBe('rounded')
  })

  it('a copy whose columns differ in scale and zero once in SI (kgf taken as N and tared, pressure re-zeroed and in psi), time shifted, is flagged in every column by correlation', () => {
    const kgfLog = standLog({ forceUnit: 'kgf', thrustHeader: 'thrust (kg)', seed: 33 })
    const rows = rowsOf(kgfLog.csv)
    const headers = ['time', 'thrust [N]', 'pc (psig)']
    const converted = [
      headers,
      ...rows.slice(1).map((r) => [
        (Number(r[0]) + 3.5).toFixed(2),
        // The kgf numbers kept but called newtons, with the 0.2 N zero taken off in kgf.
        (Number(r[1]) - 0.2 / 9.80665).toFixed(4),
        (((Number(r[2]) + 1.5) * 1000) / PSI).toFixed(4),
      ]),
    ]
    const m = nearCopy(fingerprint(kgfLog), fingerprint({ csv: csvOf(converted), headers }))
    expect(m?.columns.map((c) => [c.key, c.how]).sort()).toEqual([
      ['p_chamber', 'correlated'],
      ['thrust', 'correlated'],
    ])
    for (const c of m!.columns) expect(c.correlation!).toBeGreaterThan(NEAR_COPY_CORRELATION)
    expect(nearCopyMessage('b2.csv', 'group B2', m!)).toMatch(/thrust, p_chamber carry the same sample-to-sample noise/)
  })

  it('an honest run of the same nozzle from the same charge is not flagged, though its values correlate above 0.9999', () => {
    const honest = standLog({ seed: 34 })
    // Why the values alone cannot decide: two honest runs' chamber pressures correlate above 0.9999.
    expect(pearson(original.truth.chamber, honest.truth.chamber)).toBeGreaterThan(0.9999)
    expect(nearCopy(a, fingerprint(honest))).toBeNull()
  })

  it('an honest run at another charge, barometer and load-cell zero is not flagged', () => {
    const honest = standLog({ seed: 35, startPressure: 8.8e5, ambient: 84.4e3, offset: 0.3 })
    expect(nearCopy(a, fingerprint(honest))).toBeNull()
  })

  it('twelve honest runs, some with a quieter load cell and transducer, give no near-copy among their 66 pairs', () => {
    const runs = Array.from({ length: 12 }, (_, i) =>
      fingerprint(
        standLog({
          seed: 200 + i,
          noise: i % 3 === 0 ? 0.01 : 0.08,
          pressureNoise: i % 3 === 0 ? 50 : 300,
          startPressure: 8.8e5 + 4e3 * i,
        }),
      ),
    )
    const pairs: string[] = []
    for (let i = 0; i < runs.length; i++)
      for (let j = i + 1; j < runs.length; j++) if (nearCopy(runs[i]!, runs[j]!)) pairs.push(`${i}-${j}`)
    expect(pairs).toEqual([])
  })
})

describe('the demo course’s runs (demo data)', () => {
  it('the only near-copies among the demo groups are the copies the scenario made on purpose', () => {
    const demo = coldFlowAssignment()
    const runTable = demo.tables[0]!
    const prints = demoRuns(demo).map((r) => {
      const p = parseLog(r.csv, runTable, r.mapping)
      if (!p.ok) throw new Error(`demo run ${r.group} does not parse`)
      return { group: r.group, fp: logFingerprint(runTable, p.columns)! }
    })
    const found: string[] = []
    for (let i = 0; i < prints.length; i++) {
      for (let j = i + 1; j < prints.length; j++)
        if (nearCopy(prints[i]!.fp, prints[j]!.fp)) found.push([prints[i]!.group, prints[j]!.group].sort().join('~'))
    }
    const made = DEMO_WRONG_RUNS.flatMap((w) => (w.copiesGroup ? [[w.group, w.copiesGroup].sort().join('~')] : []))
    expect(made.length).toBeGreaterThan(0)
    expect(found.sort()).toEqual(made.sort())
  })
})

import { describe, expect, it } from 'vitest'
import { DEMO_GROUPS, demoRuns } from '../../scripts/demo/demo-runs'
import type { DemoRun } from '../../scripts/demo/demo-runs'
import { HOT_FIRE_STAND, HOT_FIRE_WRONG_RUNS, hotFireAssignment, hotFireRuns } from '../../scripts/demo/hot-fire-runs'
import { parseLog } from '../../shared/grading/csv'
import { gradeSubmission } from '../../shared/grading/grade'
import type { GradeResult } from '../../shared/grading/grade'
import { valueToSI } from '../../shared/modules/quantities'

const assignment = hotFireAssignment()
const table = assignment.tables[0]!
const cold = demoRuns()
const runs = hotFireRuns(assignment, cold)

function graded(run: DemoRun): GradeResult {
  const parsed = parseLog(run.csv, table, run.mapping)
  if (!parsed.ok) throw new Error(`${run.group}: ${JSON.stringify(parsed.errors)}`)
  const measurements = Object.fromEntries(
    assignment.measurements.map((m) => [m.key, valueToSI(run.measurements[m.key] as number, m.unit)]),
  )
  return gradeSubmission({
    assignment,
    data: { tables: { [table.key]: parsed.columns }, measurements, pressures: parsed.pressures },
    reported: run.reported,
  })
}

const results = new Map(runs.map((r) => [r.group, graded(r)]))
const wrong = new Map(HOT_FIRE_WRONG_RUNS.map((w) => [w.group, w]))
const efficiency = (group: string) => results.get(group)!.checks.find((c) => c.key === 'cstar_efficiency')!.expected!

describe('the demo hot-fire runs (our own model: the combustion library and the blow-down)', () => {
  it('are one per demo lab group, the same every time (seeded)', () => {
    expect(runs.map((r) => r.group)).toEqual(DEMO_GROUPS)
    expect(hotFireRuns(assignment, cold)).toEqual(runs)
  })

  it("parse against the hot-fire module's table with at least its minimum rows, in kPa gauge at rest", () => {
    for (const run of runs) {
      const parsed = parseLog(run.csv, table, run.mapping)
      expect(parsed.ok, run.group).toBe(true)
      if (!parsed.ok) continue
      expect(parsed.rowCount).toBeGreaterThanOrEqual(table.minRows)
      const [, , receiver, chamber] = run.csv.split('\n')[1]!.split(',').map(Number)
      // The transducer's zero (within ±1.5 kPa) and its noise (0.3 kPa).
      expect(Math.abs(chamber!), run.group).toBeLessThan(3)
      expect(receiver!).toBeCloseTo(run.measurements.p_initial!, -1)
    }
  })

  it('every group reduced its run carefully: full marks, every result within its tolerance', () => {
    for (const [group, g] of results) {
      expect(
        g.checks.filter((c) => c.outcome !== 'pass').map((c) => c.key),
        group,
      ).toEqual([])
      expect(g.rawScore, group).toBe(g.maxScore)
    }
  })

  it('the sound runs raise no flag and reach the c* efficiency the model gave them', () => {
    for (const [group, g] of results) {
      if (wrong.has(group)) continue
      expect(
        g.flags.map((f) => f.code),
        group,
      ).toEqual([])
      // The model's efficiency, read back through the module's definitions (run window, masses).
      expect(efficiency(group), group).toBeGreaterThan(HOT_FIRE_STAND.cstarEfficiency[0] - 0.02)
      expect(efficiency(group), group).toBeLessThan(HOT_FIRE_STAND.cstarEfficiency[1] + 0.02)
    }
  })

  it('each run wrong on purpose raises exactly its flags', () => {
    expect([...wrong.keys()].sort()).toEqual(['A4', 'B1', 'B4'])
    for (const w of HOT_FIRE_WRONG_RUNS) {
      const codes = results.get(w.group)!.flags.map((f) => f.code)
      expect([...codes].sort(), w.group).toEqual([...w.flags].sort())
    }
  })

  it('B1 works out to a c* efficiency above 1; B4 to a higher one than its combustor reached, and a mixture below φ 0.51', () => {
    expect(efficiency('B1')).toBeGreaterThan(1)
    expect(efficiency('B4')).toBeGreaterThan(HOT_FIRE_STAND.cstarEfficiency[1])
    expect(efficiency('B4')).toBeLessThan(1)
    const phi = results.get('B4')!.checks.find((c) => c.key === 'equivalence_ratio')!.expected!
    expect(phi).toBeLessThan(0.51)
    expect(phi).toBeGreaterThan(0.4)
  })

  it('A4’s hard start lifts the chamber above the receiver only at ignition, within the transducers’ span', () => {
    const rows = runs
      .find((r) => r.group === 'A4')!
      .csv.trim()
      .split('\n')
      .slice(1)
      .map((l) => l.split(',').map(Number))
    const above = rows.filter((r) => r[3]! - r[2]! > 10)
    expect(above.length).toBeGreaterThan(0)
    expect(above.length).toBeLessThan(10)
    for (const r of rows) expect(r[3]!).toBeLessThan(1000)
  })

  it('burning fuel more than doubles the specific impulse over each group’s cold flow', () => {
    for (const run of runs) {
      const ratio = results.get(run.group)!.checks.find((c) => c.key === 'isp_ratio')!.expected!
      expect(ratio, run.group).toBeGreaterThan(2)
    }
  })
})

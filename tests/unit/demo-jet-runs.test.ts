import sharp from 'sharp'
import { describe, expect, it } from 'vitest'
import { DEMO_JET_GROUPS, DEMO_JET_WRONG_SCALE, STOP_GAUGE, jetAssignment, jetRuns } from '../../scripts/demo/jet-runs'
import type { DemoJetRun } from '../../scripts/demo/jet-runs'
import { parseLog } from '../../shared/grading/csv'
import { checkMarks, measureJet } from '../../shared/images/jet-marks'
import { evaluateExpression } from '../../shared/modules/expressions'
import { valueFromSI, valueToSI } from '../../shared/modules/quantities'
import { buildExpressionScope } from '../../shared/modules/scope'
import type { SubmissionData } from '../../shared/modules/scope'

const assignment = jetAssignment()
const table = assignment.tables[0]!
const spec = assignment.images[0]!
const runs = await jetRuns(assignment)

/** The hand-in as the sheet's expressions see it: the parsed log, the measurements and the marks, in SI. */
function data(run: DemoJetRun): SubmissionData {
  const parsed = parseLog(run.csv, table, run.mapping)
  if (!parsed.ok) throw new Error(`${run.group}: ${JSON.stringify(parsed.errors)}`)
  const m = measureJet(run.photo.marks)
  return {
    tables: { [table.key]: parsed.columns },
    measurements: Object.fromEntries(
      assignment.measurements.map((x) => [x.key, valueToSI(run.measurements[x.key] as number, x.unit)]),
    ),
    pressures: parsed.pressures,
    images: {
      [spec.key]: { cellSpacing: m.meanCellSpacing, machDisk: m.machDiskDistance, cellCount: m.cellSpacings.length },
    },
  }
}

/** Each result: passes when the reported value is within the tolerance of the expected, in the result's unit. */
function checks(run: DemoJetRun): Record<string, boolean> {
  const scope = buildExpressionScope(assignment, data(run), { units: 'si' })
  return Object.fromEntries(
    assignment.results.map((r) => {
      const expected = valueFromSI(evaluateExpression(r.expected, scope) as number, r.unit)
      const tolerance = Math.max(r.tolerance.absolute ?? 0, (r.tolerance.relative ?? 0) * Math.abs(expected))
      return [r.key, Math.abs((run.reported[r.key] as number) - expected) <= tolerance]
    }),
  )
}

function flags(run: DemoJetRun): string[] {
  const results = Object.fromEntries(
    assignment.results.map((r) => [r.key, valueToSI(run.reported[r.key] as number, r.unit)]),
  )
  const scope = buildExpressionScope(assignment, { ...data(run), results }, { units: 'si', withResults: true })
  return assignment.reviewRules.filter((rule) => evaluateExpression(rule.when, scope) === true).map((r) => r.key)
}

describe('the demo jet hand-ins', () => {
  it('are one per chosen group, the same every time (seeded)', async () => {
    expect(runs.map((r) => r.group)).toEqual(DEMO_JET_GROUPS)
    expect(DEMO_JET_GROUPS).toContain(DEMO_JET_WRONG_SCALE)
    const again = await jetRuns(assignment)
    expect(again.map((r) => r.csv)).toEqual(runs.map((r) => r.csv))
    expect(again.map((r, i) => r.photo.bytes.equals(runs[i]!.photo.bytes))).toEqual(runs.map(() => true))
    expect(again.map((r) => r.reported)).toEqual(runs.map((r) => r.reported))
  })

  it('log the chamber against the sheet’s table and stop the run once it falls below about 20 psi gauge', () => {
    for (const run of runs) {
      const parsed = parseLog(run.csv, table, run.mapping)
      expect(parsed.ok, run.group).toBe(true)
      if (!parsed.ok) continue
      expect(parsed.rowCount).toBeGreaterThanOrEqual(table.minRows)
      const kPa = run.csv
        .trim()
        .split('\n')
        .slice(1)
        .map((l) => Number(l.split(',')[1]))
      const peak = Math.max(...kPa)
      expect(peak, run.group).toBeGreaterThan(500)
      // The last sample of the run (before the valve closes and the log falls to 0) is just under the stop.
      const running = kPa.filter((p) => p > 50)
      expect(running.at(-1)! * 1000, run.group).toBeLessThan(STOP_GAUGE + 3000)
      // The photograph was taken while the chamber was well above it.
      const at = Math.round(run.measurements.t_photo! * 20)
      expect(kPa[at]! * 1000, run.group).toBeGreaterThan(2 * STOP_GAUGE)
    }
  })

  it('hand in PNG pictures whose marks pass the sheet’s rules', async () => {
    for (const run of runs) {
      const meta = await sharp(run.photo.bytes).metadata()
      expect(meta.format).toBe('png')
      const size = { width: meta.width, height: meta.height }
      expect(checkMarks(run.photo.marks, size, { cells: spec.cells, machDisk: spec.machDisk }), run.group).toEqual([])
    }
  })

  it('careful groups pass every check and raise no flag', () => {
    for (const run of runs.filter((r) => r.group !== DEMO_JET_WRONG_SCALE)) {
      expect(Object.values(checks(run)).every(Boolean), `${run.group} ${JSON.stringify(checks(run))}`).toBe(true)
      expect(flags(run), run.group).toEqual([])
    }
  })

  it('the group with its scale across half the exit fails the measured-spacing and ratio checks and is flagged to check the scale', () => {
    const run = runs.find((r) => r.group === DEMO_JET_WRONG_SCALE)!
    const outcome = checks(run)
    expect(outcome).toEqual({
      jet_mach: true,
      cell_theory: true,
      disk_theory: true,
      cell_measured: false,
      cell_ratio: false,
    })
    expect(flags(run)).toEqual(['check_the_scale'])
    // The marks measure about twice the true spacing.
    const m = measureJet(run.photo.marks).meanCellSpacing * 1000
    expect(m / run.reported.cell_measured!).toBeGreaterThan(1.8)
    expect(m / run.reported.cell_measured!).toBeLessThan(2.2)
  })
})

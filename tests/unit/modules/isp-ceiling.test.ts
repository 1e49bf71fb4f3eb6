/**
 * The cold-flow module's specific-impulse ceiling (content/02, review rule isp_above_limit): ideal
 * expansion from the peak chamber pressure to the logged barometric pressure, not to vacuum.
 */
import { readFileSync } from 'node:fs'
import { join } from 'node:path'
import { describe, expect, it } from 'vitest'
import { coldFlowAssignment, demoRuns } from '../../../scripts/demo/demo-runs'
import { parseLog } from '../../../shared/grading/csv'
import { gradeSubmission } from '../../../shared/grading/grade'
import { parseModuleSource } from '../../../shared/modules/front-matter'
import { valueToSI } from '../../../shared/modules/quantities'

const assignment = coldFlowAssignment()
const table = assignment.tables[0]!
// A demo group whose data are sound (demo data, invented).
const run = demoRuns(assignment).find((r) => r.group === 'A1')!
const parsed = parseLog(run.csv, table, run.mapping)
if (!parsed.ok) throw new Error('demo run A1 does not parse')
const measurements = Object.fromEntries(
  assignment.measurements.map((m) => [m.key, valueToSI(run.measurements[m.key]!, m.unit)]),
)

function ruleFires(isp: number): boolean {
  const graded = gradeSubmission({
    assignment,
    data: {
      tables: { [table.key]: parsed.ok ? parsed.columns : {} },
      measurements,
      pressures: parsed.ok ? parsed.pressures : {},
    },
    reported: { ...run.reported, isp },
  })
  return graded.flags.some((f) => f.code === 'rule:isp_above_limit')
}

// The ceiling written out here: Isp = √(2γ/(γ−1)·R·T0·(1 − (pa/p0)^((γ−1)/γ)))/g0 with the peak
// chamber pressure of the log made absolute with the barometer, γ = 1.4, R = 287.05 J/(kg·K).
const pa = measurements.p_ambient!
const p0 = Math.max(...(parsed.ok ? (parsed.columns.p_chamber as number[]) : [])) + pa
const t0 = measurements.t_air!
const ceiling = Math.sqrt(((2 * 1.4) / 0.4) * 287.05 * t0 * (1 - (pa / p0) ** (0.4 / 1.4))) / 9.80665
const vacuum = Math.sqrt(((2 * 1.4) / 0.4) * 287.05 * t0) / 9.80665

describe('the cold-flow module’s specific-impulse ceiling', () => {
  it('is about 54 s on the demo stand, against 78 s for expansion to vacuum', () => {
    expect(ceiling).toBeGreaterThan(53)
    expect(ceiling).toBeLessThan(55)
    expect(vacuum).toBeGreaterThan(77)
  })

  it('flags a reported specific impulse just above ideal expansion to ambient (60 s, below the vacuum figure), not one just below it', () => {
    expect(ruleFires(60)).toBe(true)
    expect(ruleFires(ceiling * 1.002)).toBe(true)
    expect(ruleFires(ceiling * 0.998)).toBe(false)
    expect(ruleFires(run.reported.isp!)).toBe(false)
  })
})

describe('the hot-fire module’s range for the cold-flow specific impulse', () => {
  const file = '03-hot-fire.md'
  const parsed = parseModuleSource(readFileSync(join(import.meta.dirname, '../../../content', file), 'utf8'), file)
  if (!parsed.ok) throw new Error(`content/${file} does not parse`)
  const ispCold = parsed.frontMatter.assignment?.measurements.find((m) => m.key === 'isp_cold')

  // The ceiling of every demo group's run, written out as above (demo data, invented).
  const ceilings = demoRuns(assignment).map((r) => {
    const p = parseLog(r.csv, table, r.mapping)
    if (!p.ok) throw new Error(`demo run ${r.group} does not parse`)
    const ambient = valueToSI(r.measurements.p_ambient!, 'kPa')
    const chamber = Math.max(...(p.columns.p_chamber as number[])) + ambient
    const air = valueToSI(r.measurements.t_air!, 'degC')
    return Math.sqrt(((2 * 1.4) / 0.4) * 287.05 * air * (1 - (ambient / chamber) ** (0.4 / 1.4))) / 9.80665
  })

  it('tops out a little above the stand’s ideal ceiling to ambient, well below expansion to vacuum', () => {
    const highest = Math.max(...ceilings)
    expect(ispCold?.max).toBeGreaterThan(highest)
    expect(ispCold?.max).toBeLessThan(1.15 * highest)
    expect(ispCold?.max).toBeLessThan(vacuum)
  })
})

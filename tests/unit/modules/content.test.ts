import { readFileSync, readdirSync } from 'node:fs'
import { join } from 'node:path'
import { describe, expect, it } from 'vitest'
import { checkModule } from '../../../shared/modules/check'
import { assignmentContexts, evaluateExpression, validateExpression } from '../../../shared/modules/expressions'
import { parseModuleSource } from '../../../shared/modules/front-matter'
import { lintModuleBody, renderModule } from '../../../shared/modules/render'
import type { Assignment, ModuleFrontMatter } from '../../../shared/modules/schema'
import { buildExpressionScope } from '../../../shared/modules/scope'
import type { SubmissionData } from '../../../shared/modules/scope'
import { expectClose } from '../../helpers/expect-close'
import { scanTags } from './html-scan'

const CONTENT = join(import.meta.dirname, '../../../content')
const files = readdirSync(CONTENT).filter((f) => f.endsWith('.md')).sort()

function load(file: string): { frontMatter: ModuleFrontMatter; body: string } {
  const parsed = parseModuleSource(readFileSync(join(CONTENT, file), 'utf8'), file)
  if (!parsed.ok) throw new Error(`${file}: ${parsed.errors.map((e) => e.message).join('\n')}`)
  return { frontMatter: parsed.frontMatter, body: parsed.body }
}

function assignmentOf(file: string): Assignment {
  const a = load(file).frontMatter.assignment
  if (!a) throw new Error(`${file} has no assignment`)
  return a
}

describe('the demo modules in content/', () => {
  it('are the three modules of the demo course', () => {
    expect(files).toEqual(['01-nozzle-flow-fundamentals.md', '02-cold-flow-characterisation.md', '03-hot-fire.md'])
  })

  it.each(files)('%s passes front-matter validation', (file) => {
    const parsed = parseModuleSource(readFileSync(join(CONTENT, file), 'utf8'), file)
    expect(parsed.ok ? [] : parsed.errors).toEqual([])
  })

  it.each(files)('every expression of %s validates against its own spec', (file) => {
    const assignment = load(file).frontMatter.assignment
    if (!assignment) return
    const contexts = assignmentContexts(assignment)
    for (const result of assignment.results) {
      expect(validateExpression(result.expected, contexts.expected), result.key).toEqual([])
    }
    for (const rule of assignment.reviewRules) {
      expect(validateExpression(rule.when, contexts.review), rule.key).toEqual([])
    }
  })

  it.each(files)('%s renders with KaTeX output and no body problems', (file) => {
    const { body } = load(file)
    const html = renderModule(body)
    expect(html).toContain('class="katex"')
    expect(html).toContain('<math')
    expect(html).not.toContain('katex-error')
    expect(html).not.toContain('isentrope-module-error')
    expect(lintModuleBody(body)).toEqual([])
  })

  it.each(files)('%s has no problems at all when checked as a whole', (file) => {
    expect(checkModule(readFileSync(join(CONTENT, file), 'utf8'), file, 'America/Denver').issues).toEqual([])
  })

  it('the nozzle-flow module is reading only and embeds the isentropic, blow-down, nozzle and normal-shock calculators', () => {
    const { frontMatter, body } = load('01-nozzle-flow-fundamentals.md')
    expect(frontMatter.assignment).toBeUndefined()
    const calculators = scanTags(renderModule(body)).filter((t) => t.attributes.class === 'isentrope-calculator')
    expect(calculators.map((c) => c.attributes['data-kind'])).toEqual(['isentropic', 'blowdown', 'nozzle', 'normal-shock'])
    const nozzle = JSON.parse(calculators[2]?.attributes['data-defaults'] ?? '{}') as Record<string, unknown>
    expect(nozzle).toMatchObject({ chamberPressure: 500, chamberPressureReading: 'gauge', throatDiameter: 4, exitDiameter: 4.9 })
  })

  it('the due dates are early 2027 in Denver: 17:00 MST is 00:00 UTC the next day, 17:00 MDT is 23:00 UTC', () => {
    const cold = checkModule(readFileSync(join(CONTENT, '02-cold-flow-characterisation.md'), 'utf8'), 'cold', 'UTC')
    expect(cold.dueAt?.toISOString()).toBe('2027-02-24T00:00:00.000Z')
    // US daylight saving time starts on 14 March 2027.
    const hot = checkModule(readFileSync(join(CONTENT, '03-hot-fire.md'), 'utf8'), 'hot', 'UTC')
    expect(hot.dueAt?.toISOString()).toBe('2027-03-23T23:00:00.000Z')
  })

  it('the hot-fire module carries the safety cautions and defers to local rules', () => {
    const { body } = load('03-hot-fire.md')
    for (const phrase of [
      'pressure vessel',
      'flammable gas',
      'Eye and hearing protection',
      'Remote operation',
      'burst protection',
      'not** a procedure',
      'Local codes',
      'lab-safety office',
      'licensed practice',
    ]) {
      expect(body, phrase).toContain(phrase)
    }
  })
})

// A hand-made cold-flow run whose results can be worked out on paper.
// Nozzle: 4 mm throat, exit area 1.6875 × throat area, the area ratio of Mach 2 in air.
// Log: 51 samples, t = 0, 0.2 … 10 s; thrust 0 N at both ends and 10 N in between; chamber at
// 400 kPa gauge in between (0 at the ends, so those samples are not choked); receiver at 500 kPa.
const D_THROAT_MM = 4
const D_EXIT_MM = 4 * Math.sqrt(1.6875)
const T = Array.from({ length: 51 }, (_, i) => i * 0.2)
const inside = (value: number) => T.map((_, i) => (i === 0 || i === 50 ? 0 : value))

function coldRun(thrustN: number): SubmissionData {
  return {
    tables: { run: { t: T, thrust: inside(thrustN), p_receiver: T.map(() => 500), p_chamber: inside(400) } },
    measurements: {
      p_ambient: 84,
      d_throat: D_THROAT_MM,
      d_exit: D_EXIT_MM,
      v_receiver: 50,
      p_initial: 600,
      p_final: 100,
      t_air: 20,
    },
  }
}

describe('the cold-flow module grades a run worked out by hand', () => {
  const assignment = assignmentOf('02-cold-flow-characterisation.md')
  const expected = (key: string, data: SubmissionData) => {
    const result = assignment.results.find((r) => r.key === key)
    if (!result) throw new Error(`no result ${key}`)
    return evaluateExpression(result.expected, buildExpressionScope(assignment, data))
  }
  const rule = (key: string, data: SubmissionData) => {
    const r = assignment.reviewRules.find((x) => x.key === key)
    if (!r) throw new Error(`no rule ${key}`)
    return evaluateExpression(r.when, buildExpressionScope(assignment, data, { withResults: true }))
  }
  const run = coldRun(10)

  // Trapezoid: 0.2·(0 + 10)/2 at each end plus 48 intervals of 0.2 s at 10 N = 1 + 1 + 96 N·s.
  const impulse = 98
  // Both receiver readings at 20 °C: m = (600 − 100) kPa · 50 L / (287.05 J/(kg K) · 293.15 K).
  const airMass = (500_000 * 0.05) / (287.05 * 293.15)
  // Absolute chamber pressure 484 kPa; throat area π·(4 mm)²/4.
  const throatArea = (Math.PI * 0.004 ** 2) / 4

  it('total impulse, peak thrust and mass of air', () => {
    expectClose(expected('impulse', run) as number, impulse, 1e-12)
    expect(expected('peak_thrust', run)).toBe(10)
    expectClose(expected('air_mass', run) as number, airMass, 1e-12)
  })

  it('the mean thrust coefficient over the choked samples leaves out the two unchoked ends', () => {
    expectClose(expected('cf_mean', run) as number, 10 / (484_000 * throatArea), 1e-12)
  })

  it('specific impulse = I / (m g0)', () => {
    expectClose(expected('isp', run) as number, impulse / (airMass * 9.80665), 1e-12)
  })

  it('at 484 kPa against 84 kPa the Mach-2 nozzle is over-expanded (code 3) with exit Mach 2', () => {
    // pa/p0 = 0.1736 lies between the design ratio 1.8^−3.5 = 0.1278 and the shock-at-exit ratio
    // 0.1278 · 4.5 = 0.575 (p2/p1 = 4.5 across a Mach-2 normal shock).
    expectClose(expected('exit_mach', run) as number, 2, 1e-9)
    expect(expected('regime', run)).toBe(3)
  })

  it('flags a thrust above 1.1 × the ideal thrust and passes one below it', () => {
    // Ideal C_F at Mach 2, pe/p0 = 0.1278, pa/p0 = 84/484:
    // √(2γ²/(γ−1) · (2/(γ+1))^((γ+1)/(γ−1)) · (1 − (pe/p0)^((γ−1)/γ))) + (pe/p0 − pa/p0)·ε = 1.1306,
    // so the ideal thrust is 1.1306 · 484 kPa · At = 6.876 N and the flag is raised above 7.564 N.
    const withResults = (data: SubmissionData) => ({ ...data, results: { impulse: 98, peak_thrust: 10, cf_mean: 1.6, air_mass: 0.3, isp: 34, exit_mach: 2, regime: 3 } })
    expect(rule('thrust_above_ideal', withResults(coldRun(10)))).toBe(true)
    expect(rule('thrust_above_ideal', withResults(coldRun(7.5)))).toBe(false)
  })

  it('review rules that look at the reported results', () => {
    const reported = { impulse: 98, peak_thrust: 10, cf_mean: 1.6, air_mass: 0.297, isp: 33.6, exit_mach: 2, regime: 3 }
    // √(2 · 1004.675 J/(kg K) · 293.15 K) / g0 = 78.3 s is the vacuum limit for 20 °C air.
    expect(rule('isp_above_limit', { ...run, results: reported })).toBe(false)
    expect(rule('isp_above_limit', { ...run, results: { ...reported, isp: 80 } })).toBe(true)
    expect(rule('mach_regime_mismatch', { ...run, results: reported })).toBe(false)
    expect(rule('mach_regime_mismatch', { ...run, results: { ...reported, exit_mach: 0.5 } })).toBe(true)
    expect(rule('mach_regime_mismatch', { ...run, results: { ...reported, regime: 2 } })).toBe(true)
  })

  it('review rules on the data alone', () => {
    const results = { impulse: 98, peak_thrust: 10, cf_mean: 1.6, air_mass: 0.297, isp: 33.6, exit_mach: 2, regime: 3 }
    expect(rule('chamber_above_receiver', { ...run, results })).toBe(false)
    const swapped = { ...run, results, tables: { run: { ...run.tables.run!, p_receiver: inside(400), p_chamber: T.map(() => 500) } } }
    expect(rule('chamber_above_receiver', swapped)).toBe(true)
    expect(rule('receiver_not_emptied', { ...run, results })).toBe(false)
    expect(rule('receiver_not_emptied', { ...run, results, measurements: { ...run.measurements, p_final: 600 } })).toBe(true)
  })
})

describe('the hot-fire module grades a run worked out by hand', () => {
  const assignment = assignmentOf('03-hot-fire.md')
  const data: SubmissionData = {
    tables: { run: { t: T, thrust: inside(15), p_receiver: T.map(() => 500), p_chamber: inside(400) } },
    measurements: {
      p_ambient: 84,
      d_throat: D_THROAT_MM,
      d_exit: D_EXIT_MM,
      v_receiver: 50,
      p_initial: 600,
      p_final: 100,
      t_air: 20,
      m_fuel: 20,
      isp_cold: 40,
    },
  }
  const scope = buildExpressionScope(assignment, data)
  const expected = (key: string) => evaluateExpression(assignment.results.find((r) => r.key === key)?.expected ?? '', scope)

  // Trapezoid: 1.5 + 1.5 + 48 · 0.2 · 15 = 147 N·s. Fuel 20 g = 0.02 kg.
  const impulse = 147
  const airMass = (500_000 * 0.05) / (287.05 * 293.15)
  const ispHot = impulse / ((airMass + 0.02) * 9.80665)

  it('specific impulse counts air and fuel as propellant', () => {
    expectClose(expected('impulse') as number, impulse, 1e-12)
    expectClose(expected('mixture_ratio') as number, airMass / 0.02, 1e-12)
    expectClose(expected('isp_hot') as number, ispHot, 1e-12)
  })

  it('compares with the cold-flow value and infers an effective chamber temperature', () => {
    expectClose(expected('isp_ratio') as number, ispHot / 40, 1e-12)
    expectClose(expected('t_effective') as number, 293.15 * (ispHot / 40) ** 2, 1e-12)
  })

  it('flags a hot run no better than cold flow, and a very rich mixture', () => {
    const reported = { impulse, peak_thrust: 15, air_mass: airMass, mixture_ratio: 14.9, isp_hot: ispHot, isp_ratio: 1.18, t_effective: 410 }
    const withResults = (results: Record<string, number>) =>
      buildExpressionScope(assignment, { ...data, results }, { withResults: true })
    const when = (key: string) => assignment.reviewRules.find((r) => r.key === key)?.when ?? ''
    expect(evaluateExpression(when('no_gain_over_cold'), withResults(reported))).toBe(false)
    expect(evaluateExpression(when('no_gain_over_cold'), withResults({ ...reported, isp_ratio: 0.9 }))).toBe(true)
    expect(evaluateExpression(when('very_rich'), withResults(reported))).toBe(false)
    expect(evaluateExpression(when('very_rich'), withResults({ ...reported, mixture_ratio: 0.015 }))).toBe(true)
  })
})

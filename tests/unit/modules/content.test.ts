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
const files = readdirSync(CONTENT)
  .filter((f) => f.endsWith('.md'))
  .sort()

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
  it('are the four modules of the demo course', () => {
    expect(files).toEqual([
      '01-nozzle-flow-fundamentals.md',
      '02-cold-flow-characterisation.md',
      '03-hot-fire.md',
      '04-reading-the-jet.md',
    ])
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
    expect(calculators.map((c) => c.attributes['data-kind'])).toEqual([
      'isentropic',
      'blowdown',
      'nozzle',
      'normal-shock',
    ])
    const nozzle = JSON.parse(calculators[2]?.attributes['data-defaults'] ?? '{}') as Record<string, unknown>
    expect(nozzle).toMatchObject({
      chamberPressure: 500,
      chamberPressureReading: 'gauge',
      throatDiameter: 4,
      exitDiameter: 4.9,
    })
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

describe('the stand sheets in content/', () => {
  it.each(['02-cold-flow-characterisation.md', '03-hot-fire.md'])(
    '%s declares stand runs and a checklist whose hold points include the leak check, the barrier and hearing protection',
    (file) => {
      const { frontMatter, body } = load(file)
      expect(frontMatter.standRuns).toBeGreaterThanOrEqual(1)
      const items = new Map((frontMatter.checklist ?? []).map((i) => [i.key, i]))
      expect(items.get('leak-check')).toMatchObject({ staff: true, hold: true })
      expect(items.get('barrier')).toMatchObject({ staff: true, hold: true })
      expect(items.get('hearing-protection')).toMatchObject({ hold: true })
      expect(items.get('receiver-vented')).toMatchObject({ hold: false })
      // The module text says what the checklist is not, and defers to the institution.
      expect(body).toContain('supports and does not replace the institution')
      for (const phrase of [/local codes/i, /safety office/, /licensed practice/]) expect(body).toMatch(phrase)
    },
  )
})

// A hand-made cold-flow run whose results can be worked out on paper.
// Nozzle: 4 mm throat, exit area 1.6875 × throat area, the area ratio of Mach 2 in air.
// Log: 51 samples, t = 0, 0.2 … 10 s. The load cell reads a zero of 0.5 N at rest (samples 1–5 and
// 47–51, t = 0–0.8 s and 9.2–10 s) and 0.5 N + the thrust in between (t = 1.0–9.0 s); the chamber
// transducer reads a zero of 2 kPa gauge at rest and 2 kPa + 400 kPa in between; the receiver reads
// 500 kPa throughout.
const D_THROAT_MM = 4
const D_EXIT_MM = 4 * Math.sqrt(1.6875)
const T = Array.from({ length: 51 }, (_, i) => i * 0.2)
const running = (i: number) => i >= 5 && i <= 45
const logged = (zero: number, value: number) => T.map((_, i) => zero + (running(i) ? value : 0))

function coldRun(thrustN: number): SubmissionData {
  return {
    tables: { run: { t: T, thrust: logged(0.5, thrustN), p_receiver: T.map(() => 500), p_chamber: logged(2, 400) } },
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

// The reduction of that run by hand, for a tared thrust of F N in the run:
// - zeros: 0.5 N before and after (medians of the resting samples); tared thrust 0 at rest, F in the run;
// - peak F; window at 5 % of F: it opens between t = 0.8 s (0) and 1.0 s (F) at 0.8 + 0.2·0.05 = 0.81 s
//   and closes between 9.0 s (F) and 9.2 s (0) at 9.0 + 0.2·0.95 = 9.19 s: run time 8.38 s;
// - impulse over the whole log: 40 intervals of 0.2 s at F plus two edge intervals of 0.2·F/2 = 8.2·F N·s;
// - inside the window: 0.19 s from 0.05F to F twice, 0.19·1.05F/2 each, plus 8·F: 8.1995·F N·s;
// - chamber: zero 2 kPa taken, so 84 kPa absolute at rest and 484 kPa in the run; inside the window
//   0.19·(104 + 484)/2 twice (104 kPa = 84 + 0.05·400 at the window's ends) plus 8·484 = 3983.72 kPa·s.
const hand = (F: number) => ({
  impulse: 8.2 * F,
  peak: F,
  runTime: 8.38,
  window: 8.1995 * F,
  chamberIntegral: 3_983_720,
})

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
  const h = hand(10)

  // Both receiver readings at 20 °C: m = (600 − 100) kPa · 50 L / (287.05 J/(kg K) · 293.15 K).
  const airMass = (500_000 * 0.05) / (287.05 * 293.15)
  // Throat area π·(4 mm)²/4.
  const throatArea = (Math.PI * 0.004 ** 2) / 4

  it('total impulse and peak thrust come from the tared thrust (the 0.5 N zero taken out)', () => {
    expectClose(expected('impulse', run) as number, h.impulse, 1e-12)
    expectClose(expected('peak_thrust', run) as number, 10, 1e-12)
    expectClose(expected('air_mass', run) as number, airMass, 1e-12)
  })

  it('run time and mean thrust come from the window where the tared thrust is above 5 % of its peak', () => {
    expectClose(expected('burn_time', run) as number, h.runTime, 1e-12)
    expectClose(expected('mean_thrust', run) as number, h.window / h.runTime, 1e-12)
  })

  it('the thrust coefficient is ∫F dt / (At ∫p0 dt) over the run window, with the chamber zero taken', () => {
    expectClose(expected('cf_mean', run) as number, h.window / (throatArea * h.chamberIntegral), 1e-12)
  })

  it('specific impulse = I / (m g0), with the tared impulse', () => {
    expectClose(expected('isp', run) as number, h.impulse / (airMass * 9.80665), 1e-12)
  })

  it('at 484 kPa against 84 kPa the Mach-2 nozzle is over-expanded (code 3) with exit Mach 2', () => {
    // pa/p0 = 0.1736 lies between the design ratio 1.8^−3.5 = 0.1278 and the shock-at-exit ratio
    // 0.1278 · 4.5 = 0.575 (p2/p1 = 4.5 across a Mach-2 normal shock).
    expectClose(expected('exit_mach', run) as number, 2, 1e-9)
    expect(expected('regime', run)).toBe(3)
  })

  const results = {
    impulse: 82,
    peak_thrust: 10,
    burn_time: 8.38,
    mean_thrust: 9.78,
    cf_mean: 1.64,
    air_mass: 0.297,
    isp: 28.1,
    exit_mach: 2,
    regime: 3,
  }

  it('flags a tared peak thrust above 1.1 × the ideal thrust and passes one below it', () => {
    // Ideal C_F at Mach 2, pe/p0 = 0.1278, pa/p0 = 84/484:
    // √(2γ²/(γ−1) · (2/(γ+1))^((γ+1)/(γ−1)) · (1 − (pe/p0)^((γ−1)/γ))) + (pe/p0 − pa/p0)·ε = 1.1306,
    // so the ideal thrust is 1.1306 · 484 kPa · At = 6.876 N and the flag is raised above 7.564 N.
    expect(rule('thrust_above_ideal', { ...coldRun(10), results })).toBe(true)
    expect(rule('thrust_above_ideal', { ...coldRun(7.5), results })).toBe(false)
  })

  it('review rules that look at the reported results', () => {
    // √(2 · 1004.675 J/(kg K) · 293.15 K) / g0 = 78.3 s is the vacuum limit for 20 °C air.
    expect(rule('isp_above_limit', { ...run, results })).toBe(false)
    expect(rule('isp_above_limit', { ...run, results: { ...results, isp: 80 } })).toBe(true)
    expect(rule('mach_regime_mismatch', { ...run, results })).toBe(false)
    expect(rule('mach_regime_mismatch', { ...run, results: { ...results, exit_mach: 0.5 } })).toBe(true)
    expect(rule('mach_regime_mismatch', { ...run, results: { ...results, regime: 2 } })).toBe(true)
  })

  it('review rules on the data alone', () => {
    expect(rule('chamber_above_receiver', { ...run, results })).toBe(false)
    const swapped = {
      ...run,
      results,
      tables: { run: { ...run.tables.run!, p_receiver: logged(2, 400), p_chamber: T.map(() => 500) } },
    }
    expect(rule('chamber_above_receiver', swapped)).toBe(true)
    expect(rule('receiver_not_emptied', { ...run, results })).toBe(false)
    expect(rule('receiver_not_emptied', { ...run, results, measurements: { ...run.measurements, p_final: 600 } })).toBe(
      true,
    )
  })
})

// A hand-made jet run: a converging nozzle of 6 mm bore (sonic exit), the chamber logged every
// 0.5 s for 13 s from 700 kPa gauge falling by 50 kPa/s, the photograph taken at 2.25 s (half-way between
// the samples at 2.0 s, 600 kPa, and 2.5 s, 575 kPa: 587.5 kPa gauge, 671.5 kPa absolute with the
// 84 kPa barometer).
describe('the jet sheet grades a photograph worked out by hand', () => {
  const assignment = assignmentOf('04-reading-the-jet.md')
  const T_JET = Array.from({ length: 27 }, (_, i) => i * 0.5)
  const jetRun = (cellSpacing: number, photoAt = 2.25): SubmissionData => ({
    tables: { run: { t: T_JET, p_chamber: T_JET.map((t) => 700 - 50 * t) } },
    measurements: { p_ambient: 84, d_throat: 6, d_exit: 6, t_photo: photoAt },
    images: { jet: { cellSpacing, machDisk: 0.0105, cellCount: 3 } },
  })
  const expected = (key: string, data: SubmissionData) => {
    const result = assignment.results.find((r) => r.key === key)
    if (!result) throw new Error(`no result ${key}`)
    return evaluateExpression(result.expected, buildExpressionScope(assignment, data)) as number
  }
  const rule = (key: string, data: SubmissionData, results: Record<string, number>) => {
    const r = assignment.reviewRules.find((x) => x.key === key)
    if (!r) throw new Error(`no rule ${key}`)
    return evaluateExpression(r.when, buildExpressionScope(assignment, { ...data, results }, { withResults: true }))
  }

  // By hand, γ = 1.4: Mj from p0/pa by the isentropic relation; Dj = Dt·√(A/A*) at Mj (area–Mach
  // relation); Pack's L = (π / 2.4048255577)·Dj·√(Mj² − 1), j0,1 from Abramowitz & Stegun table 9.5;
  // the Mach disk by Ashkenas & Sherman, 0.67·D·√(p0/pa).
  const ratio = 671.5 / 84
  const mj = Math.sqrt(5 * (ratio ** (0.4 / 1.4) - 1))
  const areaRatio = (1 / mj) * ((2 / 2.4) * (1 + 0.2 * mj * mj)) ** 3
  const dj = 0.006 * Math.sqrt(areaRatio)
  const pack = (Math.PI / 2.4048255577) * dj * Math.sqrt(mj * mj - 1)

  it('reads the chamber pressure at the photograph from the log and gives the jet, its cell spacing and its Mach disk', () => {
    const run = jetRun(0.02)
    expectClose(expected('jet_mach', run), mj, 1e-9)
    expectClose(expected('cell_theory', run), pack, 1e-9)
    expectClose(expected('disk_theory', run), 0.67 * 0.006 * Math.sqrt(ratio), 1e-12)
    expectClose(expected('cell_measured', run), 0.02, 1e-12)
    expectClose(expected('cell_ratio', run), 0.02 / pack, 1e-9)
  })

  it('uses Lewis and Carlson’s correlation for a supersonic exit', () => {
    // A 4 mm throat and 5 mm exit (area ratio 1.5625): the exit Mach number is the supersonic root of
    // the area–Mach relation (solved here by Newton's method from M = 2; about 1.906), and
    // pe = p0 / (1 + 0.2·Me²)^3.5.
    const run = jetRun(0.02)
    run.measurements = { ...run.measurements, d_throat: 4, d_exit: 5 }
    let me = 2
    for (let i = 0; i < 60; i++) {
      const f = (m: number) => (1 / m) * ((2 / 2.4) * (1 + 0.2 * m * m)) ** 3 - 1.5625
      me -= f(me) / ((f(me + 1e-7) - f(me - 1e-7)) / 2e-7)
    }
    expect(me).toBeGreaterThan(1.8)
    const pe = 671.5e3 / (1 + 0.2 * me * me) ** 3.5
    expectClose(expected('disk_theory', run), 0.69 * 0.005 * me * Math.sqrt((1.4 * pe) / 84e3), 1e-9)
  })

  it('flags a measured spacing far from the theory’s (a scale set wrong) and passes one near it', () => {
    const good = jetRun(pack * 1.1)
    const results = { jet_mach: mj, disk_theory: 0.01, cell_ratio: 1.1, cell_measured: pack * 1.1, cell_theory: pack }
    expect(rule('check_the_scale', good, results)).toBe(false)
    // The scale across half the exit: every distance doubled.
    expect(rule('check_the_scale', jetRun(pack * 2.2), results)).toBe(true)
    expect(rule('check_the_scale', jetRun(pack * 0.5), results)).toBe(true)
    expect(rule('reported_ratio_mismatch', good, results)).toBe(false)
    expect(rule('reported_ratio_mismatch', good, { ...results, cell_ratio: 2.2 })).toBe(true)
  })

  it('flags a photograph taken after the chamber fell below about 20 psi gauge', () => {
    const results = { jet_mach: mj, disk_theory: 0.01, cell_ratio: 1, cell_measured: pack, cell_theory: pack }
    // At 11 s the log reads 700 − 550 = 150 kPa gauge; at 11.5 s, 125 kPa (below 137.9 kPa).
    expect(rule('photo_after_stop', jetRun(pack, 11), results)).toBe(false)
    expect(rule('photo_after_stop', jetRun(pack, 11.5), results)).toBe(true)
  })

  it('carries the jet’s safety cautions and defers to local rules', () => {
    const { body } = load('04-reading-the-jet.md')
    for (const phrase of [
      'hearing protection',
      'Never look directly into the source',
      'laser',
      'pressure vessel',
      'supports and does not replace the institution',
      'local codes',
      'safety office',
      'licensed practice',
      'common practice, not a',
    ]) {
      expect(body, phrase).toContain(phrase)
    }
  })
})

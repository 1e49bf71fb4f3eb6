import { readFileSync } from 'node:fs'
import { join } from 'node:path'
import { describe, expect, it } from 'vitest'
import { gradeSubmission } from '../../../shared/grading/grade'
import { evaluateExpression } from '../../../shared/modules/expressions'
import { parseModuleSource } from '../../../shared/modules/front-matter'
import { lintModuleBody, renderModule } from '../../../shared/modules/render'
import type { Assignment } from '../../../shared/modules/schema'
import { buildExpressionScope } from '../../../shared/modules/scope'
import type { SubmissionData } from '../../../shared/modules/scope'
import { valueToSI } from '../../../shared/modules/quantities'
import { combustion } from '../../../shared/thermo'
import { expectClose } from '../../helpers/expect-close'

const file = '03-hot-fire.md'
const parsed = parseModuleSource(readFileSync(join(import.meta.dirname, '../../../content', file), 'utf8'), file)
if (!parsed.ok || !parsed.frontMatter.assignment) throw new Error(`content/${file} does not parse`)
const assignment: Assignment = parsed.frontMatter.assignment
const body = parsed.body

// A hand-made hot-fire run whose results can be worked out on paper (invented test data).
// Nozzle: 5 mm throat, exit area 1.6875 × throat area. Log: 51 samples, t = 0, 0.2 … 10 s. The load
// cell reads a zero of 0.5 N at rest (samples 1–5 and 47–51) and 0.5 N + 10 N in between
// (t = 1.0–9.0 s); the chamber transducer reads 2 kPa gauge at rest and 2 + 400 kPa in between; the
// receiver reads 500 kPa gauge throughout. Receiver 10 L from 600 to 100 kPa gauge at 20 °C, fuel
// bottle 1000.0 g before and 996.2 g after: 3.8 g of propane.
const D_THROAT_MM = 5
const D_EXIT_MM = 5 * Math.sqrt(1.6875)
const T = Array.from({ length: 51 }, (_, i) => i * 0.2)
const running = (i: number) => i >= 5 && i <= 45
const logged = (zero: number, value: number) => T.map((_, i) => zero + (running(i) ? value : 0))
const THRUST = 10

const run: SubmissionData = {
  tables: { run: { t: T, thrust: logged(0.5, THRUST), p_receiver: T.map(() => 500), p_chamber: logged(2, 400) } },
  measurements: {
    p_ambient: 84,
    d_throat: D_THROAT_MM,
    d_exit: D_EXIT_MM,
    v_receiver: 10,
    p_initial: 600,
    p_final: 100,
    t_air: 20,
    m_bottle_before: 1000,
    m_bottle_after: 996.2,
    isp_cold: 40,
  },
}

// The same reduction by hand as the cold-flow module's test (content.test.ts): window 0.81–9.19 s,
// impulse 8.2·F N·s over the whole log, and inside the window the absolute chamber pressure
// integrates to 0.19·(104 + 484)/2 twice plus 8·484 = 3983.72 kPa·s.
const impulse = 8.2 * THRUST
const runTime = 8.38
const chamberIntegral = 3_983_720
const meanChamber = chamberIntegral / runTime
const throatArea = (Math.PI * 0.005 ** 2) / 4
const airMass = (500_000 * 0.01) / (287.05 * 293.15)
const fuelMass = 0.0038
// Stoichiometric air–fuel mass ratio of propane, C3H8 + 5 (O2 + 3.76 N2), with the IUPAC standard
// atomic weights C 12.011, H 1.008, O 15.999, N 14.007: 5·(31.998 + 3.76·28.014)/44.097 ≈ 15.57.
const STOICHIOMETRIC_PROPANE = (5 * (31.998 + 3.76 * 28.014)) / 44.097
const phi = STOICHIOMETRIC_PROPANE / (airMass / fuelMass)
const cstarMeasured = (throatArea * chamberIntegral) / (airMass + fuelMass)
const ispHot = impulse / ((airMass + fuelMass) * 9.80665)

const expected = (key: string, data: SubmissionData = run) => {
  const result = assignment.results.find((r) => r.key === key)
  if (!result) throw new Error(`no result ${key}`)
  return evaluateExpression(result.expected, buildExpressionScope(assignment, data)) as number
}

describe('the hot-fire module grades a run worked out by hand', () => {
  // The flame the module asks for: propane and air at the mixture burnt, the mean chamber pressure
  // over the run window and the room temperature (the thermochemistry library's own tests compare
  // it with published flame temperatures).
  const flame = combustion({
    fuel: 'propane',
    equivalenceRatio: phi,
    pressure: meanChamber,
    reactantTemperature: 293.15,
  })

  it('impulse, run time and thrust coefficient come from the tared run, as in cold flow', () => {
    expectClose(expected('impulse'), impulse, 1e-12)
    expectClose(expected('peak_thrust'), THRUST, 1e-12)
    expectClose(expected('burn_time'), runTime, 1e-12)
    expectClose(expected('cf'), (8.1995 * THRUST) / (throatArea * chamberIntegral), 1e-12)
  })

  it('air and fuel mass, air–fuel ratio and equivalence ratio from the receiver and bottle readings', () => {
    expectClose(expected('air_mass'), airMass, 1e-12)
    // In SI (kg); the grader converts to the result's unit, g.
    expectClose(expected('fuel_mass'), fuelMass, 1e-9)
    expectClose(expected('mixture_ratio'), airMass / fuelMass, 1e-9)
    // The library's molar masses and ours agree to well under 0.1 %.
    expectClose(expected('equivalence_ratio'), phi, 1e-3)
    expect(phi).toBeGreaterThan(0.95)
    expect(phi).toBeLessThan(1.05)
  })

  it('measured c* = At·∫p0 dt over the run window / (air + fuel)', () => {
    expectClose(expected('cstar'), cstarMeasured, 1e-9)
  })

  it('theoretical c* and flame temperature of the mixture burnt at the mean chamber pressure, and the c* efficiency', () => {
    expectClose(expected('t_flame'), flame.temperature, 1e-3)
    expectClose(expected('cstar_theory'), flame.characteristicVelocity, 1e-3)
    expectClose(expected('cstar_efficiency'), cstarMeasured / flame.characteristicVelocity, 1e-3)
    // A plausible combustor: about 0.9 of the equilibrium c*.
    expect(expected('cstar_efficiency')).toBeGreaterThan(0.85)
    expect(expected('cstar_efficiency')).toBeLessThan(1)
  })

  it('specific impulse counts air and fuel; the hot-to-cold ratio and its √(T_flame/T_air) estimate', () => {
    expectClose(expected('isp_hot'), ispHot, 1e-9)
    expectClose(expected('isp_ratio'), ispHot / 40, 1e-9)
    expectClose(expected('isp_ratio_estimate'), Math.sqrt(flame.temperature / 293.15), 1e-3)
  })

  // Common practice, no source (figures given with the issue): 110.9 N·s of
  // hot-fire impulse from 189 g of propellant is a specific impulse of 59.8 s; 38.8 N·s cold at
  // 23.2 s is 170.5 g of air, so the hot run burnt about 18.5 g of propane with that air.
  it('check values: 110.9 N·s from 189 g of air and propane is 59.8 s, a rich mixture inside the flammable range', () => {
    const coldAir = 38.8 / (23.2 * 9.80665)
    expectClose(coldAir, 0.1705, 1e-3)
    const fuel = 0.189 - coldAir
    // The receiver volume that holds that air between 600 and 100 kPa gauge at 20 °C, in litres.
    const volume = (1000 * coldAir * 287.05 * 293.15) / 500_000
    const data: SubmissionData = {
      ...run,
      tables: { run: { ...run.tables.run!, thrust: logged(0.5, 110.9 / 8.2) } },
      measurements: { ...run.measurements, v_receiver: volume, m_bottle_after: 1000 - 1000 * fuel, isp_cold: 23.2 },
    }
    expect(expected('isp_hot', data)).toBeCloseTo(59.8, 1)
    expect(expected('isp_ratio', data)).toBeCloseTo(59.8 / 23.2, 2)
    const richPhi = expected('equivalence_ratio', data)
    expectClose(richPhi, STOICHIOMETRIC_PROPANE / (coldAir / fuel), 1e-3)
    expect(richPhi).toBeGreaterThan(1.6)
    expect(rule('outside_flammable_range', data)).toBe(false)
  })
})

function reported(data: SubmissionData): Record<string, number> {
  return Object.fromEntries(
    assignment.results.map((r) => {
      const scope = buildExpressionScope(assignment, data)
      const si = evaluateExpression(r.expected, scope) as number
      return [r.key, r.unit === 'g' ? si * 1000 : si]
    }),
  )
}

function rule(key: string, data: SubmissionData, results: Record<string, number> = reported(data)): boolean {
  const r = assignment.reviewRules.find((x) => x.key === key)
  if (!r) throw new Error(`no rule ${key}`)
  return evaluateExpression(
    r.when,
    buildExpressionScope(assignment, { ...data, results }, { withResults: true }),
  ) as boolean
}

describe('the hot-fire module’s review rules', () => {
  const withMeasurements = (m: Record<string, number>): SubmissionData => ({
    ...run,
    measurements: { ...run.measurements, ...m },
  })

  it('a sound run raises none of them', () => {
    for (const r of assignment.reviewRules) expect(rule(r.key, run), r.key).toBe(false)
  })

  it('c* efficiency above 1.0: a receiver volume typed too small', () => {
    // 7 L for 10 L: the air mass and so the c* worked out from the data are 10/7 of the true ones.
    expect(rule('cstar_above_theory', withMeasurements({ v_receiver: 7 }))).toBe(true)
    expect(rule('cstar_very_low', withMeasurements({ v_receiver: 7 }))).toBe(false)
  })

  it('c* efficiency below 0.5: the data say the throat passed three times the mass it could have held at that pressure', () => {
    // 30 L for 10 L and three times the fuel: the same mixture, three times the mass, a third of the c*.
    const tripled = withMeasurements({ v_receiver: 30, m_bottle_after: 1000 - 11.4 })
    expect(rule('cstar_very_low', tripled)).toBe(true)
    expect(rule('cstar_above_theory', tripled)).toBe(false)
  })

  it('a mixture outside propane’s flammable range (φ 0.51–2.5), lean or rich', () => {
    // The rule reads the data only (the reported results are the sound run's). φ ≈ 1 with 3.8 g; 1.9 g is φ ≈ 0.5, lean of the range; 10 g is φ ≈ 2.6, rich of it.
    expect(rule('outside_flammable_range', withMeasurements({ m_bottle_after: 1000 - 1.9 }), reported(run))).toBe(true)
    expect(rule('outside_flammable_range', withMeasurements({ m_bottle_after: 1000 - 2.2 }), reported(run))).toBe(false)
    expect(rule('outside_flammable_range', withMeasurements({ m_bottle_after: 1000 - 10 }), reported(run))).toBe(true)
    expect(rule('outside_flammable_range', withMeasurements({ m_bottle_after: 1000 - 9.4 }), reported(run))).toBe(false)
  })

  it('a hard start: the chamber jumps above the receiver at ignition; the same jump late in the run is not one', () => {
    // The first running sample (t = 1.0 s) reads 600 kPa gauge against the receiver's 500.
    const spiked = (at: number) => run.tables.run!.p_chamber!.map((p, i) => (i === at ? 602 : p))
    const ignition: SubmissionData = { ...run, tables: { run: { ...run.tables.run!, p_chamber: spiked(5) } } }
    const late: SubmissionData = { ...run, tables: { run: { ...run.tables.run!, p_chamber: spiked(30) } } }
    expect(rule('hard_start', ignition)).toBe(true)
    expect(rule('hard_start', late)).toBe(false)
    // A short spike does not lift the chamber above the receiver on average over the run.
    expect(rule('chamber_above_receiver', ignition)).toBe(false)
  })

  it('swapped pressure columns: the chamber above the receiver on average over the run window', () => {
    const swapped: SubmissionData = {
      ...run,
      tables: { run: { ...run.tables.run!, p_receiver: logged(2, 400), p_chamber: T.map(() => 500) } },
    }
    expect(rule('chamber_above_receiver', swapped)).toBe(true)
  })

  it('a fuel bottle no lighter after the run, and a receiver not emptied', () => {
    // With no fuel or no air the expected values cannot be worked out; the reported ones are the run's.
    expect(rule('no_fuel_used', withMeasurements({ m_bottle_after: 1000 }), reported(run))).toBe(true)
    expect(rule('receiver_not_emptied', withMeasurements({ p_final: 600 }), reported(run))).toBe(true)
  })

  it('a reported hot-fire specific impulse no better than cold flow', () => {
    expect(rule('no_gain_over_cold', run, { ...reported(run), isp_ratio: 0.9 })).toBe(true)
  })
})

describe('the hot-fire module graded whole', () => {
  const siMeasurements = (data: SubmissionData) =>
    Object.fromEntries(
      assignment.measurements.map((m) => [
        m.key,
        // Gauge pressures stay gauge here: the scope makes them absolute.
        valueToSI(data.measurements[m.key] as number, m.unit),
      ]),
    )
  const grade = (data: SubmissionData, results: Record<string, number>) =>
    gradeSubmission({
      assignment,
      data: {
        tables: {
          run: Object.fromEntries(
            Object.entries(data.tables.run!).map(([k, v]) => [
              k,
              k.startsWith('p_') ? (v as number[]).map((x) => x * 1000) : (v as number[]),
            ]),
          ),
        },
        measurements: siMeasurements(data),
        pressures: { p_receiver: 'gauge', p_chamber: 'gauge' },
      },
      reported: results,
    })

  it('a hand-in with every result right gets full marks and no flags', () => {
    const g = grade(run, reported(run))
    expect(g.checks.filter((c) => c.outcome !== 'pass')).toEqual([])
    expect(g.rawScore).toBe(g.maxScore)
    expect(g.flags.filter((f) => f.code.startsWith('rule:'))).toEqual([])
  })

  it('a wrong c* efficiency loses its points; a c* from the air mass alone (6 % high) earns half of them', () => {
    const right = reported(run)
    const g = grade(run, {
      ...right,
      cstar: (throatArea * chamberIntegral) / airMass,
      cstar_efficiency: right.cstar_efficiency! * 1.2,
    })
    const outcome = (key: string) => g.checks.find((c) => c.key === key)?.outcome
    // Outside 5 %, inside twice that: the module's partial credit.
    expect(outcome('cstar')).toBe('partial')
    expect(outcome('cstar_efficiency')).toBe('fail')
    expect(outcome('cstar_theory')).toBe('pass')
  })
})

describe('the hot-fire module text', () => {
  it('keeps and strengthens the safety cautions, and defers to local codes, the safety office and licensed practice', () => {
    for (const phrase of [
      'pressure vessel',
      'flammable gas',
      'ignition source',
      '**Ignition:**',
      '**Exhaust:**',
      'carbon monoxide',
      'hard start',
      'Eye and hearing protection',
      'not** a procedure',
      'Local codes',
      'lab-safety office',
      'licensed practice',
    ]) {
      expect(body, phrase).toContain(phrase)
    }
  })

  it('embeds the combustion calculator with the stand’s mixture, pressure and nozzle, and nothing in the body is wrong', () => {
    expect(lintModuleBody(body)).toEqual([])
    const html = renderModule(body)
    const placeholder = /<div class="isentrope-calculator" data-kind="combustion" data-defaults="([^"]*)"/.exec(html)
    expect(placeholder).not.toBeNull()
    const defaults = JSON.parse(placeholder![1]!.replaceAll('&quot;', '"')) as Record<string, unknown>
    expect(defaults).toMatchObject({ fuel: 'propane', equivalenceRatio: 0.85, throatDiameter: 6, exitDiameter: 9 })
  })
})

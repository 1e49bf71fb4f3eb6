import { describe, expect, it } from 'vitest'
import {
  blowdownTimeConstant,
  chokedMassFlow,
  dischargeMassFlow,
  nozzleFlow,
  nozzlePressureRatios,
  tankBlowdown,
} from '../../../shared/physics/index'
import type { BlowdownInput } from '../../../shared/physics/index'
import { expectClose } from '../../helpers/expect-close'
import { expectRangeError } from '../../helpers/expect-range-error'
import { expectPrinted } from '../../helpers/printed'

// A 50 L air receiver at 10 bar absolute discharging through a 3.6 mm throat to the room.
const base: BlowdownInput = {
  volume: 0.05,
  initialPressure: 1e6,
  initialTemperature: 293.15,
  ambientPressure: 101325,
  throatArea: 1e-5,
  dischargeCoefficient: 0.95,
  gamma: 1.4,
  gasConstant: 287.05,
  process: 'isothermal',
  duration: 200,
  step: 0.05,
}

// Closed forms, derived independently here. With m = pV/(RT) and the choked mass flow
// ṁ = Cd·At·p·√(γ/(R·T))·(2/(γ+1))^((γ+1)/(2(γ−1))):
//  isothermal: dp/dt = −(RT/V)·ṁ = −p/τ, τ = V/(Cd·At·√(γRT)·(2/(γ+1))^((γ+1)/(2(γ−1))))
//              ⇒ p = p_i·exp(−t/τ);
//  adiabatic:  dp/dt = −γ(RT/V)·ṁ with T = T_i(p/p_i)^((γ−1)/γ) ⇒ dP/dt = −(γ/τ_i)·P^((3γ−1)/(2γ)),
//              ⇒ p = p_i·(1 + (γ−1)/2·t/τ_i)^(−2γ/(γ−1)), τ_i at T_i.
function tau(input: BlowdownInput): number {
  const g = input.gamma
  const flowFunction = Math.pow(2 / (g + 1), (g + 1) / (2 * (g - 1)))
  return (
    input.volume /
    (input.dischargeCoefficient *
      input.throatArea *
      Math.sqrt(g * input.gasConstant * input.initialTemperature) *
      flowFunction)
  )
}
const criticalRatio = (g: number) => Math.pow(2 / (g + 1), g / (g - 1))
const isothermalPressure = (input: BlowdownInput, t: number) => input.initialPressure * Math.exp(-t / tau(input))
const adiabaticPressure = (input: BlowdownInput, t: number) => {
  const g = input.gamma
  return input.initialPressure * Math.pow(1 + ((g - 1) / 2) * (t / tau(input)), (-2 * g) / (g - 1))
}

function chokedSamples(input: BlowdownInput, run: ReturnType<typeof tankBlowdown>): number[] {
  const unchokePressure = input.ambientPressure / criticalRatio(input.gamma)
  return run.pressure.flatMap((p, i) => (p > unchokePressure * (1 + 1e-9) ? [i] : []))
}

describe('tankBlowdown against the closed-form choked blow-down', () => {
  it('decays as p_i·exp(−t/τ) while choked, isothermal, to 1e-8 with a fine step', () => {
    const run = tankBlowdown(base)
    const indices = chokedSamples(base, run)
    expect(indices.length).toBeGreaterThan(500)
    for (const i of indices)
      expectClose(run.pressure[i]!, isothermalPressure(base, run.time[i]!), 1e-8, `t=${run.time[i]}`)
    for (const i of indices) expect(run.temperature[i]).toBe(base.initialTemperature)
  })

  it('decays as p_i·(1 + (γ−1)/2·t/τ)^(−2γ/(γ−1)) while choked, adiabatic, with T following the isentrope', () => {
    const input: BlowdownInput = { ...base, process: 'adiabatic' }
    const run = tankBlowdown(input)
    const indices = chokedSamples(input, run)
    expect(indices.length).toBeGreaterThan(300)
    for (const i of indices) {
      const p = adiabaticPressure(input, run.time[i]!)
      expectClose(run.pressure[i]!, p, 1e-8, `p at t=${run.time[i]}`)
      expectClose(
        run.temperature[i]!,
        input.initialTemperature * Math.pow(p / input.initialPressure, 0.4 / 1.4),
        1e-8,
        'T',
      )
    }
  })

  it('still matches both closed forms to 1e-4 with a coarse step of τ/20', () => {
    for (const process of ['isothermal', 'adiabatic'] as const) {
      const input: BlowdownInput = { ...base, process, step: tau(base) / 20 }
      const run = tankBlowdown(input)
      const closed = process === 'isothermal' ? isothermalPressure : adiabaticPressure
      const indices = chokedSamples(input, run)
      expect(indices.length).toBeGreaterThan(10)
      for (const i of indices)
        expectClose(run.pressure[i]!, closed(input, run.time[i]!), 1e-4, `${process} t=${run.time[i]}`)
    }
  })

  it('has the time constant of the closed form', () => {
    expectClose(blowdownTimeConstant(0.05, 293.15, 1e-5, 0.95, 1.4, 287.05), tau(base), 1e-14)
  })
})

describe('tankBlowdown after the throat unchokes', () => {
  for (const process of ['isothermal', 'adiabatic'] as const) {
    it(`(${process}) ends at ambient pressure with no flow, before the duration, with pressure never rising`, () => {
      const run = tankBlowdown({ ...base, process })
      const last = run.time.length - 1
      expect(run.time[last]).toBeLessThan(base.duration)
      expect(run.pressure[last]).toBe(base.ambientPressure)
      expect(run.massFlow[last]).toBe(0)
      for (let i = 1; i <= last; i++) {
        expect(run.pressure[i]!).toBeLessThanOrEqual(run.pressure[i - 1]!)
        expect(run.time[i]!).toBeGreaterThan(run.time[i - 1]!)
      }
      expect(
        [run.time.length, run.pressure.length, run.temperature.length, run.massFlow.length].every(
          (n) => n === run.time.length,
        ),
      ).toBe(true)
    })

    it(`(${process}) conserves mass: the integrated outflow equals the mass the tank lost`, () => {
      const input: BlowdownInput = { ...base, process, step: 0.01 }
      const run = tankBlowdown(input)
      let outflow = 0
      for (let i = 1; i < run.time.length; i++) {
        outflow += 0.5 * (run.time[i]! - run.time[i - 1]!) * (run.massFlow[i]! + run.massFlow[i - 1]!)
      }
      const mass = (i: number) => (run.pressure[i]! * input.volume) / (input.gasConstant * run.temperature[i]!)
      expectClose(outflow, mass(0) - mass(run.time.length - 1), 1e-4, 'outflow vs mass lost')
    })
  }

  it('has no jump in mass flow where the flow unchokes (the two flow laws meet with equal slope)', () => {
    const run = tankBlowdown({ ...base, step: 0.01 })
    let largest = 0
    for (let i = 1; i < run.time.length - 1; i++)
      largest = Math.max(largest, Math.abs(run.massFlow[i]! - run.massFlow[i - 1]!))
    // A smooth decay over ~60 s changes by about ṁ0·0.01/τ per 0.01 s step; a jump would be far larger.
    expect(largest).toBeLessThan(run.massFlow[0]! * (0.01 / tau(base)) * 1.01)
  })

  it('stops exactly at the duration when ambient is not reached, even when the duration is not a whole number of steps', () => {
    const input: BlowdownInput = { ...base, ambientPressure: 0, duration: 10, step: 0.03 }
    const run = tankBlowdown(input)
    expect(run.time[run.time.length - 1]).toBe(10)
    expect(run.time.length).toBe(335) // t = 0, 0.03, …, 9.99, 10
    expectClose(run.pressure[run.pressure.length - 1]!, isothermalPressure(input, 10), 1e-9, 'p(10 s)')
  })
})

describe('dischargeMassFlow', () => {
  const g = 1.4
  const R = 287.05
  it('is the choked flow times Cd at or below the critical pressure ratio', () => {
    for (const pb of [0, 1e5, 1e6 * criticalRatio(g)]) {
      expectClose(
        dischargeMassFlow(1e6, 300, pb, 1e-4, 0.9, g, R),
        0.9 * chokedMassFlow(1e6, 300, 1e-4, g, R),
        1e-14,
        `pb=${pb}`,
      )
    }
  })

  it('follows the compressible-orifice equation above the critical ratio (independent evaluation)', () => {
    for (const ratio of [0.6, 0.8, 0.95, 0.999]) {
      const expected =
        1e-4 *
        1e6 *
        Math.sqrt(((2 * g) / ((g - 1) * R * 300)) * (Math.pow(ratio, 2 / g) - Math.pow(ratio, (g + 1) / g)))
      expectClose(dischargeMassFlow(1e6, 300, ratio * 1e6, 1e-4, 1, g, R), expected, 1e-10, `pb/p0=${ratio}`)
    }
  })

  it('is continuous at the critical ratio and zero with no pressure difference', () => {
    const critical = 1e6 * criticalRatio(g)
    expectClose(
      dischargeMassFlow(1e6, 300, critical * (1 + 1e-9), 1e-4, 1, g, R),
      dischargeMassFlow(1e6, 300, critical, 1e-4, 1, g, R),
      1e-9,
    )
    expect(dischargeMassFlow(1e6, 300, 1e6, 1e-4, 1, g, R)).toBe(0)
  })

  it('rejects a back pressure above upstream, and Cd outside (0, 1]', () => {
    expectRangeError(
      () => dischargeMassFlow(1e5, 300, 2e5, 1e-4, 1, g, R),
      'downstreamPressure',
      'at most upstreamPressure',
    )
    expectRangeError(
      () => dischargeMassFlow(1e5, 300, 5e4, 1e-4, 0, g, R),
      'dischargeCoefficient',
      'greater than 0',
      'at most 1',
    )
    expectRangeError(() => dischargeMassFlow(1e5, 300, 5e4, 1e-4, 1.2, g, R), 'dischargeCoefficient')
  })
})

describe('tankBlowdown argument checks', () => {
  it('names the argument and its range in every RangeError', () => {
    expectRangeError(() => tankBlowdown({ ...base, volume: 0 }), 'volume', 'greater than 0')
    expectRangeError(() => tankBlowdown({ ...base, volume: -1 }), 'volume')
    expectRangeError(() => tankBlowdown({ ...base, initialPressure: Number.NaN }), 'initialPressure', 'NaN')
    expectRangeError(
      () => tankBlowdown({ ...base, ambientPressure: 2e6 }),
      'ambientPressure',
      'less than initialPressure',
    )
    expectRangeError(() => tankBlowdown({ ...base, initialTemperature: 0 }), 'initialTemperature')
    expectRangeError(() => tankBlowdown({ ...base, throatArea: Infinity }), 'throatArea', 'Infinity')
    expectRangeError(() => tankBlowdown({ ...base, dischargeCoefficient: 0 }), 'dischargeCoefficient')
    expectRangeError(() => tankBlowdown({ ...base, gamma: 1 }), 'gamma must be a finite number greater than 1 (got 1)')
    expectRangeError(() => tankBlowdown({ ...base, gasConstant: -287 }), 'gasConstant')
    expectRangeError(
      () => tankBlowdown({ ...base, process: 'polytropic' as 'adiabatic' }),
      'process',
      "'isothermal'",
      "'adiabatic'",
    )
    expectRangeError(() => tankBlowdown({ ...base, duration: 0 }), 'duration')
    expectRangeError(() => tankBlowdown({ ...base, step: 0 }), 'step')
    expectRangeError(() => tankBlowdown({ ...base, step: 300 }), 'step', 'at most duration')
    expectRangeError(() => tankBlowdown({ ...base, duration: 1e4, step: 1e-4 }), 'step', 'at least duration / 1000000')
    expectRangeError(() => tankBlowdown({ ...base, exitArea: 0.5e-5 }), 'exitArea', 'at least throatArea')
    expectRangeError(() => tankBlowdown({ ...base, exitArea: Number.NaN }), 'exitArea', 'NaN')
  })
})

// ---- A converging–diverging outlet: choking judged by the nozzle's own limit ----

/** The area–Mach relation, NACA Report 1135 eq. 80 (from memory), written out here. */
const areaRatioOf = (m: number, g: number) =>
  Math.pow((2 / (g + 1)) * (1 + ((g - 1) / 2) * m * m), (g + 1) / (2 * (g - 1))) / m
/** p/p0 = (1 + (γ−1)/2·M²)^(−γ/(γ−1)), NACA Report 1135 eq. 44 (from memory). */
const pOverP0 = (m: number, g: number) => Math.pow(1 + ((g - 1) / 2) * m * m, -g / (g - 1))
/**
 * Highest pa/p0 at which a nozzle of area ratio ε still has a sonic throat: the exit then holds the
 * subsonic Mach number of A/A* = ε, and pa equals its static pressure. Solved by bisection here.
 */
function chokeLimitOf(areaRatio: number, g: number): number {
  let lo = 1e-9
  let hi = 1
  for (let i = 0; i < 200; i++) {
    const mid = 0.5 * (lo + hi)
    if (areaRatioOf(mid, g) > areaRatio) lo = mid
    else hi = mid
  }
  return pOverP0(0.5 * (lo + hi), g)
}

/** First time the sampled pressure falls below `threshold`, linear between samples. */
function crossing(run: ReturnType<typeof tankBlowdown>, threshold: number): number {
  for (let i = 1; i < run.pressure.length; i++) {
    const p = run.pressure[i]!
    if (p < threshold) {
      const before = run.pressure[i - 1]!
      return run.time[i - 1]! + ((before - threshold) / (before - p)) * (run.time[i]! - run.time[i - 1]!)
    }
  }
  return Number.NaN
}

describe('the choke limit of a converging–diverging nozzle', () => {
  it('is pa/p0 ≈ 0.88 for ε = 1.5 in air, the p/p0 of the subsonic Mach number of A/A* = 1.5 (NACA Report 1135)', () => {
    // NACA Report 1135, Table I (γ = 1.4), as recalled from memory: M = 0.43 has A/A* = 1.5007 and
    // p/p0 = 0.88065; the equations written out above give the same figures.
    expectPrinted(areaRatioOf(0.43, 1.4), '1.5007')
    expectPrinted(pOverP0(0.43, 1.4), '0.88065')
    const limit = nozzlePressureRatios(1.5, 1.4).chokeLimit
    expectClose(limit, chokeLimitOf(1.5, 1.4), 1e-12)
    expectPrinted(limit, '0.88')
    // Far above the 0.528 of a plain orifice.
    expectClose(nozzlePressureRatios(1, 1.4).chokeLimit, Math.pow(2 / 2.4, 3.5), 1e-14)
  })
})

describe('tankBlowdown through a converging–diverging nozzle (exitArea given)', () => {
  // The stand's receiver and nozzle as in the cold-flow module: 50 L at 700 kPa gauge, 84 kPa
  // barometer, 20 °C, a 4.0 mm throat and a 4.9 mm exit (ε = 1.5006), Cd 0.98.
  const throatArea = (Math.PI * 0.004 ** 2) / 4
  const exitArea = (Math.PI * 0.0049 ** 2) / 4
  const stand: BlowdownInput = {
    volume: 0.05,
    initialPressure: 784e3,
    initialTemperature: 293.15,
    ambientPressure: 84e3,
    throatArea,
    exitArea,
    dischargeCoefficient: 0.98,
    gamma: 1.4,
    gasConstant: 287.05,
    process: 'adiabatic',
    duration: 60,
    step: 0.01,
  }

  it('stays choked until the receiver falls to pa/chokeLimit, at the time the closed forms give (adiabatic and isothermal)', () => {
    const limit = chokeLimitOf(exitArea / throatArea, 1.4)
    const unchokeAt = stand.ambientPressure / limit
    const g = 1.4
    // Closed forms, from the header of this file: adiabatic p = p_i·(1 + (γ−1)/2·t/τ)^(−2γ/(γ−1)),
    // isothermal p = p_i·exp(−t/τ); solved for the time p reaches unchokeAt.
    const adiabatic =
      ((2 * tau(stand)) / (g - 1)) * (Math.pow(stand.initialPressure / unchokeAt, (g - 1) / (2 * g)) - 1)
    const isothermal = tau(stand) * Math.log(stand.initialPressure / unchokeAt)
    expectClose(crossing(tankBlowdown(stand), unchokeAt), adiabatic, 1e-4, 'adiabatic')
    expectClose(crossing(tankBlowdown({ ...stand, process: 'isothermal' }), unchokeAt), isothermal, 1e-4, 'isothermal')
    expectPrinted(adiabatic, '35.9', 'choked for, s (hand computation)')
  })

  it('is choked for about 36 s where a plain orifice of the same throat is choked for about 26 s', () => {
    const orifice: BlowdownInput = { ...stand }
    delete orifice.exitArea
    const criticalAt = stand.ambientPressure / Math.pow(2 / 2.4, 3.5)
    const g = 1.4
    const expected =
      ((2 * tau(stand)) / (g - 1)) * (Math.pow(stand.initialPressure / criticalAt, (g - 1) / (2 * g)) - 1)
    expectClose(crossing(tankBlowdown(orifice), criticalAt), expected, 1e-4, 'orifice')
    expectPrinted(expected, '26.2', 'orifice choked for, s (hand computation)')
    // Up to that time both runs are the same choked discharge.
    const withNozzle = tankBlowdown(stand)
    const plain = tankBlowdown(orifice)
    for (let i = 0; i < 2000; i += 100) expect(withNozzle.pressure[i]).toBe(plain.pressure[i])
  })

  it('after unchoking, carries the subsonic nozzle flow Cd·ρe·ve·Ae at the exit, as nozzleFlow gives it (and as the orifice law with Ae)', () => {
    const run = tankBlowdown(stand)
    const g = 1.4
    const R = stand.gasConstant
    let checked = 0
    for (let i = 0; i < run.time.length - 1; i++) {
      const p = run.pressure[i]!
      const t = run.temperature[i]!
      const r = stand.ambientPressure / p
      if (r <= chokeLimitOf(exitArea / throatArea, g)) {
        expectClose(run.massFlow[i]!, 0.98 * chokedMassFlow(p, t, throatArea, g, R), 1e-12, `choked, t=${run.time[i]}`)
        continue
      }
      // Isentropic from the receiver to the exit at pa: ṁ = Ae·p·√(2γ/((γ−1)RT)·(r^(2/γ) − r^((γ+1)/γ))).
      const orificeWithAe =
        exitArea * p * Math.sqrt(((2 * g) / ((g - 1) * R * t)) * (Math.pow(r, 2 / g) - Math.pow(r, (g + 1) / g)))
      expectClose(run.massFlow[i]!, 0.98 * orificeWithAe, 1e-9, `unchoked, t=${run.time[i]}`)
      const viaNozzle = nozzleFlow({
        chamberPressure: p,
        chamberTemperature: t,
        ambientPressure: stand.ambientPressure,
        throatArea,
        exitArea,
        gamma: g,
        gasConstant: R,
      })
      expectClose(run.massFlow[i]!, 0.98 * viaNozzle.massFlow, 1e-12)
      checked++
    }
    expect(checked).toBeGreaterThan(100)
  })

  it('has no jump in mass flow where the throat unchokes, conserves mass, and ends at ambient pressure', () => {
    const run = tankBlowdown(stand)
    let largest = 0
    for (let i = 1; i < run.time.length - 1; i++)
      largest = Math.max(largest, Math.abs(run.massFlow[i]! - run.massFlow[i - 1]!))
    // The steepest change of the smooth decay is at the start: ṁ ∝ p/√T ∝ P^((γ+1)/(2γ)) and
    // dP/dt = −(γ/τ)·P^((3γ−1)/(2γ)), so |dṁ/dt| = ṁ0·(γ+1)/(2τ) at P = 1. A jump would be far larger.
    expect(largest).toBeLessThan(run.massFlow[0]! * (0.01 / tau(stand)) * 1.2 * 1.05)
    let outflow = 0
    for (let i = 1; i < run.time.length; i++)
      outflow += 0.5 * (run.time[i]! - run.time[i - 1]!) * (run.massFlow[i]! + run.massFlow[i - 1]!)
    const last = run.time.length - 1
    const mass = (i: number) => (run.pressure[i]! * stand.volume) / (stand.gasConstant * run.temperature[i]!)
    expectClose(outflow, mass(0) - mass(last), 1e-4, 'outflow vs mass lost')
    expect(run.pressure[last]).toBe(stand.ambientPressure)
    expect(run.time[last]).toBeLessThan(stand.duration)
  })

  it('with exitArea equal to the throat area is the plain orifice', () => {
    const same = tankBlowdown({ ...base, exitArea: base.throatArea })
    const plain = tankBlowdown(base)
    expect(same.time.length).toBe(plain.time.length)
    for (let i = 0; i < plain.time.length; i += 50)
      expectClose(same.pressure[i]!, plain.pressure[i]!, 1e-12, `t=${plain.time[i]}`)
  })
})

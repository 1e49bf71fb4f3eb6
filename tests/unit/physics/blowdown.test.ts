import { describe, expect, it } from 'vitest'
import { blowdownTimeConstant, chokedMassFlow, dischargeMassFlow, tankBlowdown } from '../../../shared/physics/index'
import type { BlowdownInput } from '../../../shared/physics/index'
import { expectClose } from '../../helpers/expect-close'
import { expectRangeError } from '../../helpers/expect-range-error'

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
  return input.volume / (input.dischargeCoefficient * input.throatArea * Math.sqrt(g * input.gasConstant * input.initialTemperature) * flowFunction)
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
    for (const i of indices) expectClose(run.pressure[i]!, isothermalPressure(base, run.time[i]!), 1e-8, `t=${run.time[i]}`)
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
      expectClose(run.temperature[i]!, input.initialTemperature * Math.pow(p / input.initialPressure, 0.4 / 1.4), 1e-8, 'T')
    }
  })

  it('still matches both closed forms to 1e-4 with a coarse step of τ/20', () => {
    for (const process of ['isothermal', 'adiabatic'] as const) {
      const input: BlowdownInput = { ...base, process, step: tau(base) / 20 }
      const run = tankBlowdown(input)
      const closed = process === 'isothermal' ? isothermalPressure : adiabaticPressure
      const indices = chokedSamples(input, run)
      expect(indices.length).toBeGreaterThan(10)
      for (const i of indices) expectClose(run.pressure[i]!, closed(input, run.time[i]!), 1e-4, `${process} t=${run.time[i]}`)
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
      expect([run.time.length, run.pressure.length, run.temperature.length, run.massFlow.length].every((n) => n === run.time.length)).toBe(true)
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
    for (let i = 1; i < run.time.length - 1; i++) largest = Math.max(largest, Math.abs(run.massFlow[i]! - run.massFlow[i - 1]!))
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
      expectClose(dischargeMassFlow(1e6, 300, pb, 1e-4, 0.9, g, R), 0.9 * chokedMassFlow(1e6, 300, 1e-4, g, R), 1e-14, `pb=${pb}`)
    }
  })

  it('follows the compressible-orifice equation above the critical ratio (independent evaluation)', () => {
    for (const ratio of [0.6, 0.8, 0.95, 0.999]) {
      const expected = 1e-4 * 1e6 * Math.sqrt(((2 * g) / ((g - 1) * R * 300)) * (Math.pow(ratio, 2 / g) - Math.pow(ratio, (g + 1) / g)))
      expectClose(dischargeMassFlow(1e6, 300, ratio * 1e6, 1e-4, 1, g, R), expected, 1e-10, `pb/p0=${ratio}`)
    }
  })

  it('is continuous at the critical ratio and zero with no pressure difference', () => {
    const critical = 1e6 * criticalRatio(g)
    expectClose(dischargeMassFlow(1e6, 300, critical * (1 + 1e-9), 1e-4, 1, g, R), dischargeMassFlow(1e6, 300, critical, 1e-4, 1, g, R), 1e-9)
    expect(dischargeMassFlow(1e6, 300, 1e6, 1e-4, 1, g, R)).toBe(0)
  })

  it('rejects a back pressure above upstream, and Cd outside (0, 1]', () => {
    expectRangeError(() => dischargeMassFlow(1e5, 300, 2e5, 1e-4, 1, g, R), 'downstreamPressure', 'at most upstreamPressure')
    expectRangeError(() => dischargeMassFlow(1e5, 300, 5e4, 1e-4, 0, g, R), 'dischargeCoefficient', 'greater than 0', 'at most 1')
    expectRangeError(() => dischargeMassFlow(1e5, 300, 5e4, 1e-4, 1.2, g, R), 'dischargeCoefficient')
  })
})

describe('tankBlowdown argument checks', () => {
  it('names the argument and its range in every RangeError', () => {
    expectRangeError(() => tankBlowdown({ ...base, volume: 0 }), 'volume', 'greater than 0')
    expectRangeError(() => tankBlowdown({ ...base, volume: -1 }), 'volume')
    expectRangeError(() => tankBlowdown({ ...base, initialPressure: Number.NaN }), 'initialPressure', 'NaN')
    expectRangeError(() => tankBlowdown({ ...base, ambientPressure: 2e6 }), 'ambientPressure', 'less than initialPressure')
    expectRangeError(() => tankBlowdown({ ...base, initialTemperature: 0 }), 'initialTemperature')
    expectRangeError(() => tankBlowdown({ ...base, throatArea: Infinity }), 'throatArea', 'Infinity')
    expectRangeError(() => tankBlowdown({ ...base, dischargeCoefficient: 0 }), 'dischargeCoefficient')
    expectRangeError(() => tankBlowdown({ ...base, gamma: 1 }), 'gamma must be a finite number greater than 1 (got 1)')
    expectRangeError(() => tankBlowdown({ ...base, gasConstant: -287 }), 'gasConstant')
    expectRangeError(() => tankBlowdown({ ...base, process: 'polytropic' as 'adiabatic' }), 'process', "'isothermal'", "'adiabatic'")
    expectRangeError(() => tankBlowdown({ ...base, duration: 0 }), 'duration')
    expectRangeError(() => tankBlowdown({ ...base, step: 0 }), 'step')
    expectRangeError(() => tankBlowdown({ ...base, step: 300 }), 'step', 'at most duration')
    expectRangeError(() => tankBlowdown({ ...base, duration: 1e4, step: 1e-4 }), 'step', 'at least duration / 1000000')
  })
})

import { describe, expect, it } from 'vitest'
import {
  idealExhaustVelocity,
  idealSpecificImpulse,
  isentropic,
  machFromPressureRatio,
  nozzleFlow,
} from '../../../shared/physics'
import { expectClose } from '../../helpers/expect-close'
import { expectRangeError } from '../../helpers/expect-range-error'

const GAMMA = 1.4
const R = 287.05
const T0 = 293.15
/** cp = γR/(γ−1) = 1004.675 J/(kg·K) for R = 287.05. */
const CP = (GAMMA * R) / (GAMMA - 1)

describe('idealExhaustVelocity', () => {
  it('to vacuum is √(2 cp T0): 767.5 m/s for air at 20 °C (energy equation, all enthalpy to velocity)', () => {
    expectClose(idealExhaustVelocity(1e6, 0, T0, GAMMA, R), Math.sqrt(2 * CP * T0), 1e-14)
    expectClose(Math.sqrt(2 * CP * T0), 767.49, 1e-4)
  })

  it('to the pressure of Mach 2 is 2·√(γ R T): NACA 1135 Table I, p/p0 = 0.12780 and T/T0 = 0.55556 at M = 2', () => {
    // a = √(γ R T) with T = 0.55556 T0; v = M·a. The table's 5 figures bound the agreement.
    const expected = 2 * Math.sqrt(GAMMA * R * 0.55556 * T0)
    expectClose(idealExhaustVelocity(1e6, 0.1278 * 1e6, T0, GAMMA, R), expected, 5e-5)
  })

  it('is 0 with no expansion (p = p0), and refuses a pressure outside [0, p0] or γ ≤ 1, naming the argument', () => {
    expect(idealExhaustVelocity(5e5, 5e5, T0, GAMMA, R)).toBe(0)
    expectRangeError(() => idealExhaustVelocity(5e5, 6e5, T0, GAMMA, R), 'exitPressure', 'chamberPressure (500000)')
    expectRangeError(() => idealExhaustVelocity(5e5, -1, T0, GAMMA, R), 'exitPressure')
    expectRangeError(() => idealExhaustVelocity(5e5, 1e5, T0, 1, R), 'gamma', 'greater than 1')
    expectRangeError(() => idealExhaustVelocity(5e5, 1e5, Number.NaN, GAMMA, R), 'chamberTemperature')
  })
})

describe('idealSpecificImpulse: optimum expansion to the ambient pressure', () => {
  it('written out: √(2γ/(γ−1)·R·T0·(1 − (pa/p0)^((γ−1)/γ)))/g0, about 54 s for the demo stand (820 kPa to 84 kPa) against 78 s to vacuum', () => {
    const p0 = 820e3
    const pa = 84e3
    const expected = Math.sqrt(2 * CP * T0 * (1 - (pa / p0) ** (0.4 / 1.4))) / 9.80665
    expectClose(idealSpecificImpulse(p0, pa, T0, GAMMA, R), expected, 1e-14)
    expect(idealSpecificImpulse(p0, pa, T0, GAMMA, R)).toBeCloseTo(54.1, 1)
    expect(idealSpecificImpulse(p0, 0, T0, GAMMA, R)).toBeCloseTo(78.3, 1)
  })

  it('no full-flowing nozzle beats it: nozzleFlow’s specific impulse over area ratios 1.2 to 6 stays below, and meets it at the area ratio that expands exactly to ambient', () => {
    const p0 = 820e3
    const pa = 84e3
    const ceiling = idealSpecificImpulse(p0, pa, T0, GAMMA, R)
    const flow = (exitArea: number) =>
      nozzleFlow({
        chamberPressure: p0,
        chamberTemperature: T0,
        ambientPressure: pa,
        throatArea: 1e-5,
        exitArea,
        gamma: GAMMA,
        gasConstant: R,
      })
    for (let eps = 1.2; eps <= 6; eps += 0.1)
      expect(flow(eps * 1e-5).specificImpulse, `ε = ${eps.toFixed(1)}`).toBeLessThanOrEqual(ceiling * (1 + 1e-12))
    // Design area ratio for pe = pa: the area ratio of the Mach number whose p/p0 is pa/p0.
    const design = isentropic(machFromPressureRatio(pa / p0, GAMMA), GAMMA).areaRatio
    expectClose(flow(design * 1e-5).specificImpulse, ceiling, 1e-9)
  })

  it('refuses an ambient pressure above the chamber pressure', () => {
    expectRangeError(() => idealSpecificImpulse(1e5, 2e5, T0, GAMMA, R), 'ambientPressure', 'chamberPressure (100000)')
  })
})

import { describe, expect, it } from 'vitest'
import {
  BESSEL_J0_FIRST_ZERO,
  SHOCK_CELL_COEFFICIENT,
  fullyExpandedJet,
  nozzleFlow,
  shockCellSpacing,
} from '../../../shared/physics'
import { expectClose } from '../../helpers/expect-close'
import { expectRangeError } from '../../helpers/expect-range-error'

// NACA Report 1135 (1953), Table I (isentropic flow, γ = 1.4): at M = 2.00, p/p0 = 0.1278 and
// A/A* = 1.688; at M = 3.00, p/p0 = 0.02722 and A/A* = 4.235 (tabulated to four figures).
const NACA_1135 = [
  { mach: 2, pOverP0: 0.1278, areaRatio: 1.688 },
  { mach: 3, pOverP0: 0.02722, areaRatio: 4.235 },
]

describe('fullyExpandedJet', () => {
  it('gives the Mach number and diameter of NACA Report 1135 Table I from p0/pa and the throat', () => {
    for (const row of NACA_1135) {
      const jet = fullyExpandedJet(0.004, 1e5 / row.pOverP0, 1e5, 1.4)
      // The table's four figures bound the agreement.
      expectClose(jet.mach, row.mach, 5e-4)
      expectClose((jet.diameter / 0.004) ** 2, row.areaRatio, 1e-3)
    }
  })

  it('equals the exit of a nozzle run at its design pressure (mass conservation, closed form)', () => {
    const throatArea = 2e-5
    const exitArea = 2.5 * throatArea
    const flow = nozzleFlow({
      chamberPressure: 1e6,
      chamberTemperature: 293,
      ambientPressure: 1e5,
      throatArea,
      exitArea,
      gamma: 1.4,
      gasConstant: 287.05,
    })
    // Run it at exactly its design ratio: ambient = design exit pressure.
    const jet = fullyExpandedJet(Math.sqrt((4 * throatArea) / Math.PI), 1e6, flow.exitPressure, 1.4)
    expectClose(jet.mach, flow.exitMach, 1e-9)
    expectClose(jet.diameter, Math.sqrt((4 * exitArea) / Math.PI), 1e-9)
  })

  it('is sonic with the throat diameter at the critical ratio, and refuses a subsonic jet', () => {
    const critical = (2 / 2.4) ** (1.4 / 0.4) // p*/p0 = 0.528282 (NACA Report 1135, Table I at M = 1)
    const jet = fullyExpandedJet(0.004, 1e5 / critical, 1e5, 1.4)
    expectClose(jet.mach, 1, 1e-12)
    expectClose(jet.diameter, 0.004, 1e-12)
    expectRangeError(() => fullyExpandedJet(0.004, 1.5e5, 1e5, 1.4), 'chamberPressure', 'no shock cells')
    expectRangeError(() => fullyExpandedJet(0, 5e5, 1e5, 1.4), 'throatDiameter')
    expectRangeError(() => fullyExpandedJet(0.004, 5e5, 1e5, 1), 'gamma')
  })
})

describe('shockCellSpacing', () => {
  it('uses π over the first zero of J0 (Abramowitz & Stegun Table 9.5), the 1.31 usually quoted', () => {
    expectClose(BESSEL_J0_FIRST_ZERO, 2.4048255577, 1e-10)
    expectClose(SHOCK_CELL_COEFFICIENT, 1.3063, 1e-4)
    // "L ≈ 1.31·Dj·√(Mj² − 1)": common practice, no source.
    expect(Math.abs(SHOCK_CELL_COEFFICIENT - 1.31)).toBeLessThan(0.005)
  })

  it('gives Pack’s spacing for a fully expanded jet (Pack 1950, form from memory)', () => {
    expectClose(shockCellSpacing(0.01, 2), (Math.PI / 2.4048255577) * 0.01 * Math.sqrt(3), 1e-9)
    // The spacing grows with the jet's Mach number: √(Mj² − 1) is 0 at Mj = 1.
    expect(shockCellSpacing(0.01, 1.5)).toBeLessThan(shockCellSpacing(0.01, 2))
  })

  it('refuses a jet that is not supersonic and a non-positive diameter', () => {
    expectRangeError(() => shockCellSpacing(0.01, 1), 'jetMach', 'supersonic')
    expectRangeError(() => shockCellSpacing(-1, 2), 'jetDiameter')
  })
})

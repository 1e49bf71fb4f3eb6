import { describe, expect, it } from 'vitest'
import {
  criticalPressureRatio,
  isentropic,
  machFromAreaRatio,
  machFromPressureRatio,
} from '../../../shared/physics/index'
import type { FlowBranch } from '../../../shared/physics/index'
import { solveMachFromAreaRatio } from '../../../shared/physics/isentropic'
import { expectClose } from '../../helpers/expect-close'
import { expectPrinted } from '../../helpers/printed'
import { expectRangeError } from '../../helpers/expect-range-error'

// Independent closed forms, written here from the textbook relations (not the library's code):
// T0/T = 1 + (γ−1)/2·M², p/p0 = (T/T0)^(γ/(γ−1)), ρ/ρ0 = (T/T0)^(1/(γ−1)),
// A/A* = (1/M)·[(2/(γ+1))(1 + (γ−1)/2·M²)]^((γ+1)/(2(γ−1))).
function refTemperatureRatio(m: number, g: number): number {
  return 1 / (1 + ((g - 1) / 2) * m * m)
}
function refPressureRatio(m: number, g: number): number {
  return Math.pow(refTemperatureRatio(m, g), g / (g - 1))
}
function refDensityRatio(m: number, g: number): number {
  return Math.pow(refTemperatureRatio(m, g), 1 / (g - 1))
}
function refAreaRatio(m: number, g: number): number {
  return Math.pow((2 / (g + 1)) * (1 + ((g - 1) / 2) * m * m), (g + 1) / (2 * (g - 1))) / m
}
/** Mach from A/A* by plain bisection on the closed form: slow but obviously correct. */
function refMachFromAreaRatio(x: number, g: number, supersonic: boolean): number {
  let lo = supersonic ? 1 : 1e-12
  let hi = supersonic ? 1e4 : 1
  for (let i = 0; i < 200; i++) {
    const mid = 0.5 * (lo + hi)
    const above = refAreaRatio(mid, g) > x
    // A/A* falls with M below Mach 1 and rises above it.
    if (above === supersonic) hi = mid
    else lo = mid
  }
  return 0.5 * (lo + hi)
}

function logSpaced(from: number, to: number, count: number): number[] {
  return Array.from({ length: count }, (_, i) => from * (to / from) ** (i / (count - 1)))
}

// NACA Report 1135 (Ames Research Staff, 1953), Table I, "Subsonic and supersonic flow (isentropic
// flow)", γ = 1.4: p/pt, ρ/ρt, T/Tt, A/A*. Written down from memory to four significant figures;
// every entry is also checked below against the closed forms above, so a misremembered digit fails.
const NACA_1135_TABLE_I: ReadonlyArray<readonly [number, string, string, string, string]> = [
  [0.5, '0.8430', '0.8852', '0.9524', '1.340'],
  [1.0, '0.5283', '0.6339', '0.8333', '1.000'],
  [1.5, '0.2724', '0.3950', '0.6897', '1.176'],
  [2.0, '0.1278', '0.2300', '0.5556', '1.688'],
  [2.5, '0.05853', '0.1317', '0.4444', '2.637'],
  [3.0, '0.02722', '0.07623', '0.3571', '4.235'],
  [5.0, '0.001890', '0.01134', '0.1667', '25.00'],
]

describe('isentropic ratios against NACA Report 1135, Table I (γ = 1.4)', () => {
  for (const [mach, p, rho, t, area] of NACA_1135_TABLE_I) {
    it(`match the printed p/p0, ρ/ρ0, T/T0 and A/A* at M = ${mach}`, () => {
      const r = isentropic(mach, 1.4)
      expectPrinted(r.pressureRatio, p, `p/p0 at M=${mach}`)
      expectPrinted(r.densityRatio, rho, `ρ/ρ0 at M=${mach}`)
      expectPrinted(r.temperatureRatio, t, `T/T0 at M=${mach}`)
      expectPrinted(r.areaRatio, area, `A/A* at M=${mach}`)
    })
    it(`the recalled table entries at M = ${mach} agree with the closed forms (guards against misremembered digits)`, () => {
      expectPrinted(refPressureRatio(mach, 1.4), p, 'p/p0')
      expectPrinted(refDensityRatio(mach, 1.4), rho, 'ρ/ρ0')
      expectPrinted(refTemperatureRatio(mach, 1.4), t, 'T/T0')
      expectPrinted(refAreaRatio(mach, 1.4), area, 'A/A*')
    })
  }

  it('agree with the closed forms to 1e-13 over a sweep of Mach numbers and gammas', () => {
    for (const g of [1.1, 1.2, 1.3, 1.4, 5 / 3]) {
      for (const m of logSpaced(0.01, 20, 60)) {
        const r = isentropic(m, g)
        expectClose(r.pressureRatio, refPressureRatio(m, g), 1e-13, `p/p0 M=${m} γ=${g}`)
        expectClose(r.densityRatio, refDensityRatio(m, g), 1e-13, `ρ/ρ0 M=${m} γ=${g}`)
        expectClose(r.temperatureRatio, refTemperatureRatio(m, g), 1e-13, `T/T0 M=${m} γ=${g}`)
        expectClose(r.areaRatio, refAreaRatio(m, g), 1e-13, `A/A* M=${m} γ=${g}`)
      }
    }
  })

  it('give stagnation values at Mach 0 (ratios 1, infinite area ratio)', () => {
    const r = isentropic(0, 1.4)
    expect([r.pressureRatio, r.temperatureRatio, r.densityRatio]).toEqual([1, 1, 1])
    expect(r.areaRatio).toBe(Infinity)
  })

  it('fall monotonically with Mach number, and A/A* has its minimum of 1 at Mach 1', () => {
    const machs = [...logSpaced(0.01, 1, 200), ...logSpaced(1, 50, 200).slice(1)]
    for (let i = 1; i < machs.length; i++) {
      const [m0, m1] = [machs[i - 1]!, machs[i]!]
      const [a, b] = [isentropic(m0, 1.4), isentropic(m1, 1.4)]
      expect(b.pressureRatio).toBeLessThan(a.pressureRatio)
      expect(b.temperatureRatio).toBeLessThan(a.temperatureRatio)
      expect(b.densityRatio).toBeLessThan(a.densityRatio)
      expect(b.areaRatio).toBeGreaterThanOrEqual(1)
      if (m1 <= 1) expect(b.areaRatio).toBeLessThan(a.areaRatio)
      else expect(b.areaRatio).toBeGreaterThan(a.areaRatio)
    }
  })
})

describe('machFromAreaRatio', () => {
  it('recovers the table Mach numbers on both branches from exact area ratios', () => {
    for (const m of [0.05, 0.2, 0.5, 0.8, 0.99]) {
      expectClose(machFromAreaRatio(refAreaRatio(m, 1.4), 1.4, 'subsonic'), m, 1e-12, `subsonic M=${m}`)
    }
    for (const m of [1.01, 1.5, 2, 2.5, 3, 5, 10]) {
      expectClose(machFromAreaRatio(refAreaRatio(m, 1.4), 1.4, 'supersonic'), m, 1e-12, `supersonic M=${m}`)
    }
  })

  it('reads the printed NACA 1135 area ratio A/A* = 1.688 back as M ≈ 2.00 (table printed to 4 figures)', () => {
    // A/A* = 1.688 is the rounded entry for M = 2.00; dA/dM ≈ 1.25 there, so half a unit of the
    // last printed place (5e-4) moves M by at most about 4e-4.
    expect(Math.abs(machFromAreaRatio(1.688, 1.4, 'supersonic') - 2)).toBeLessThan(5e-4)
  })

  it('returns Mach 1 on both branches at an area ratio of 1', () => {
    expect(machFromAreaRatio(1, 1.4, 'subsonic')).toBe(1)
    expect(machFromAreaRatio(1, 1.4, 'supersonic')).toBe(1)
  })

  it('round-trips: the area ratio of the returned Mach number is the input to 1e-12, both branches, up to 1e4', () => {
    const branches: FlowBranch[] = ['subsonic', 'supersonic']
    const ratios = [1 + 1e-15, 1 + 1e-12, 1 + 1e-9, 1 + 1e-6, ...logSpaced(1.0001, 1e4, 1500)]
    for (const g of [1.05, 1.13, 1.2, 1.3, 1.4, 5 / 3, 2]) {
      for (const branch of branches) {
        for (const x of ratios) {
          const m = machFromAreaRatio(x, g, branch)
          expect(branch === 'subsonic' ? m <= 1 : m >= 1).toBe(true)
          expectClose(isentropic(m, g).areaRatio, x, 1e-12, `${branch} x=${x} γ=${g}`)
        }
      }
    }
  })

  it('agrees to 1e-12 in Mach with a brute-force bisection of the closed form', () => {
    for (const g of [1.2, 1.4, 5 / 3]) {
      for (const x of logSpaced(1.001, 1e4, 80)) {
        expectClose(machFromAreaRatio(x, g, 'subsonic'), refMachFromAreaRatio(x, g, false), 1e-12, `sub x=${x}`)
        expectClose(machFromAreaRatio(x, g, 'supersonic'), refMachFromAreaRatio(x, g, true), 1e-12, `sup x=${x}`)
      }
    }
  })

  it('converges in at most 4 Halley steps for 1.01 ≤ γ ≤ 3 and 1 < A/A* ≤ 1e4', () => {
    let worst = 0
    for (const g of [1.01, 1.05, 1.1, 1.2, 1.3, 1.4, 5 / 3, 2, 3]) {
      for (const x of [1 + 1e-14, ...logSpaced(1.00001, 1e4, 1000)]) {
        for (const supersonic of [false, true]) {
          worst = Math.max(worst, solveMachFromAreaRatio(x, g, supersonic).iterations)
        }
      }
    }
    expect(worst).toBeLessThanOrEqual(4)
  })

  it('stays finite and accurate far beyond the usual range (A/A* = 1e12)', () => {
    const sub = machFromAreaRatio(1e12, 1.4, 'subsonic')
    const sup = machFromAreaRatio(1e12, 1.4, 'supersonic')
    expectClose(isentropic(sub, 1.4).areaRatio, 1e12, 1e-12, 'subsonic')
    expectClose(isentropic(sup, 1.4).areaRatio, 1e12, 1e-12, 'supersonic')
  })

  it('rejects area ratios below 1, non-finite values, gamma ≤ 1 and unknown branches with named RangeErrors', () => {
    expectRangeError(() => machFromAreaRatio(0.99, 1.4, 'subsonic'), 'areaRatio', 'at least 1', '0.99')
    expectRangeError(() => machFromAreaRatio(0, 1.4, 'subsonic'), 'areaRatio')
    expectRangeError(() => machFromAreaRatio(Number.NaN, 1.4, 'subsonic'), 'areaRatio', 'NaN')
    expectRangeError(() => machFromAreaRatio(Infinity, 1.4, 'supersonic'), 'areaRatio', 'Infinity')
    expectRangeError(
      () => machFromAreaRatio(2, 1, 'supersonic'),
      'gamma must be a finite number greater than 1 (got 1)',
    )
    expectRangeError(() => machFromAreaRatio(2, Number.NaN, 'supersonic'), 'gamma', 'NaN')
    expectRangeError(() => machFromAreaRatio(2, 1.4, 'sideways' as FlowBranch), 'branch', "'subsonic'", "'supersonic'")
  })
})

describe('machFromPressureRatio', () => {
  it('inverts p/p0 to 1e-12 from low subsonic to hypersonic Mach numbers', () => {
    for (const g of [1.2, 1.4, 5 / 3]) {
      for (const m of [0.1, 0.3, 0.9, 1, 1.7, 3, 8, 20]) {
        expectClose(machFromPressureRatio(refPressureRatio(m, g), g), m, 1e-12, `M=${m} γ=${g}`)
      }
    }
  })

  it('at very low Mach numbers is as accurate as the rounding of p/p0 near 1 allows', () => {
    // 1 − p/p0 ≈ γM²/2, so an error δ in p/p0 moves M by δ/(γM²) relative. The reference p/p0 is
    // itself a power of a rounded T/T0, which multiplies its rounding by γ/(γ−1) = 3.5, so allow
    // δ = 8 units of 2.2e-16.
    for (const m of [1e-2, 1e-3, 1e-4]) {
      const tolerance = (8 * Number.EPSILON) / (1.4 * m * m)
      expectClose(machFromPressureRatio(refPressureRatio(m, 1.4), 1.4), m, tolerance, `M=${m}`)
    }
  })

  it('reads the printed NACA 1135 entry p/p0 = 0.1278 back as M ≈ 2.00', () => {
    // d(p/p0)/dM ≈ −0.18 at M = 2, so ±5e-5 in the printed value is about ±3e-4 in M.
    expect(Math.abs(machFromPressureRatio(0.1278, 1.4) - 2)).toBeLessThan(3e-4)
  })

  it('gives Mach 0 at p/p0 = 1', () => {
    expect(machFromPressureRatio(1, 1.4)).toBe(0)
  })

  it('rejects ratios outside (0, 1] and non-finite values', () => {
    expectRangeError(() => machFromPressureRatio(0, 1.4), 'pressureRatio', 'greater than 0', 'at most 1')
    expectRangeError(() => machFromPressureRatio(1.01, 1.4), 'pressureRatio', '1.01')
    expectRangeError(() => machFromPressureRatio(-0.5, 1.4), 'pressureRatio')
    expectRangeError(() => machFromPressureRatio(Number.NaN, 1.4), 'pressureRatio', 'NaN')
    expectRangeError(() => machFromPressureRatio(0.5, 0.9), 'gamma')
  })
})

describe('criticalPressureRatio', () => {
  it('is p/p0 at Mach 1: 0.5283 for γ = 1.4 (NACA 1135, Table I, M = 1.00)', () => {
    expectPrinted(criticalPressureRatio(1.4), '0.5283')
  })

  it('is 0.528 for air, so a converging nozzle chokes once p0 exceeds about 1.89 × ambient (common practice, no published source)', () => {
    expect(criticalPressureRatio(1.4).toFixed(3)).toBe('0.528')
    expect((1 / criticalPressureRatio(1.4)).toFixed(2)).toBe('1.89')
  })

  it('matches (2/(γ+1))^(γ/(γ−1)) for other gases', () => {
    for (const g of [1.1, 1.2, 1.3, 5 / 3])
      expectClose(criticalPressureRatio(g), Math.pow(2 / (g + 1), g / (g - 1)), 1e-14)
  })
})

describe('isentropic argument checks', () => {
  it('throws named RangeErrors for a negative or non-finite Mach number and for bad gamma', () => {
    expectRangeError(() => isentropic(-0.1, 1.4), 'mach', 'at least 0', '-0.1')
    expectRangeError(() => isentropic(Number.NaN, 1.4), 'mach', 'NaN')
    expectRangeError(() => isentropic(Infinity, 1.4), 'mach', 'Infinity')
    expectRangeError(() => isentropic(-Infinity, 1.4), 'mach', '-Infinity')
    expectRangeError(() => isentropic(2, 1), 'gamma must be a finite number greater than 1 (got 1)')
    expectRangeError(() => isentropic(2, 0), 'gamma', '(got 0)')
    expectRangeError(() => isentropic(2, Infinity), 'gamma', 'Infinity')
    expectRangeError(() => isentropic('2' as unknown as number, 1.4), 'mach', 'a string')
    expectRangeError(() => criticalPressureRatio(1), 'gamma')
  })
})

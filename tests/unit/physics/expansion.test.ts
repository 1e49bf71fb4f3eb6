import { describe, expect, it } from 'vitest'
import { machFromPrandtlMeyer, maxPrandtlMeyer, prandtlMeyer } from '../../../shared/physics/index'
import { expectClose } from '../../helpers/expect-close'
import { expectPrinted } from '../../helpers/printed'
import { expectRangeError } from '../../helpers/expect-range-error'

const DEG = Math.PI / 180

// Independent evaluation: ν = √((γ+1)/(γ−1))·atan(√((γ−1)(M²−1)/(γ+1))) − atan(√(M²−1)),
// written directly from NACA Report 1135 eq. 171 (number from memory). Good away from M = 1.
function refNu(m: number, g: number): number {
  const a = Math.sqrt((g + 1) / (g - 1))
  return a * Math.atan(Math.sqrt(m * m - 1) / a) - Math.atan(Math.sqrt(m * m - 1))
}

describe('prandtlMeyer', () => {
  // NACA Report 1135 (1953), Table I, column ν (degrees), γ = 1.4; recalled from memory and
  // cross-checked against refNu below.
  const table: ReadonlyArray<readonly [number, string]> = [
    [1.5, '11.905'],
    [2.0, '26.380'],
    [3.0, '49.757'],
    [5.0, '76.920'],
  ]
  for (const [mach, nuDeg] of table) {
    it(`gives ν(${mach}) = ${nuDeg}° for γ = 1.4 (NACA 1135, Table I)`, () => {
      expectPrinted(prandtlMeyer(mach, 1.4) / DEG, nuDeg, 'library')
      expectPrinted(refNu(mach, 1.4) / DEG, nuDeg, 'closed form')
    })
  }

  it('is zero at Mach 1 and rises towards νmax = 130.454° for γ = 1.4 (NACA 1135: (π/2)(√6 − 1))', () => {
    expect(prandtlMeyer(1, 1.4)).toBe(0)
    expectPrinted(maxPrandtlMeyer(1.4) / DEG, '130.454')
    expectClose(maxPrandtlMeyer(1.4), (Math.PI / 2) * (Math.sqrt(6) - 1), 1e-15)
    let previous = 0
    for (let m = 1.0001; m < 1e5; m *= 1.5) {
      const nu = prandtlMeyer(m, 1.4)
      expect(nu).toBeGreaterThan(previous)
      expect(nu).toBeLessThan(maxPrandtlMeyer(1.4))
      previous = nu
    }
  })

  it('keeps its relative precision near Mach 1, where ν ≈ (2/(3(γ+1)))·(M² − 1)^(3/2)', () => {
    for (const m of [1 + 1e-8, 1 + 1e-6, 1 + 1e-4]) {
      const b = Math.sqrt((m - 1) * (m + 1)) // not m² − 1, which would cancel
      // Three terms of the series of the two arctangents (a² = 6 for γ = 1.4); the next term is
      // smaller by β⁶ ≤ 8e-12 relative at these β.
      const series = (b ** 3 / 3) * (1 - 1 / 6) - (b ** 5 / 5) * (1 - 1 / 36) + (b ** 7 / 7) * (1 - 1 / 216)
      expectClose(prandtlMeyer(m, 1.4), series, 1e-9, `M=${m}`)
    }
  })

  it('agrees with the closed form for other gammas', () => {
    for (const g of [1.1, 1.3, 5 / 3])
      for (const m of [1.2, 2, 4, 10]) expectClose(prandtlMeyer(m, g), refNu(m, g), 1e-13)
  })

  it('rejects subsonic and non-finite Mach numbers and bad gamma', () => {
    expectRangeError(() => prandtlMeyer(0.99, 1.4), 'mach', 'at least 1')
    expectRangeError(() => prandtlMeyer(Number.NaN, 1.4), 'mach', 'NaN')
    expectRangeError(() => prandtlMeyer(Infinity, 1.4), 'mach', 'Infinity')
    expectRangeError(() => prandtlMeyer(2, 1), 'gamma', '(got 1)')
  })
})

describe('machFromPrandtlMeyer', () => {
  it('inverts the printed angles: ν = 26.380° → M ≈ 2.000, ν = 49.757° → M ≈ 3.000 (NACA 1135)', () => {
    // dν/dM is 23.6°/unit at M = 2 and 12.9°/unit at M = 3, so ±0.0005° is ±4e-5 in M at most.
    expect(Math.abs(machFromPrandtlMeyer(26.38 * DEG, 1.4) - 2)).toBeLessThan(4e-5)
    expect(Math.abs(machFromPrandtlMeyer(49.757 * DEG, 1.4) - 3)).toBeLessThan(4e-5)
  })

  it('round-trips Mach → ν → Mach to 1e-12 from just above Mach 1 to Mach 1000', () => {
    for (const g of [1.2, 1.4, 5 / 3]) {
      for (const m of [1 + 1e-9, 1 + 1e-6, 1.001, 1.1, 1.5, 2, 3, 5, 10, 50, 1000]) {
        expectClose(machFromPrandtlMeyer(prandtlMeyer(m, g), g), m, 1e-12, `M=${m} γ=${g}`)
      }
    }
  })

  it('gives Mach 1 for ν = 0', () => {
    expect(machFromPrandtlMeyer(0, 1.4)).toBe(1)
  })

  it('rejects negative angles, angles at or above νmax, and non-finite values', () => {
    expectRangeError(() => machFromPrandtlMeyer(-0.01, 1.4), 'nu', 'at least 0')
    expectRangeError(() => machFromPrandtlMeyer(maxPrandtlMeyer(1.4), 1.4), 'nu', 'maximum turning angle', '2.27685')
    expectRangeError(() => machFromPrandtlMeyer(3, 1.4), 'nu', 'less than')
    expectRangeError(() => machFromPrandtlMeyer(Number.NaN, 1.4), 'nu', 'NaN')
    expectRangeError(() => machFromPrandtlMeyer(0.5, 1), 'gamma', '(got 1)')
  })
})

import { describe, expect, it } from 'vitest'
import { maxDeflection, normalShock, obliqueShock } from '../../../shared/physics/index'
import type { ObliqueShockBranch } from '../../../shared/physics/index'
import { expectClose } from '../../helpers/expect-close'
import { expectPrinted } from '../../helpers/printed'
import { expectRangeError } from '../../helpers/expect-range-error'

const DEG = Math.PI / 180

// Independent closed forms for the normal shock, written from the textbook relations:
// M2² = (1 + (γ−1)/2·M²)/(γM² − (γ−1)/2), p2/p1 = 1 + 2γ(M² − 1)/(γ+1),
// ρ2/ρ1 = (γ+1)M²/((γ−1)M² + 2), and p02/p01 = (p2/p1)·(p/p0 at M1)/(p/p0 at M2) written through
// the isentropic ratios (a different route from the library's single formula).
function refNormalShock(m: number, g: number) {
  const m2 = Math.sqrt((1 + ((g - 1) / 2) * m * m) / (g * m * m - (g - 1) / 2))
  const p = 1 + ((2 * g) / (g + 1)) * (m * m - 1)
  const rho = ((g + 1) * m * m) / ((g - 1) * m * m + 2)
  const staticToStagnation = (mach: number) => Math.pow(1 + ((g - 1) / 2) * mach * mach, -g / (g - 1))
  const p0 = (p * staticToStagnation(m)) / staticToStagnation(m2)
  return { mach2: m2, p, rho, t: p / rho, p0 }
}

// θ–β–M relation in the tangent form of Anderson, Modern Compressible Flow, eq. 4.17 (from memory):
// tan θ = 2 cot β (M² sin²β − 1)/(M²(γ + cos 2β) + 2).
function refDeflection(m: number, beta: number, g: number): number {
  return Math.atan(((2 / Math.tan(beta)) * (m * m * Math.sin(beta) ** 2 - 1)) / (m * m * (g + Math.cos(2 * beta)) + 2))
}
/** Maximum of θ(β) by golden-section search: no closed form involved. */
function refMaxDeflection(m: number, g: number): { theta: number; beta: number } {
  let lo = Math.asin(1 / m)
  let hi = Math.PI / 2 - 1e-12
  const r = (Math.sqrt(5) - 1) / 2
  for (let i = 0; i < 200; i++) {
    const a = hi - r * (hi - lo)
    const b = lo + r * (hi - lo)
    if (refDeflection(m, a, g) < refDeflection(m, b, g)) lo = a
    else hi = b
  }
  const beta = 0.5 * (lo + hi)
  return { theta: refDeflection(m, beta, g), beta }
}
/** Wave angle by bisection on the θ–β–M relation, on the weak or strong side of the maximum. */
function refWaveAngle(m: number, theta: number, g: number, weak: boolean): number {
  const peak = refMaxDeflection(m, g).beta
  let lo = weak ? Math.asin(1 / m) : peak
  let hi = weak ? peak : Math.PI / 2 - 1e-15
  for (let i = 0; i < 200; i++) {
    const mid = 0.5 * (lo + hi)
    const tooMuch = refDeflection(m, mid, g) > theta
    if (tooMuch === weak) hi = mid
    else lo = mid
  }
  return 0.5 * (lo + hi)
}

// NACA Report 1135 (1953), Table II, "Parameters for shock flow", γ = 1.4: M2, p2/p1, ρ2/ρ1, T2/T1,
// pt2/pt1. Recalled from memory to four significant figures and cross-checked below against the
// closed forms. (At M1 = 2.0 and 2.5, T2/T1 is exactly 1.6875 and 2.1375, a rounding tie; either
// neighbouring printed digit is within half a unit.)
const NACA_1135_TABLE_II: ReadonlyArray<readonly [number, string, string, string, string, string]> = [
  [1.5, '0.7011', '2.458', '1.862', '1.320', '0.9298'],
  [2.0, '0.5774', '4.500', '2.667', '1.688', '0.7209'],
  [2.5, '0.5130', '7.125', '3.333', '2.138', '0.4990'],
  [3.0, '0.4752', '10.33', '3.857', '2.679', '0.3283'],
  [5.0, '0.4152', '29.00', '5.000', '5.800', '0.06172'],
]

describe('normalShock against NACA Report 1135, Table II (γ = 1.4)', () => {
  for (const [m1, m2, p, rho, t, p0] of NACA_1135_TABLE_II) {
    it(`matches the printed M2, p2/p1, ρ2/ρ1, T2/T1 and p02/p01 at M1 = ${m1}`, () => {
      const s = normalShock(m1, 1.4)
      expectPrinted(s.mach2, m2, 'M2')
      expectPrinted(s.pressureRatio, p, 'p2/p1')
      expectPrinted(s.densityRatio, rho, 'ρ2/ρ1')
      expectPrinted(s.temperatureRatio, t, 'T2/T1')
      expectPrinted(s.stagnationPressureRatio, p0, 'p02/p01')
    })
    it(`the recalled Table II entries at M1 = ${m1} agree with the closed forms`, () => {
      const r = refNormalShock(m1, 1.4)
      expectPrinted(r.mach2, m2, 'M2')
      expectPrinted(r.p, p, 'p2/p1')
      expectPrinted(r.rho, rho, 'ρ2/ρ1')
      expectPrinted(r.t, t, 'T2/T1')
      expectPrinted(r.p0, p0, 'p02/p01')
    })
  }

  it('agrees with the closed forms to 1e-12 over a sweep of Mach numbers and gammas', () => {
    for (const g of [1.1, 1.3, 1.4, 5 / 3]) {
      for (let m = 1.01; m < 20; m *= 1.07) {
        const s = normalShock(m, g)
        const r = refNormalShock(m, g)
        expectClose(s.mach2, r.mach2, 1e-12, `M2 M1=${m}`)
        expectClose(s.pressureRatio, r.p, 1e-12, `p2/p1 M1=${m}`)
        expectClose(s.densityRatio, r.rho, 1e-12, `ρ2/ρ1 M1=${m}`)
        expectClose(s.temperatureRatio, r.t, 1e-12, `T2/T1 M1=${m}`)
        expectClose(s.stagnationPressureRatio, r.p0, 1e-11, `p02/p01 M1=${m}`)
      }
    }
  })

  it('is the identity at Mach 1 (a Mach wave changes nothing)', () => {
    const s = normalShock(1, 1.4)
    for (const value of [s.mach2, s.pressureRatio, s.densityRatio, s.temperatureRatio, s.stagnationPressureRatio]) {
      expectClose(value, 1, 1e-15)
    }
  })

  it('makes the flow subsonic and loses stagnation pressure for every M1 > 1', () => {
    for (let m = 1.001; m < 50; m *= 1.3) {
      const s = normalShock(m, 1.4)
      expect(s.mach2).toBeLessThan(1)
      expect(s.stagnationPressureRatio).toBeLessThan(1)
      expect(s.densityRatio).toBeLessThan(6) // (γ+1)/(γ−1), the strong-shock limit
    }
  })

  it('rejects subsonic, non-finite and bad-gamma input with named RangeErrors', () => {
    expectRangeError(() => normalShock(0.9, 1.4), 'mach1', 'at least 1', '0.9')
    expectRangeError(() => normalShock(0, 1.4), 'mach1')
    expectRangeError(() => normalShock(Number.NaN, 1.4), 'mach1', 'NaN')
    expectRangeError(() => normalShock(Infinity, 1.4), 'mach1', 'Infinity')
    expectRangeError(() => normalShock(2, 1), 'gamma must be a finite number greater than 1 (got 1)')
  })
})

describe('obliqueShock', () => {
  // Anderson, Modern Compressible Flow (3rd ed.), the θ–β–M chart (Fig. 4.9 as recalled from memory)
  // and its worked examples: M1 = 2, θ = 10° gives a weak shock at β ≈ 39.3°; M1 = 3, θ = 20° gives
  // β ≈ 37.8°. Chart readings are good to about 0.1°; the values to 0.01° below (39.31°, 83.70°,
  // 37.76°) are from an independent bisection of the θ–β–M relation (refWaveAngle above), which
  // the test also re-runs.
  const cases: ReadonlyArray<readonly [number, number, ObliqueShockBranch, string]> = [
    [2, 10, 'weak', '39.31'],
    [2, 10, 'strong', '83.70'],
    [3, 20, 'weak', '37.76'],
  ]
  for (const [m1, thetaDeg, branch, betaDeg] of cases) {
    it(`gives the ${branch} wave angle β = ${betaDeg}° for M1 = ${m1}, θ = ${thetaDeg}°`, () => {
      const s = obliqueShock(m1, thetaDeg * DEG, 1.4, branch)
      expectPrinted(s.waveAngle / DEG, betaDeg, 'β in degrees')
      expectClose(s.waveAngle, refWaveAngle(m1, thetaDeg * DEG, 1.4, branch === 'weak'), 1e-10, 'β vs bisection')
    })
  }

  it('gives M2 ≈ 1.64 and p2/p1 ≈ 1.71 behind the weak shock at M1 = 2, θ = 10° (Anderson example, recalled from memory)', () => {
    const s = obliqueShock(2, 10 * DEG, 1.4, 'weak')
    // Independent: normal shock at Mn1 = M1 sin β, then M2 = Mn2/sin(β − θ).
    const beta = refWaveAngle(2, 10 * DEG, 1.4, true)
    const n = refNormalShock(2 * Math.sin(beta), 1.4)
    expectClose(s.mach2, n.mach2 / Math.sin(beta - 10 * DEG), 1e-9, 'M2')
    expectClose(s.pressureRatio, n.p, 1e-9, 'p2/p1')
    expectPrinted(s.mach2, '1.64', 'M2 to the example’s digits')
    expectPrinted(s.pressureRatio, '1.71', 'p2/p1 to the example’s digits')
  })

  it('satisfies the θ–β–M relation on both branches across a sweep', () => {
    for (const m1 of [1.2, 1.5, 2, 3, 5, 10]) {
      const thetaMax = refMaxDeflection(m1, 1.4).theta
      for (const fraction of [0.01, 0.2, 0.5, 0.9, 0.999]) {
        const theta = fraction * thetaMax
        const weak = obliqueShock(m1, theta, 1.4, 'weak')
        const strong = obliqueShock(m1, theta, 1.4, 'strong')
        expectClose(refDeflection(m1, weak.waveAngle, 1.4), theta, 1e-9, `weak M1=${m1} θ=${theta}`)
        expectClose(refDeflection(m1, strong.waveAngle, 1.4), theta, 1e-9, `strong M1=${m1} θ=${theta}`)
        expect(weak.waveAngle).toBeLessThan(strong.waveAngle)
        expect(strong.mach2).toBeLessThan(1)
        expect(weak.pressureRatio).toBeLessThan(strong.pressureRatio)
      }
    }
  })

  it('degenerates to a Mach wave (weak) and a normal shock (strong) at zero deflection', () => {
    const weak = obliqueShock(2, 0, 1.4, 'weak')
    expectClose(weak.waveAngle, Math.asin(0.5), 1e-15, 'Mach angle')
    expectClose(weak.mach2, 2, 1e-12, 'M2')
    expectClose(weak.pressureRatio, 1, 1e-12, 'p2/p1')
    const strong = obliqueShock(2, 0, 1.4, 'strong')
    expectClose(strong.waveAngle, Math.PI / 2, 1e-15, 'β')
    expectClose(strong.pressureRatio, 4.5, 1e-12, 'p2/p1 = normal shock at M = 2 (NACA 1135 Table II: 4.500)')
    expectClose(strong.mach2, refNormalShock(2, 1.4).mach2, 1e-12, 'M2')
  })

  it('has maximum deflections of 22.97° at M1 = 2 and 34.07° at M1 = 3 (NACA 1135 Chart 2 / Anderson Fig. 4.9, recalled from memory)', () => {
    const two = maxDeflection(2, 1.4)
    const three = maxDeflection(3, 1.4)
    expectPrinted(two.deflection / DEG, '22.97')
    expectPrinted(three.deflection / DEG, '34.07')
    // The closed form for β at θmax against a golden-section maximisation of θ(β).
    for (const m1 of [1.1, 1.5, 2, 3, 5, 20]) {
      const ref = refMaxDeflection(m1, 1.4)
      const max = maxDeflection(m1, 1.4)
      expectClose(max.deflection, ref.theta, 1e-12, `θmax M1=${m1}`)
      expectClose(max.waveAngle, ref.beta, 1e-6, `β at θmax M1=${m1}`) // a flat maximum locates β only to ~√ε
    }
  })

  it('throws a RangeError naming the maximum deflection in degrees and radians when the shock would detach', () => {
    expectRangeError(
      () => obliqueShock(2, 25 * DEG, 1.4, 'weak'),
      'deflection',
      'maximum deflection',
      '22.97',
      '0.4009',
      'rad',
      '°',
      'detach',
    )
    expectRangeError(() => obliqueShock(3, 35 * DEG, 1.4, 'strong'), 'deflection', '34.07', '0.59469')
  })

  it('accepts exactly the maximum deflection, where both branches meet', () => {
    const { deflection, waveAngle } = maxDeflection(2, 1.4)
    expectClose(obliqueShock(2, deflection, 1.4, 'weak').waveAngle, waveAngle, 1e-12)
    expectClose(obliqueShock(2, deflection, 1.4, 'strong').waveAngle, waveAngle, 1e-12)
  })

  it('rejects bad arguments with named RangeErrors', () => {
    expectRangeError(() => obliqueShock(0.8, 0.1, 1.4, 'weak'), 'mach1', 'at least 1')
    expectRangeError(() => obliqueShock(2, -0.1, 1.4, 'weak'), 'deflection', 'at least 0')
    expectRangeError(() => obliqueShock(2, Number.NaN, 1.4, 'weak'), 'deflection', 'NaN')
    expectRangeError(() => obliqueShock(2, 0.1, 1, 'weak'), 'gamma', '(got 1)')
    expectRangeError(() => obliqueShock(2, 0.1, 1.4, 'medium' as ObliqueShockBranch), 'branch', "'weak'", "'strong'")
    expectRangeError(() => maxDeflection(Infinity, 1.4), 'mach1', 'Infinity')
  })
})

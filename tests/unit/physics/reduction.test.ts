import { describe, expect, it } from 'vitest'
import {
  G0,
  areaFromDiameter,
  characteristicVelocity,
  diameterFromArea,
  meanValue,
  peakValue,
  specificImpulse,
  thrustCoefficient,
  totalImpulse,
} from '../../../shared/physics/index'
import { expectClose } from '../../helpers/expect-close'
import { expectRangeError } from '../../helpers/expect-range-error'

describe('totalImpulse', () => {
  it('integrates a trapezoidal thrust trace exactly (hand computation: 25 + 100 + 25 N·s)', () => {
    expect(totalImpulse([0, 0.5, 1.5, 2], [0, 100, 100, 0])).toBe(150)
  })

  it('is exact for a linear thrust over uneven samples (the trapezoid rule integrates lines exactly)', () => {
    const time = [0, 0.013, 0.05, 0.051, 0.4, 1.7, 1.75]
    const thrust = time.map((t) => 20 + 30 * t)
    expectClose(totalImpulse(time, thrust), 20 * 1.75 + 15 * 1.75 * 1.75, 1e-14)
  })

  it('converges to ∫ F dt for a smooth burn profile as sampling gets finer', () => {
    // F = 50 sin(πt/2) N over 2 s: ∫ = 200/π N·s.
    const samples = (n: number) => Array.from({ length: n + 1 }, (_, i) => (2 * i) / n)
    const coarse = samples(40)
    const fine = samples(4000)
    const f = (t: number) => 50 * Math.sin((Math.PI * t) / 2)
    const exact = 200 / Math.PI
    expectClose(totalImpulse(fine, fine.map(f)), exact, 1e-6)
    expect(Math.abs(totalImpulse(coarse, coarse.map(f)) - exact)).toBeGreaterThan(
      Math.abs(totalImpulse(fine, fine.map(f)) - exact),
    )
  })

  it('accepts repeated time stamps (zero-width intervals add nothing)', () => {
    expect(totalImpulse([0, 1, 1, 2], [10, 10, 10, 10])).toBe(20)
  })

  it('rejects arrays of unequal length, decreasing time, non-finite samples and too few samples', () => {
    expectRangeError(() => totalImpulse([0, 1, 2], [1, 2]), 'time and thrust must have the same length', '3 and 2')
    expectRangeError(() => totalImpulse([0, 2, 1], [1, 2, 3]), 'time must not decrease', 'time[2] = 1')
    expectRangeError(() => totalImpulse([0, 1, 2], [1, Number.NaN, 3]), 'thrust[1]', 'NaN')
    expectRangeError(() => totalImpulse([0, Infinity], [1, 2]), 'time[1]', 'Infinity')
    expectRangeError(() => totalImpulse([0], [1]), 'time', 'at least 2 samples')
    expectRangeError(() => totalImpulse([], []), 'time')
  })
})

describe('specificImpulse', () => {
  it('turns 110.9 N·s from 189 g of propellant into 59.8 s (common practice, no published source)', () => {
    expect(specificImpulse(110.9, 0.189).toFixed(1)).toBe('59.8')
    expectClose(specificImpulse(110.9, 0.189), 110.9 / (0.189 * 9.80665), 1e-15)
  })

  it('uses standard gravity g0 = 9.80665 m/s² exactly', () => {
    expect(G0).toBe(9.80665)
    expect(specificImpulse(9.80665, 1)).toBe(1)
  })

  it('rejects a negative or zero propellant mass and negative or non-finite impulse', () => {
    expectRangeError(() => specificImpulse(100, -0.1), 'propellantMass', 'greater than 0', '-0.1')
    expectRangeError(() => specificImpulse(100, 0), 'propellantMass')
    expectRangeError(() => specificImpulse(-1, 0.1), 'impulse', 'at least 0')
    expectRangeError(() => specificImpulse(Number.NaN, 0.1), 'impulse', 'NaN')
  })
})

describe('characteristicVelocity and thrustCoefficient', () => {
  it('are c* = p0·At/ṁ and CF = F/(p0·At) (Sutton & Biblarz eqs. 3-32 and 3-31)', () => {
    expectClose(characteristicVelocity(2e6, 2e-4, 0.25), 1600, 1e-15)
    expectClose(thrustCoefficient(600, 2e6, 2e-4), 1.5, 1e-15)
    // Their product with p0·At is consistent: F = CF·c*·ṁ.
    expectClose(thrustCoefficient(600, 2e6, 2e-4) * characteristicVelocity(2e6, 2e-4, 0.25) * 0.25, 600, 1e-15)
  })

  it('reject zero or negative pressures, areas and mass flows by name', () => {
    expectRangeError(() => characteristicVelocity(0, 1e-4, 0.1), 'chamberPressure')
    expectRangeError(() => characteristicVelocity(1e6, 1e-4, 0), 'massFlow', 'greater than 0')
    expectRangeError(() => characteristicVelocity(1e6, -1e-4, 0.1), 'throatArea')
    expectRangeError(() => thrustCoefficient(Number.NaN, 1e6, 1e-4), 'thrust', 'NaN')
    expectRangeError(() => thrustCoefficient(100, 1e6, 0), 'throatArea')
  })
})

describe('meanValue and peakValue', () => {
  it('give the arithmetic mean and the largest sample', () => {
    expect(meanValue([1, 2, 3, 6])).toBe(3)
    expect(peakValue([0, 12.5, 31.2, 30.9, 4])).toBe(31.2)
    expect(peakValue([-3, -1, -2])).toBe(-1)
  })

  it('give the time-weighted mean when times are supplied (impulse over burn time)', () => {
    expect(meanValue([0, 100, 100, 0], [0, 0.5, 1.5, 2])).toBe(75)
    // Uneven sampling must not bias the mean: four samples crowded into the first 0.03 s at zero
    // thrust, then a ramp to 100 N at 1 s. By hand: ∫ = 0.97 s × 50 N = 48.5 N·s over 1 s, whereas
    // the plain average of the samples would be 20 N.
    expectClose(meanValue([0, 0, 0, 0, 100], [0, 0.01, 0.02, 0.03, 1]), 48.5, 1e-15)
    expect(meanValue([0, 0, 0, 0, 100])).toBe(20)
  })

  it('reject empty or non-finite samples, unequal lengths and a zero time span', () => {
    expectRangeError(() => meanValue([]), 'values', 'at least 1')
    expectRangeError(() => peakValue([]), 'values')
    expectRangeError(() => peakValue([1, Number.NaN]), 'values[1]', 'NaN')
    expectRangeError(() => meanValue([1, 2], [0, 1, 2]), 'values and time must have the same length')
    expectRangeError(() => meanValue([1, 2], [1, 1]), 'time must span more than 0 s')
  })
})

describe('areaFromDiameter', () => {
  it('is π·d²/4 and inverts with diameterFromArea', () => {
    expectClose(areaFromDiameter(0.01), 7.853981633974483e-5, 1e-15) // π/4 × 1e-4 (π to 16 digits)
    expectClose(diameterFromArea(areaFromDiameter(0.0042)), 0.0042, 1e-15)
  })

  it('rejects zero, negative and non-finite diameters', () => {
    expectRangeError(() => areaFromDiameter(0), 'diameter', 'greater than 0')
    expectRangeError(() => areaFromDiameter(-1), 'diameter')
    expectRangeError(() => areaFromDiameter(Number.NaN), 'diameter', 'NaN')
    expectRangeError(() => diameterFromArea(Infinity), 'area', 'Infinity')
  })
})

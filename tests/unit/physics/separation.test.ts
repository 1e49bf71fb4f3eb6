import { describe, expect, it } from 'vitest'
import { SEPARATION_PRESSURE_RATIO, idealThrust, nozzleFlow, nozzlePressureRatios } from '../../../shared/physics/index'
import type { NozzleInput } from '../../../shared/physics/index'
import { expectClose } from '../../helpers/expect-close'
import { expectPrinted } from '../../helpers/printed'

// ---- Independent reference formulas, written here from the textbooks (not the library) ----
const pOverP0 = (m: number, g: number) => Math.pow(1 + ((g - 1) / 2) * m * m, -g / (g - 1))
/** NACA Report 1135, eq. 44 solved for M (from memory). */
const machOfPressureRatio = (p: number, g: number) => Math.sqrt((2 / (g - 1)) * (Math.pow(p, -(g - 1) / g) - 1))
/** NACA Report 1135, eq. 80 (from memory). */
const areaRatioOf = (m: number, g: number) =>
  Math.pow((2 / (g + 1)) * (1 + ((g - 1) / 2) * m * m), (g + 1) / (2 * (g - 1))) / m
function supersonicMachOfAreaRatio(x: number, g: number): number {
  let lo = 1
  let hi = 100
  for (let i = 0; i < 200; i++) {
    const mid = 0.5 * (lo + hi)
    if (areaRatioOf(mid, g) > x) hi = mid
    else lo = mid
  }
  return 0.5 * (lo + hi)
}
/**
 * Sutton & Biblarz, Rocket Propulsion Elements, eq. 3-30 (from memory): the thrust coefficient of
 * a nozzle of area ratio ε whose exit pressure is p2 = p2OverP1·p1, into ambient p3.
 */
function suttonThrustCoefficient(k: number, p2OverP1: number, p3OverP1: number, areaRatio: number): number {
  const momentum = Math.sqrt(
    ((2 * k * k) / (k - 1)) * Math.pow(2 / (k + 1), (k + 1) / (k - 1)) * (1 - Math.pow(p2OverP1, (k - 1) / k)),
  )
  return momentum + (p2OverP1 - p3OverP1) * areaRatio
}

const G = 1.4
const P0 = 1e6
const AT = 1e-4
const flowAt = (areaRatio: number, ambientFraction: number, extra: Partial<NozzleInput> = {}) =>
  nozzleFlow({
    chamberPressure: P0,
    chamberTemperature: 293,
    ambientPressure: ambientFraction * P0,
    throatArea: AT,
    exitArea: areaRatio * AT,
    gamma: G,
    gasConstant: 287.05,
    ...extra,
  })

describe('flow separation by the Summerfield criterion', () => {
  it('separates where the wall pressure falls to 0.4 of ambient (Summerfield, Foster & Swan 1954; the 0.4 is from memory)', () => {
    expect(SEPARATION_PRESSURE_RATIO).toBe(0.4)
  })

  it('for ε = 4 at pa/p0 = 0.2 separates at ps/p0 = 0.08, A/At = 2.19, with the thrust of the cut-off nozzle (eq. 3-30)', () => {
    const flow = flowAt(4, 0.2)
    expect(flow.regime).toBe('overexpanded')
    expect(flow.separated).toBe(true)
    // Independent: Ms from p/p0 = 0.4 × 0.2, then A/A* at Ms; the cut-off nozzle has ε = As/At,
    // exit pressure ps and ambient pa on the wall downstream, so CF follows from eq. 3-30.
    const ps = SEPARATION_PRESSURE_RATIO * 0.2
    const ms = machOfPressureRatio(ps, G)
    const as = areaRatioOf(ms, G)
    expectClose(flow.separationAreaRatio ?? Number.NaN, as, 1e-12, 'As/At')
    expectPrinted(flow.separationAreaRatio ?? Number.NaN, '2.19', 'As/At (hand computation)')
    const cfSeparated = suttonThrustCoefficient(G, ps, 0.2, as)
    expectClose((flow.separatedThrust ?? Number.NaN) / (P0 * AT), cfSeparated, 1e-10, 'CF separated')
    // The nozzle running full: eq. 3-30 at the design exit pressure of ε = 4.
    const pe = pOverP0(supersonicMachOfAreaRatio(4, G), G)
    const cfFull = suttonThrustCoefficient(G, pe, 0.2, 4)
    expectClose(flow.thrustCoefficient, cfFull, 1e-10, 'CF full-flowing (unchanged)')
    expectPrinted(cfFull, '0.761', 'CF full-flowing (hand computation)')
    expectPrinted(cfSeparated, '1.036', 'CF separated (hand computation)')
    // 36 % more thrust than the full-flowing ideal: the reason the thrust-above-ideal check must allow for it.
    expectPrinted((flow.separatedThrust ?? 0) / flow.thrust, '1.36')
  })

  it('puts the separation point at M = 2.30 where ps/p0 = 0.07997, A/A* = 2.193 (NACA Report 1135, Table I, as recalled; checked against eqs. 44 and 80)', () => {
    // Table I at M = 2.30 (from memory): p/p0 = 0.07997, A/A* = 2.193. The equations agree:
    expectPrinted(pOverP0(2.3, G), '0.07997')
    expectPrinted(areaRatioOf(2.3, G), '2.193')
    // Choose pa so that 0.4·pa equals the tabulated p/p0 at M = 2.30.
    const flow = flowAt(4, 0.07997 / SEPARATION_PRESSURE_RATIO)
    expectPrinted(flow.separationAreaRatio ?? Number.NaN, '2.193', 'As/At at M = 2.30')
  })

  it('agrees with the momentum balance on the wall: separated − full-flowing thrust = ∫ (pa − p) dA over the cut-off wall', () => {
    // An independent route to the same number: integrate the wall-pressure deficit of the full-flowing
    // nozzle from the separation area to the exit (Simpson's rule on A, p(A) from the area–Mach relation).
    for (const [areaRatio, ambient] of [
      [4, 0.2],
      [4, 0.12],
      [10, 0.1],
      [2.5, 0.3],
    ] as const) {
      const flow = flowAt(areaRatio, ambient)
      expect(flow.separated, `ε = ${areaRatio}, pa/p0 = ${ambient}`).toBe(true)
      const from = flow.separationAreaRatio ?? Number.NaN
      const n = 2000
      const h = (areaRatio - from) / n
      let integral = 0
      for (let i = 0; i <= n; i++) {
        const a = from + i * h
        const deficit = ambient - pOverP0(supersonicMachOfAreaRatio(a, G), G)
        integral += (i === 0 || i === n ? 1 : i % 2 === 1 ? 4 : 2) * deficit
      }
      integral *= (h / 3) * P0 * AT
      expectClose(
        (flow.separatedThrust ?? Number.NaN) - flow.thrust,
        integral,
        1e-7,
        `ε = ${areaRatio}, pa/p0 = ${ambient}`,
      )
    }
  })

  it('sets in exactly where the design exit pressure equals 0.4·pa, with the separated thrust then equal to the full-flowing thrust', () => {
    const design = nozzlePressureRatios(4, G).design
    const onset = design / SEPARATION_PRESSURE_RATIO
    const before = flowAt(4, onset * (1 - 1e-9))
    const after = flowAt(4, onset * (1 + 1e-9))
    expect(before.separated).toBe(false)
    expect(before.separationAreaRatio).toBeNull()
    expect(before.separatedThrust).toBeNull()
    expect(after.separated).toBe(true)
    expectClose(after.separationAreaRatio ?? Number.NaN, 4, 1e-6, 'separation at the exit')
    expectClose(after.separatedThrust ?? Number.NaN, after.thrust, 1e-6, 'thrust continuous at onset')
  })

  it('moves upstream, and gains more over the full-flowing thrust, as the ambient pressure rises', () => {
    let previousArea = Infinity
    let previousGain = 1
    for (const ambient of [0.1, 0.15, 0.2, 0.25, 0.29]) {
      const flow = flowAt(4, ambient)
      const area = flow.separationAreaRatio ?? Number.NaN
      const gain = (flow.separatedThrust ?? Number.NaN) / flow.thrust
      expect(area).toBeLessThan(previousArea)
      expect(area).toBeGreaterThan(1)
      expect(gain).toBeGreaterThan(previousGain)
      previousArea = area
      previousGain = gain
    }
  })

  it('does not separate an ideal, under-expanded or subsonic nozzle, nor into vacuum', () => {
    const design = nozzlePressureRatios(4, G).design
    for (const ambient of [design, design * 0.5, 0, 0.99]) {
      const flow = flowAt(4, ambient)
      expect(flow.separated, `pa/p0 = ${ambient} (${flow.regime})`).toBe(false)
      expect(flow.separatedThrust).toBeNull()
    }
  })

  it('with a shock in the nozzle, separates only when the wall pressure ahead of the shock is below 0.4·pa', () => {
    const bounds = nozzlePressureRatios(4, G)
    // Just below the choke limit the shock is weak and near the throat: p ahead of it ≈ p* ≫ 0.4·pa.
    const weak = flowAt(4, bounds.chokeLimit * 0.999)
    expect(weak.regime).toBe('shock-in-nozzle')
    expect(pOverP0(weak.shockMach ?? Number.NaN, G)).toBeGreaterThan(SEPARATION_PRESSURE_RATIO * bounds.chokeLimit)
    expect(weak.separated).toBe(false)
    // Just above the shock-at-exit ratio the shock at Me = 2.94 has p2/p1 ≈ 9.9 > 2.5, so the wall
    // pressure ahead of it (≈ pe) is below 0.4·pa: the flow separates upstream of where the shock would stand.
    const strong = flowAt(4, bounds.shockAtExit * 1.001)
    expect(strong.regime).toBe('shock-in-nozzle')
    expect(strong.separated).toBe(true)
    const ps = SEPARATION_PRESSURE_RATIO * bounds.shockAtExit * 1.001
    expectClose(strong.separationAreaRatio ?? Number.NaN, areaRatioOf(machOfPressureRatio(ps, G), G), 1e-12)
    expect(strong.separationAreaRatio ?? Infinity).toBeLessThan((strong.shockArea ?? 0) / AT)
  })

  it('gives a separated thrust that, like the ideal thrust, does not depend on T0 or R', () => {
    const reference = flowAt(4, 0.2).separatedThrust ?? Number.NaN
    for (const [t0, r] of [
      [3000, 400],
      [77, 297],
      [1, 1],
    ] as const) {
      expectClose(
        flowAt(4, 0.2, { chamberTemperature: t0, gasConstant: r }).separatedThrust ?? Number.NaN,
        reference,
        1e-12,
        `T0=${t0} R=${r}`,
      )
    }
    // And idealThrust, the full-flowing value, is unchanged by the new fields.
    expectClose(idealThrust(P0, 0.2 * P0, AT, 4 * AT, G), flowAt(4, 0.2).thrust, 1e-12)
  })
})

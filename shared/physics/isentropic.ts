/**
 * Isentropic flow of a calorically perfect gas: stagnation ratios, the area–Mach relation and its
 * inverse.
 *
 * Sources: NACA Report 1135, "Equations, Tables, and Charts for Compressible Flow" (Ames Research
 * Staff, 1953), eqs. 43–45 and 80; J. D. Anderson, "Modern Compressible Flow", 3rd ed., eqs. 3.28,
 * 3.30, 3.31 and 5.20. Equation numbers are cited from memory; the equations themselves are checked
 * in the tests against the printed tables.
 */
import { requireGamma, requireInterval, requireNonNegative, requireOneOf, requireAtLeast } from './validate'

/** Ratios of a static property to its stagnation value, and the area ratio A/A*. */
export interface IsentropicRatios {
  /** p/p0, dimensionless, in (0, 1]. */
  pressureRatio: number
  /** T/T0, dimensionless, in (0, 1]. */
  temperatureRatio: number
  /** ρ/ρ0, dimensionless, in (0, 1]. */
  densityRatio: number
  /** A/A*, dimensionless, ≥ 1 (Infinity at Mach 0). */
  areaRatio: number
}

/** Which of the two Mach numbers that share an area ratio is wanted. */
export type FlowBranch = 'subsonic' | 'supersonic'

/** The allowed values of {@link FlowBranch}, for checks and pickers. */
export const FLOW_BRANCHES: readonly FlowBranch[] = ['subsonic', 'supersonic']

/**
 * Isentropic stagnation ratios and area ratio at a Mach number.
 *
 * T0/T = 1 + (γ−1)/2·M², p/p0 = (T/T0)^(γ/(γ−1)), ρ/ρ0 = (T/T0)^(1/(γ−1)),
 * A/A* = (1/M)·[(2/(γ+1))·(1 + (γ−1)/2·M²)]^((γ+1)/(2(γ−1))).
 *
 * Source: NACA Report 1135 (1953), eqs. 43, 44, 45 (ratios) and 80 (area ratio); Anderson, Modern
 * Compressible Flow, 3rd ed., eqs. 3.28, 3.30, 3.31, 5.20 (equation numbers from memory).
 *
 * @param mach - Mach number, dimensionless, finite, ≥ 0 (at 0 the area ratio is Infinity)
 * @param gamma - ratio of specific heats cp/cv, dimensionless, finite, > 1 (air: 1.4)
 * @returns p/p0, T/T0, ρ/ρ0 and A/A*, all dimensionless
 * @throws RangeError when mach is negative or not finite, or gamma is not a finite number > 1
 * @example
 * isentropic(2, 1.4)
 * // → { pressureRatio: 0.12780…, temperatureRatio: 0.55556…, densityRatio: 0.23005…, areaRatio: 1.6875 }
 */
export function isentropic(mach: number, gamma: number): IsentropicRatios {
  requireNonNegative('mach', mach)
  requireGamma(gamma)
  return isentropicUnchecked(mach, gamma)
}

/**
 * {@link isentropic} without argument checks, for library code that has already checked them.
 * Same equations and source as {@link isentropic}.
 *
 * @param mach - Mach number, ≥ 0 (not checked)
 * @param gamma - ratio of specific heats, > 1 (not checked)
 * @returns p/p0, T/T0, ρ/ρ0 and A/A*, dimensionless
 * @example
 * isentropicUnchecked(1, 1.4).pressureRatio // ≈ 0.528282
 */
export function isentropicUnchecked(mach: number, gamma: number): IsentropicRatios {
  const stagnationToStatic = 1 + 0.5 * (gamma - 1) * mach * mach
  const temperatureRatio = 1 / stagnationToStatic
  const densityRatio = stagnationToStatic ** (-1 / (gamma - 1))
  // p/p0 = (ρ/ρ0)(T/T0) for a perfect gas: one power instead of two.
  const pressureRatio = densityRatio * temperatureRatio
  const areaRatio = areaRatioUnchecked(mach, gamma)
  return { pressureRatio, temperatureRatio, densityRatio, areaRatio }
}

/**
 * A/A* = (1/M)·[(2/(γ+1))·(1 + (γ−1)/2·M²)]^((γ+1)/(2(γ−1))) without argument checks
 * (NACA Report 1135, eq. 80, from memory).
 *
 * @param mach - Mach number, ≥ 0 (Infinity is returned at 0; not checked)
 * @param gamma - ratio of specific heats, > 1 (not checked)
 * @returns A/A*, dimensionless
 * @example
 * areaRatioUnchecked(3, 1.4) // ≈ 4.23457
 */
export function areaRatioUnchecked(mach: number, gamma: number): number {
  if (mach === 0) return Infinity
  const t = (2 / (gamma + 1)) * (1 + 0.5 * (gamma - 1) * mach * mach)
  return t ** ((gamma + 1) / (2 * (gamma - 1))) / mach
}

/**
 * p/p0 = (1 + (γ−1)/2·M²)^(−γ/(γ−1)) without argument checks (NACA Report 1135, eq. 44, from memory).
 *
 * @param mach - Mach number, ≥ 0 (not checked)
 * @param gamma - ratio of specific heats, > 1 (not checked)
 * @returns p/p0, dimensionless
 * @example
 * pressureRatioUnchecked(2, 1.4) // ≈ 0.127805
 */
export function pressureRatioUnchecked(mach: number, gamma: number): number {
  return (1 + 0.5 * (gamma - 1) * mach * mach) ** (-gamma / (gamma - 1))
}

/**
 * Critical pressure ratio p* / p0: the static-to-stagnation pressure ratio at Mach 1, i.e. the largest
 * back-to-chamber pressure ratio at which a converging nozzle is choked.
 *
 * p* / p0 = (2/(γ+1))^(γ/(γ−1)).
 *
 * Source: NACA Report 1135 (1953), eq. 44 with M = 1; Sutton & Biblarz, Rocket Propulsion Elements,
 * eq. 3-20 (equation numbers from memory).
 *
 * @param gamma - ratio of specific heats, dimensionless, finite, > 1
 * @returns p* / p0, dimensionless, in (0, 1)
 * @example
 * criticalPressureRatio(1.4) // ≈ 0.528282 (a converging nozzle on air chokes above p0/pa ≈ 1.893)
 */
export function criticalPressureRatio(gamma: number): number {
  requireGamma(gamma)
  return (2 / (gamma + 1)) ** (gamma / (gamma - 1))
}

/**
 * Mach number from the static-to-stagnation pressure ratio of an isentropic flow.
 *
 * M = √( (2/(γ−1))·((p/p0)^(−(γ−1)/γ) − 1) ), evaluated with expm1 so small Mach numbers keep
 * their precision.
 *
 * Source: NACA Report 1135 (1953), eq. 44 solved for M (equation number from memory).
 *
 * @param pressureRatio - p/p0, dimensionless, in (0, 1] (1 gives Mach 0)
 * @param gamma - ratio of specific heats, dimensionless, finite, > 1
 * @returns Mach number, dimensionless, ≥ 0
 * @example
 * machFromPressureRatio(0.12780452546295096, 1.4) // ≈ 2
 */
export function machFromPressureRatio(pressureRatio: number, gamma: number): number {
  requireInterval('pressureRatio', pressureRatio, { value: 0, open: true }, { value: 1, open: false })
  requireGamma(gamma)
  return machFromPressureRatioUnchecked(pressureRatio, gamma)
}

/**
 * {@link machFromPressureRatio} without argument checks; same equation and source.
 *
 * @param pressureRatio - p/p0 in (0, 1] (not checked)
 * @param gamma - ratio of specific heats, > 1 (not checked)
 * @returns Mach number, dimensionless
 * @example
 * machFromPressureRatioUnchecked(0.528282, 1.4) // ≈ 1.0000
 */
export function machFromPressureRatioUnchecked(pressureRatio: number, gamma: number): number {
  // max() also turns the −0 that expm1(−0) gives at p/p0 = 1 into +0.
  return Math.sqrt(Math.max(0, (2 / (gamma - 1)) * Math.expm1((-(gamma - 1) / gamma) * Math.log(pressureRatio))))
}

/**
 * Mach number from the area ratio A/A* on the chosen branch.
 *
 * Solves A/A* = (1/M)·[(2/(γ+1))·(1 + (γ−1)/2·M²)]^((γ+1)/(2(γ−1))) (NACA Report 1135, eq. 80;
 * Anderson, Modern Compressible Flow, eq. 5.20; numbers from memory) for M. The method is
 * described at {@link solveMachFromAreaRatio}: Halley steps on ln(A/A*) as a function of ln M from a
 * start that is exact near Mach 1 and far from it, kept inside a bracket, converging to about
 * 1e-15 relative in at most 4 steps for 1.01 ≤ γ ≤ 3 and area ratios up to 10⁴.
 *
 * @param areaRatio - A/A*, dimensionless, finite, ≥ 1 (1 gives Mach 1 on both branches)
 * @param gamma - ratio of specific heats, dimensionless, finite, > 1
 * @param branch - 'subsonic' (M ≤ 1, converging part) or 'supersonic' (M ≥ 1, diverging part)
 * @returns Mach number, dimensionless
 * @throws RangeError when areaRatio < 1 or not finite, gamma ≤ 1, or branch is not one of the two
 * @example
 * machFromAreaRatio(1.6875, 1.4, 'supersonic') // ≈ 2
 * machFromAreaRatio(1.6875, 1.4, 'subsonic')   // ≈ 0.37224
 */
export function machFromAreaRatio(areaRatio: number, gamma: number, branch: FlowBranch): number {
  requireAtLeast('areaRatio', areaRatio, 1)
  requireGamma(gamma)
  requireOneOf('branch', branch, FLOW_BRANCHES)
  return solveMachFromAreaRatio(areaRatio, gamma, branch === 'supersonic').mach
}

/** The solution of the area–Mach relation and the number of Halley steps it took. */
export interface AreaRatioSolution {
  mach: number
  iterations: number
}

const MAX_AREA_RATIO_ITERATIONS = 60

/**
 * The solver behind {@link machFromAreaRatio}, without argument checks, also reporting its
 * iteration count (used by the tests and the benchmark).
 *
 * Method. Let u = ln M and F(u) = ln(A/A*). With e = e^(2u) − 1,
 * F = −u + k·ln(1 + q·e), F′ = a·e/(1 + q·e), F″ = 2a·(1 + e)/(1 + q·e)²,
 * where q = (γ−1)/(γ+1), k = (γ+1)/(2(γ−1)), a = 2/(γ+1) (derived from the area–Mach relation;
 * for u > 0 the same quantities are written with e^(−2u) so nothing overflows). F is convex in u,
 * nearly linear far from Mach 1 and quadratic (F ≈ a·u²) near it, so the start is:
 * - near Mach 1, the series inverse u ≈ w − (c₁/2)w² + (5c₁²/8 − c₂/2)w³ with w = ±√(F/a),
 *   c₁ = (2 − 4q)/3, c₂ = 1/3 − 2q + 2q² (from the Taylor series of F about u = 0);
 * - far from Mach 1, the asymptote F ≈ (2/(γ−1))·u + k·ln q (supersonic) or F ≈ −u + k·ln(1 − q)
 *   (subsonic), which bounds the root from outside.
 * The better of the two (the one nearer the root given F's convexity) is refined by Halley steps;
 * a step that would leave the bracket [0, asymptote] is replaced by bisection. It stops after a
 * Halley step smaller than 1e-5·min(1, |u|), after which the error in u = ln M (the relative error
 * in M) is of order (1e-5)³·min(1, |u|).
 *
 * Source: the area–Mach relation of NACA Report 1135, eq. 80 (from memory); Halley's method, e.g.
 * Press et al., Numerical Recipes, 3rd ed., section 9.4 (from memory).
 *
 * @param areaRatio - A/A*, finite, ≥ 1 (not checked)
 * @param gamma - ratio of specific heats, > 1 (not checked)
 * @param supersonic - true for the supersonic branch, false for the subsonic one
 * @returns the Mach number and the number of Halley (or bisection) steps taken
 * @example
 * solveMachFromAreaRatio(4.2346, 1.4, true) // → { mach: ≈ 3.00001, iterations: 3 }
 */
export function solveMachFromAreaRatio(areaRatio: number, gamma: number, supersonic: boolean): AreaRatioSolution {
  if (areaRatio === 1) return { mach: 1, iterations: 0 }
  const q = (gamma - 1) / (gamma + 1)
  const k = (gamma + 1) / (2 * (gamma - 1))
  const a = 2 / (gamma + 1)
  const target = Math.log(areaRatio)

  const c1 = (2 - 4 * q) / 3
  const c2 = 1 / 3 - 2 * q + 2 * q * q
  const w = (supersonic ? 1 : -1) * Math.sqrt(target / a)
  const nearSonic = w - 0.5 * c1 * w * w + (0.625 * c1 * c1 - 0.5 * c2) * w * w * w
  const asymptote = supersonic ? 0.5 * (gamma - 1) * (target - k * Math.log(q)) : k * Math.log(1 - q) - target

  // The asymptote bounds the root from outside; widen it by a hair so rounding cannot put the root
  // beyond it and so a start on the asymptote itself lies strictly inside the bracket.
  const margin = 1e-9 * (1 + Math.abs(asymptote))
  let lo = supersonic ? 0 : asymptote - margin
  let hi = supersonic ? asymptote + margin : 0
  let u = supersonic ? Math.min(nearSonic, asymptote) : Math.max(nearSonic, asymptote)
  if (!(u > lo && u < hi)) u = 0.5 * (lo + hi)

  for (let iteration = 1; iteration <= MAX_AREA_RATIO_ITERATIONS; iteration++) {
    let f: number
    let d1: number
    let d2: number
    if (u > 0) {
      const m = Math.expm1(-2 * u) // e^(−2u) − 1, in (−1, 0)
      const s = 1 + (1 - q) * m
      f = (2 / (gamma - 1)) * u + k * Math.log1p((1 - q) * m) - target
      d1 = (a * -m) / s
      d2 = (2 * a * (1 + m)) / (s * s)
    } else {
      const e = Math.expm1(2 * u) // e^(2u) − 1, in (−1, 0]
      const s = 1 + q * e
      f = -u + k * Math.log1p(q * e) - target
      d1 = (a * e) / s
      d2 = (2 * a * (1 + e)) / (s * s)
    }
    if (f === 0) return { mach: Math.exp(u), iterations: iteration }
    // F increases with u on the supersonic branch and decreases on the subsonic one.
    if (f > 0 === supersonic) hi = u
    else lo = u
    const step = (-2 * f * d1) / (2 * d1 * d1 - f * d2)
    const next = u + step
    if (Math.abs(step) <= 1e-5 * Math.min(1, Math.abs(u))) {
      // Converged: the error left after this step is of order step³. At the last few units in the
      // last place the rounded residual may point just outside the bracket; then u itself is the root.
      return { mach: Math.exp(next > lo && next < hi ? next : u), iterations: iteration }
    }
    if (next > lo && next < hi) {
      u = next
    } else {
      u = 0.5 * (lo + hi)
      if (hi - lo <= 4 * Number.EPSILON * Math.abs(u)) return { mach: Math.exp(u), iterations: iteration }
    }
  }
  return { mach: Math.exp(u), iterations: MAX_AREA_RATIO_ITERATIONS }
}

/**
 * Normal and oblique shock waves in a calorically perfect gas.
 *
 * Sources: NACA Report 1135, "Equations, Tables, and Charts for Compressible Flow" (1953), eqs.
 * 93–99 (normal shock), 138 (θ–β–M) and 168 (maximum deflection); J. D. Anderson, "Modern
 * Compressible Flow", 3rd ed., eqs. 3.51, 3.53, 3.57, 3.59 and 4.17. Equation numbers are cited
 * from memory; the tests check the relations against printed tables and independent computations.
 */
import { findRoot } from './roots'
import { describeValue, requireAtLeast, requireGamma, requireNonNegative, requireOneOf } from './validate'

/** Flow across a normal shock: downstream Mach number and downstream-to-upstream ratios. */
export interface NormalShock {
  /** Downstream Mach number M2, dimensionless, in (√((γ−1)/(2γ)), 1]. */
  mach2: number
  /** Static pressure ratio p2/p1, dimensionless, ≥ 1. */
  pressureRatio: number
  /** Static temperature ratio T2/T1, dimensionless, ≥ 1. */
  temperatureRatio: number
  /** Density ratio ρ2/ρ1 (= u1/u2), dimensionless, in [1, (γ+1)/(γ−1)). */
  densityRatio: number
  /** Stagnation pressure ratio p02/p01, dimensionless, in (0, 1]. */
  stagnationPressureRatio: number
}

/**
 * Normal shock relations.
 *
 * M2² = (1 + (γ−1)/2·M1²)/(γ·M1² − (γ−1)/2); p2/p1 = 1 + 2γ/(γ+1)·(M1² − 1);
 * ρ2/ρ1 = (γ+1)·M1²/(2 + (γ−1)·M1²); T2/T1 = (p2/p1)/(ρ2/ρ1);
 * p02/p01 = [(γ+1)M1²/((γ−1)M1² + 2)]^(γ/(γ−1)) · [(γ+1)/(2γM1² − (γ−1))]^(1/(γ−1)).
 *
 * Source: NACA Report 1135 (1953), eqs. 93, 94, 95, 96 and 99; Anderson, Modern Compressible Flow,
 * eqs. 3.51, 3.53, 3.57, 3.59 (equation numbers from memory).
 *
 * @param mach1 - upstream Mach number, dimensionless, finite, ≥ 1 (Mach 1 gives the identity)
 * @param gamma - ratio of specific heats, dimensionless, finite, > 1
 * @returns M2 and the ratios p2/p1, T2/T1, ρ2/ρ1, p02/p01 (all dimensionless)
 * @throws RangeError when mach1 < 1 or not finite, or gamma is not a finite number > 1
 * @example
 * normalShock(2, 1.4)
 * // → { mach2: 0.57735…, pressureRatio: 4.5, temperatureRatio: 1.6875, densityRatio: 2.6667…,
 * //     stagnationPressureRatio: 0.72087… }
 */
export function normalShock(mach1: number, gamma: number): NormalShock {
  requireAtLeast('mach1', mach1, 1)
  requireGamma(gamma)
  return normalShockUnchecked(mach1, gamma)
}

/**
 * {@link normalShock} without argument checks; same equations and source. A Mach number a rounding
 * error below 1 is treated as 1.
 *
 * @param mach1 - upstream Mach number, ≥ 1 (not checked)
 * @param gamma - ratio of specific heats, > 1 (not checked)
 * @returns M2 and the ratios p2/p1, T2/T1, ρ2/ρ1, p02/p01
 * @example
 * normalShockUnchecked(3, 1.4).stagnationPressureRatio // ≈ 0.328344
 */
export function normalShockUnchecked(mach1: number, gamma: number): NormalShock {
  const m2 = Math.max(mach1 * mach1, 1)
  const mach2 = Math.sqrt((1 + 0.5 * (gamma - 1) * m2) / (gamma * m2 - 0.5 * (gamma - 1)))
  const pressureRatio = 1 + ((2 * gamma) / (gamma + 1)) * (m2 - 1)
  const densityRatio = ((gamma + 1) * m2) / (2 + (gamma - 1) * m2)
  const temperatureRatio = pressureRatio / densityRatio
  const stagnationPressureRatio = stagnationPressureRatioUnchecked(mach1, gamma)
  return { mach2, pressureRatio, temperatureRatio, densityRatio, stagnationPressureRatio }
}

/**
 * Stagnation pressure ratio across a normal shock, without argument checks:
 * p02/p01 = [(γ+1)M1²/((γ−1)M1² + 2)]^(γ/(γ−1)) · [(γ+1)/(2γM1² − (γ−1))]^(1/(γ−1)).
 * Source: NACA Report 1135, eq. 99 (from memory).
 *
 * @param mach1 - upstream Mach number, ≥ 1 (not checked)
 * @param gamma - ratio of specific heats, > 1 (not checked)
 * @returns p02/p01, dimensionless, in (0, 1]
 * @example
 * stagnationPressureRatioUnchecked(2, 1.4) // ≈ 0.720874
 */
export function stagnationPressureRatioUnchecked(mach1: number, gamma: number): number {
  const m2 = Math.max(mach1 * mach1, 1)
  const densityRatio = ((gamma + 1) * m2) / (2 + (gamma - 1) * m2)
  return densityRatio ** (gamma / (gamma - 1)) * ((gamma + 1) / (2 * gamma * m2 - (gamma - 1))) ** (1 / (gamma - 1))
}

/**
 * Upstream Mach number of the normal shock with the given stagnation pressure ratio p02/p01
 * (inverse of NACA Report 1135 eq. 99, from memory), searched in [1, maxMach] by Brent's method;
 * without argument checks. The ratio falls monotonically from 1 at Mach 1, so the bracket is safe.
 *
 * @param ratio - p02/p01, dimensionless, in (0, 1]; values outside [p02/p01(maxMach), 1] are clamped
 * @param gamma - ratio of specific heats, > 1 (not checked)
 * @param maxMach - upper end of the search, ≥ 1
 * @returns upstream Mach number, in [1, maxMach]
 * @example
 * machFromStagnationPressureRatioUnchecked(0.720874, 1.4, 10) // ≈ 2.0000
 */
export function machFromStagnationPressureRatioUnchecked(ratio: number, gamma: number, maxMach: number): number {
  if (ratio >= 1) return 1
  if (ratio <= stagnationPressureRatioUnchecked(maxMach, gamma)) return maxMach
  return findRoot((m) => stagnationPressureRatioUnchecked(m, gamma) - ratio, 1, maxMach)
}

/** Which of the two attached oblique shocks for a given deflection is wanted. */
export type ObliqueShockBranch = 'weak' | 'strong'

/** The allowed values of {@link ObliqueShockBranch}. */
export const OBLIQUE_SHOCK_BRANCHES: readonly ObliqueShockBranch[] = ['weak', 'strong']

/** An attached oblique shock: wave angle and downstream state. */
export interface ObliqueShock {
  /** Wave (shock) angle β measured from the upstream flow direction, rad, in [asin(1/M1), π/2]. */
  waveAngle: number
  /** Downstream Mach number, dimensionless. */
  mach2: number
  /** Static pressure ratio p2/p1, dimensionless. */
  pressureRatio: number
  /** Static temperature ratio T2/T1, dimensionless. */
  temperatureRatio: number
  /** Density ratio ρ2/ρ1, dimensionless. */
  densityRatio: number
  /** Stagnation pressure ratio p02/p01, dimensionless. */
  stagnationPressureRatio: number
  /** Upstream Mach number normal to the wave, M1·sin β, dimensionless. */
  normalMach1: number
}

/** The largest deflection an attached oblique shock can turn a flow through, and its wave angle. */
export interface MaxDeflection {
  /** Maximum flow deflection θmax, rad. */
  deflection: number
  /** Wave angle at θmax, rad. */
  waveAngle: number
}

/**
 * Flow deflection θ produced by an oblique shock of wave angle β (the θ–β–M relation), without
 * argument checks: tan θ = 2 cot β·(M1² sin²β − 1)/(M1²(γ + cos 2β) + 2), written with atan2 so
 * β = π/2 needs no cotangent. Source: NACA Report 1135, eq. 138; Anderson, eq. 4.17 (from memory).
 *
 * @param mach1 - upstream Mach number, ≥ 1 (not checked)
 * @param waveAngle - wave angle β, rad, in [asin(1/M1), π/2] (not checked)
 * @param gamma - ratio of specific heats, > 1 (not checked)
 * @returns deflection θ, rad
 * @example
 * deflectionFromWaveAngleUnchecked(2, (39.3139 * Math.PI) / 180, 1.4) // ≈ 0.174533 rad (10°)
 */
export function deflectionFromWaveAngleUnchecked(mach1: number, waveAngle: number, gamma: number): number {
  const m2 = mach1 * mach1
  const sinB = Math.sin(waveAngle)
  const numerator = 2 * Math.cos(waveAngle) * (m2 * sinB * sinB - 1)
  const denominator = sinB * (m2 * (gamma + Math.cos(2 * waveAngle)) + 2)
  return Math.atan2(numerator, denominator)
}

/**
 * Maximum deflection of an attached oblique shock and the wave angle at which it occurs.
 *
 * sin²β_max = [ (γ+1)M²/4 − 1 + √( (γ+1)·((γ+1)M⁴/16 + (γ−1)M²/2 + 1) ) ] / (γM²),
 * θmax = θ(β_max) from the θ–β–M relation.
 *
 * Source: NACA Report 1135 (1953), eq. 168 (equation number from memory); checked in the tests by a
 * numerical maximisation of the θ–β–M relation.
 *
 * @param mach1 - upstream Mach number, dimensionless, finite, ≥ 1
 * @param gamma - ratio of specific heats, dimensionless, finite, > 1
 * @returns θmax and β at θmax, both in rad
 * @example
 * maxDeflection(2, 1.4) // → { deflection: 0.40097… (22.974°), waveAngle: 1.12869… (64.669°) }
 */
export function maxDeflection(mach1: number, gamma: number): MaxDeflection {
  requireAtLeast('mach1', mach1, 1)
  requireGamma(gamma)
  return maxDeflectionUnchecked(mach1, gamma)
}

function maxDeflectionUnchecked(mach1: number, gamma: number): MaxDeflection {
  const m2 = mach1 * mach1
  const root = Math.sqrt((gamma + 1) * (((gamma + 1) * m2 * m2) / 16 + ((gamma - 1) * m2) / 2 + 1))
  const sin2 = Math.min(1, (((gamma + 1) * m2) / 4 - 1 + root) / (gamma * m2))
  const waveAngle = Math.asin(Math.sqrt(sin2))
  return { deflection: Math.max(0, deflectionFromWaveAngleUnchecked(mach1, waveAngle, gamma)), waveAngle }
}

const DEGREES_PER_RADIAN = 180 / Math.PI

/**
 * Attached oblique shock for a given flow deflection (wedge or ramp half-angle).
 *
 * Solves the θ–β–M relation tan θ = 2 cot β·(M1² sin²β − 1)/(M1²(γ + cos 2β) + 2) for β on the
 * chosen branch (weak: β between the Mach angle asin(1/M1) and β at θmax; strong: between β at θmax
 * and π/2), by Brent's bracketed method. The downstream state follows from the normal-shock
 * relations at Mn1 = M1·sin β, and M2 = Mn2/sin(β − θ).
 *
 * Source: NACA Report 1135 (1953), eqs. 138 and 168; Anderson, Modern Compressible Flow, eq. 4.17
 * and the relations of section 4.3 (equation numbers from memory).
 *
 * @param mach1 - upstream Mach number, dimensionless, finite, ≥ 1
 * @param deflection - flow deflection θ, rad, from 0 to θmax(M1, γ) (see {@link maxDeflection});
 *   0 gives a Mach wave (weak) or a normal shock (strong)
 * @param gamma - ratio of specific heats, dimensionless, finite, > 1
 * @param branch - 'weak' (the one usually seen on wedges and ramps) or 'strong'
 * @returns wave angle β (rad), M2 and p2/p1, with T2/T1, ρ2/ρ1, p02/p01 and M1·sin β as extras
 * @throws RangeError naming the maximum deflection (degrees and radians) when θ > θmax, i.e. when
 *   the shock detaches; also for out-of-range mach1, gamma, deflection or branch
 * @example
 * obliqueShock(2, (10 * Math.PI) / 180, 1.4, 'weak')
 * // → waveAngle ≈ 0.68615 rad (39.314°), mach2 ≈ 1.6405, pressureRatio ≈ 1.7066
 */
export function obliqueShock(
  mach1: number,
  deflection: number,
  gamma: number,
  branch: ObliqueShockBranch,
): ObliqueShock {
  requireAtLeast('mach1', mach1, 1)
  requireGamma(gamma)
  requireOneOf('branch', branch, OBLIQUE_SHOCK_BRANCHES)
  requireNonNegative('deflection', deflection)
  const max = maxDeflectionUnchecked(mach1, gamma)
  if (deflection > max.deflection) {
    throw new RangeError(
      `deflection must be at most the maximum deflection ${(max.deflection * DEGREES_PER_RADIAN).toPrecision(6)}° ` +
        `(${max.deflection.toPrecision(6)} rad) for mach1 = ${mach1} and gamma = ${gamma}; a larger deflection ` +
        `detaches the shock (got ${describeValue(deflection)} rad = ${(deflection * DEGREES_PER_RADIAN).toPrecision(6)}°)`,
    )
  }
  const machAngle = Math.asin(1 / mach1)
  let waveAngle: number
  if (deflection === max.deflection) {
    waveAngle = max.waveAngle
  } else if (deflection === 0) {
    waveAngle = branch === 'weak' ? machAngle : Math.PI / 2
  } else {
    const residual = (beta: number): number => deflectionFromWaveAngleUnchecked(mach1, beta, gamma) - deflection
    waveAngle =
      branch === 'weak' ? findRoot(residual, machAngle, max.waveAngle) : findRoot(residual, max.waveAngle, Math.PI / 2)
  }
  const normalMach1 = Math.max(1, mach1 * Math.sin(waveAngle))
  const shock = normalShockUnchecked(normalMach1, gamma)
  const mach2 = shock.mach2 / Math.sin(waveAngle - deflection)
  return {
    waveAngle,
    mach2,
    pressureRatio: shock.pressureRatio,
    temperatureRatio: shock.temperatureRatio,
    densityRatio: shock.densityRatio,
    stagnationPressureRatio: shock.stagnationPressureRatio,
    normalMach1,
  }
}

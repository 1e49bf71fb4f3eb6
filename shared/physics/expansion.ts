/**
 * Prandtl–Meyer expansion: the turning angle of an isentropic supersonic expansion and its inverse.
 *
 * Source: NACA Report 1135, "Equations, Tables, and Charts for Compressible Flow" (1953), eq. 171;
 * J. D. Anderson, "Modern Compressible Flow", 3rd ed., eq. 4.44 (equation numbers from memory).
 */
import { findRoot } from './roots'
import { requireAtLeast, requireGamma, requireInterval } from './validate'

/**
 * Prandtl–Meyer function ν(M): the angle through which a sonic flow must turn, expanding
 * isentropically, to reach Mach M.
 *
 * ν = √((γ+1)/(γ−1))·atan(√((γ−1)/(γ+1)·(M² − 1))) − atan(√(M² − 1)).
 *
 * Source: NACA Report 1135 (1953), eq. 171; Anderson, Modern Compressible Flow, eq. 4.44 (equation
 * numbers from memory).
 *
 * @param mach - Mach number, dimensionless, finite, ≥ 1
 * @param gamma - ratio of specific heats, dimensionless, finite, > 1
 * @returns ν, rad, in [0, νmax) with νmax = (π/2)(√((γ+1)/(γ−1)) − 1)
 * @example
 * prandtlMeyer(2, 1.4) // ≈ 0.460413 rad = 26.380°
 */
export function prandtlMeyer(mach: number, gamma: number): number {
  requireAtLeast('mach', mach, 1)
  requireGamma(gamma)
  return prandtlMeyerOfBeta(Math.sqrt((mach - 1) * (mach + 1)), gamma)
}

/**
 * ν as a function of β = √(M² − 1), the variable the inverse is solved in.
 *
 * Near Mach 1 the two arctangents are both ≈ β and their difference ≈ β³, so the direct form would
 * lose digits; there the series of the two arctangents is used instead:
 * ν = Σ_{n≥1} (−1)^(n+1)·(1 − a^(−2n))·β^(2n+1)/(2n+1), a² = (γ+1)/(γ−1).
 */
function prandtlMeyerOfBeta(beta: number, gamma: number): number {
  const aSquared = (gamma + 1) / (gamma - 1)
  if (beta < 0.1) {
    // Terms fall by β² ≤ 0.01 each, so 9 terms reach the last digit of a double.
    const b2 = beta * beta
    let sum = 0
    let power = beta
    let inverseA = 1
    for (let n = 1; n <= 9; n++) {
      power *= b2
      inverseA /= aSquared
      const term = ((1 - inverseA) * power) / (2 * n + 1)
      sum += n % 2 === 1 ? term : -term
    }
    return sum
  }
  const a = Math.sqrt(aSquared)
  return a * Math.atan(beta / a) - Math.atan(beta)
}

/**
 * The largest Prandtl–Meyer angle (expansion to Mach → ∞), νmax = (π/2)(√((γ+1)/(γ−1)) − 1).
 *
 * Source: the limit M → ∞ of NACA Report 1135 eq. 171 (from memory).
 *
 * @param gamma - ratio of specific heats, dimensionless, finite, > 1
 * @returns νmax, rad
 * @example
 * maxPrandtlMeyer(1.4) // ≈ 2.27685 rad = 130.454°
 */
export function maxPrandtlMeyer(gamma: number): number {
  requireGamma(gamma)
  return (Math.PI / 2) * (Math.sqrt((gamma + 1) / (gamma - 1)) - 1)
}

/**
 * Mach number whose Prandtl–Meyer angle is ν (inverse of {@link prandtlMeyer}).
 *
 * Solved in β = √(M² − 1) by Brent's bracketed method between two bounds derived from the
 * function itself: ν ≤ 2β³/(3(γ+1)) (the cubic that matches ν near Mach 1 and grows faster), and
 * ν > νmax − (a² − 1)/β with a² = (γ+1)/(γ−1) (its large-β asymptote, approached from above).
 *
 * @param nu - Prandtl–Meyer angle ν, rad, from 0 up to but not including νmax(γ)
 * @param gamma - ratio of specific heats, dimensionless, finite, > 1
 * @returns Mach number, dimensionless, ≥ 1
 * @throws RangeError when nu is negative, not finite or ≥ νmax, or gamma is not a finite number > 1
 * @example
 * machFromPrandtlMeyer((26.379761 * Math.PI) / 180, 1.4) // ≈ 2.0000
 */
export function machFromPrandtlMeyer(nu: number, gamma: number): number {
  requireGamma(gamma)
  const numax = (Math.PI / 2) * (Math.sqrt((gamma + 1) / (gamma - 1)) - 1)
  requireInterval(
    'nu',
    nu,
    { value: 0, open: false },
    { value: numax, open: true, text: `the maximum turning angle ${numax.toPrecision(6)} rad for gamma = ${gamma}` },
  )
  if (nu === 0) return 1
  const aSquared = (gamma + 1) / (gamma - 1)
  const lower = Math.cbrt(1.5 * (gamma + 1) * nu)
  const upper = (aSquared - 1) / (numax - nu)
  const beta = findRoot((b) => prandtlMeyerOfBeta(b, gamma) - nu, lower, upper)
  return Math.sqrt(1 + beta * beta)
}

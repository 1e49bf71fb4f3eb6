/**
 * The free jet outside a nozzle: the fully expanded jet, the spacing of its shock cells, and where
 * the Mach disk of an under-expanded jet stands.
 *
 * Sources: H. Ashkenas & F. S. Sherman (1966); C. H. Lewis Jr. & D. J. Carlson (1964); both
 * empirical fits, cited below (coefficients and ranges from memory). D. C. Pack (1950) for the
 * shock-cell spacing.
 */
import { areaRatioUnchecked, criticalPressureRatio, machFromPressureRatioUnchecked } from './isentropic'
import { IDEAL_EXPANSION_BAND } from './nozzle'
import { requireAtLeast, requireGamma, requireGreaterThan, requireInterval, requirePositive } from './validate'

/**
 * First zero of the Bessel function J0 (Abramowitz & Stegun, Handbook of Mathematical Functions,
 * Table 9.5: 2.4048255577). Prandtl's and Pack's shock-cell wavelength is π·Dj·√(Mj²−1)/j0,1.
 */
export const BESSEL_J0_FIRST_ZERO = 2.404825557695773

/** Coefficient of the shock-cell spacing L = k·Dj·√(Mj² − 1): k = π / j0,1 ≈ 1.306 (usually quoted as 1.31). */
export const SHOCK_CELL_COEFFICIENT = Math.PI / BESSEL_J0_FIRST_ZERO

/** The jet as if it had expanded isentropically to the ambient pressure. */
export interface FullyExpandedJet {
  /** Fully expanded jet Mach number Mj, dimensionless, ≥ 1. */
  mach: number
  /** Fully expanded jet diameter Dj, m: the area that carries the nozzle's choked mass flow at Mj and pa. */
  diameter: number
}

/**
 * The fully expanded jet of a choked nozzle: the Mach number and diameter the jet would have if it
 * expanded isentropically to the ambient pressure. Shock-cell models scale with these, not with the
 * nozzle's exit, so an under- or over-expanded jet from any nozzle is described alike.
 *
 * Mj = √( 2/(γ−1)·((p0/pa)^((γ−1)/γ) − 1) ) (isentropic relation, NACA Report 1135 eq. 44 solved for M);
 * Dj = Dt·√(A/A*(Mj)), from mass conservation: the throat passes the choked mass flow, and the
 * fully expanded stream carries the same flow at Mj and pa (NACA Report 1135 eq. 80 for A/A*,
 * equation numbers from memory). For an ideally expanded nozzle Dj equals the exit diameter.
 *
 * @param throatDiameter - nozzle throat diameter Dt, m, finite, > 0
 * @param chamberPressure - stagnation pressure p0, Pa absolute, finite, at least pa divided by the critical ratio
 *   p* over p0, so the jet is sonic or supersonic (p0/pa ≥ 1.893 for γ = 1.4)
 * @param ambientPressure - ambient pressure pa, Pa absolute, finite, > 0
 * @param gamma - ratio of specific heats of the jet, dimensionless, finite, > 1
 * @returns the fully expanded jet's Mach number and diameter (m)
 * @throws RangeError naming the argument; `chamberPressure` when the jet would be subsonic
 * @example
 * fullyExpandedJet(0.005, 1e5 / 0.12780452546295096, 1e5, 1.4) // { mach: ≈ 2, diameter: ≈ 0.005·√1.6875 }
 */
export function fullyExpandedJet(
  throatDiameter: number,
  chamberPressure: number,
  ambientPressure: number,
  gamma: number,
): FullyExpandedJet {
  requirePositive('throatDiameter', throatDiameter)
  requirePositive('ambientPressure', ambientPressure)
  requireGamma(gamma)
  const sonic = ambientPressure / criticalPressureRatio(gamma)
  // A relative 1e-9 of slack, so the sonic limit computed another way (1e5 / 0.528282…) is accepted.
  requireAtLeast(
    'chamberPressure',
    chamberPressure,
    sonic * (1 - 1e-9),
    `ambientPressure / (p*/p0) (${Number(sonic.toPrecision(6))}), so that the jet is sonic or supersonic: a subsonic jet has no shock cells`,
  )
  // At the sonic limit rounding can put the ratio a hair above p*/p0; Mj is 1 there.
  const mach = Math.max(1, machFromPressureRatioUnchecked(ambientPressure / chamberPressure, gamma))
  return { mach, diameter: throatDiameter * Math.sqrt(areaRatioUnchecked(mach, gamma)) }
}

/**
 * Spacing of the shock cells of a supersonic jet, by Prandtl's wavelength as corrected by Pack.
 *
 * L = (π / j0,1)·Dj·√(Mj² − 1) ≈ 1.31·Dj·√(Mj² − 1), with j0,1 the first zero of the Bessel function J0.
 *
 * Source: D. C. Pack, "A note on Prandtl's formula for the wave-length of a supersonic gas jet",
 * Quarterly Journal of Mechanics and Applied Mathematics 3 (1950) 173–181 (citation from memory). It is
 * the linear, vortex-sheet model of a slightly imperfectly expanded jet; real cells shorten downstream
 * and for strongly under-expanded jets the first cell is longer. Measured spacings within 10–20 % are
 * usual for moderately under-expanded jets (from memory).
 *
 * @param jetDiameter - fully expanded jet diameter Dj, m, finite, > 0 (see {@link fullyExpandedJet})
 * @param jetMach - fully expanded jet Mach number Mj, dimensionless, finite, > 1
 * @returns shock-cell spacing, m
 * @throws RangeError naming the argument
 * @example
 * shockCellSpacing(0.01, 2) // ≈ 0.022621 m (1.3063 · 0.01 · √3)
 */
export function shockCellSpacing(jetDiameter: number, jetMach: number): number {
  requirePositive('jetDiameter', jetDiameter)
  requireGreaterThan('jetMach', jetMach, 1, '1 (a supersonic jet; a sonic or subsonic one has no shock cells)')
  return SHOCK_CELL_COEFFICIENT * jetDiameter * Math.sqrt(jetMach * jetMach - 1)
}

/** Coefficient of the Mach-disk fit of Ashkenas and Sherman (1966): x/D = 0.67·√(p0/pa). */
export const MACH_DISK_COEFFICIENT = 0.67

/** Coefficient of the Mach-disk correlation of Lewis and Carlson (1964): x/De = 0.69·Me·√(γ·pe/pa). */
export const LEWIS_CARLSON_COEFFICIENT = 0.69

/**
 * Refuses an exit pressure that does not make the jet under-expanded: the Mach-disk fits were made
 * for jets that leave above ambient pressure. "Under-expanded" is meant as in {@link nozzleFlow}:
 * more than {@link IDEAL_EXPANSION_BAND} of pe above pa, i.e. pe > pa/(1 − band).
 */
function requireUnderexpanded(exitPressure: number, ambientPressure: number): void {
  const bound = ambientPressure / (1 - IDEAL_EXPANSION_BAND)
  requireGreaterThan(
    'exitPressure',
    exitPressure,
    bound,
    `ambientPressure / ${1 - IDEAL_EXPANSION_BAND} (${Number(bound.toPrecision(6))}), an under-expanded jet: the Mach-disk fits do not hold for an over-expanded or ideally expanded one`,
  )
}

/**
 * Distance from the nozzle exit to the Mach disk of an under-expanded free jet, by the fit of
 * Ashkenas and Sherman.
 *
 * x = 0.67·D·√(p0/pa).
 *
 * Source: H. Ashkenas and F. S. Sherman, "The structure and utilization of supersonic free jets in
 * low density wind tunnels", Rarefied Gas Dynamics, 4th Symposium, vol. 2 (1966). The fit was made
 * for sonic orifices and strongly under-expanded jets (p0/pa of roughly 15 up to about 17 000, from
 * memory); with the exit diameter of a converging–diverging nozzle it is a rough estimate. For a
 * supersonic exit, {@link machDiskDistanceLewisCarlson} is the correlation made for it.
 *
 * Without `exitPressure` the call assumes what the fit assumes (an under-expanded sonic orifice)
 * and checks only p0 > pa, as before. With it, the call refuses a jet that is not under-expanded:
 * an over-expanded jet (pe < pa) has a different shock pattern (oblique shocks from the lip, and a
 * Mach reflection the fit does not describe), and an ideally expanded one has no Mach disk.
 *
 * @param exitDiameter - nozzle exit (or orifice) diameter D, m, finite, > 0
 * @param chamberPressure - stagnation pressure p0, Pa absolute, finite, > ambientPressure
 * @param ambientPressure - ambient pressure pa, Pa absolute, finite, > 0
 * @param exitPressure - optional exit-plane static pressure pe, Pa absolute; when given it must
 *   exceed pa/(1 − IDEAL_EXPANSION_BAND) (an under-expanded jet)
 * @returns distance from the exit plane to the Mach disk, m
 * @throws RangeError naming the argument; `exitPressure` when the jet is over-expanded or ideally expanded
 * @example
 * machDiskDistance(0.01, 2e6, 1e5) // ≈ 0.02996 m (0.67 · 0.01 · √20)
 * machDiskDistance(0.01, 2e6, 1e5, 2e6 * 0.528) // the same, for a sonic exit at p* = 0.528·p0
 * machDiskDistance(0.01, 7.88e5, 98.6e3, 2.35e4) // throws: exitPressure must be … (over-expanded)
 */
export function machDiskDistance(
  exitDiameter: number,
  chamberPressure: number,
  ambientPressure: number,
  exitPressure?: number,
): number {
  requirePositive('exitDiameter', exitDiameter)
  requirePositive('ambientPressure', ambientPressure)
  requireGreaterThan('chamberPressure', chamberPressure, ambientPressure, `ambientPressure (${ambientPressure})`)
  if (exitPressure !== undefined) {
    requireUnderexpanded(exitPressure, ambientPressure)
    requireInterval(
      'exitPressure',
      exitPressure,
      { value: 0, open: true },
      { value: chamberPressure, open: false, text: `chamberPressure (${chamberPressure})` },
    )
  }
  return MACH_DISK_COEFFICIENT * exitDiameter * Math.sqrt(chamberPressure / ambientPressure)
}

/**
 * Distance from the nozzle exit to the Mach disk of an under-expanded jet from a sonic or
 * supersonic exit, by the correlation of Lewis and Carlson.
 *
 * x = 0.69·De·Me·√(γ·pe/pa).
 *
 * Source: C. H. Lewis Jr. and D. J. Carlson, "Normal shock location in underexpanded gas and
 * gas-particle jets", AIAA Journal 2 (1964) 776–777 (coefficient and form from memory). It was
 * fitted to jets from nozzles with exit Mach numbers from 1 to about 3, and, unlike
 * {@link machDiskDistance}, it uses the state at the exit rather than the chamber, so it applies to
 * a converging–diverging nozzle directly. At a sonic exit (Me = 1, pe = 0.528·p0 in air) it gives
 * x ≈ 0.59·D·√(p0/pa), about 12 % short of the Ashkenas–Sherman fit: the spread between the two is
 * a fair measure of how well either is known.
 *
 * @param exitDiameter - nozzle exit diameter De, m, finite, > 0
 * @param exitMach - exit Mach number Me, dimensionless, finite, ≥ 1
 * @param exitPressure - exit-plane static pressure pe, Pa absolute, > pa/(1 − IDEAL_EXPANSION_BAND)
 *   (an under-expanded jet)
 * @param ambientPressure - ambient pressure pa, Pa absolute, finite, > 0
 * @param gamma - ratio of specific heats of the jet, dimensionless, finite, > 1
 * @returns distance from the exit plane to the Mach disk, m
 * @throws RangeError naming the argument; `exitPressure` when the jet is over-expanded or ideally expanded
 * @example
 * machDiskDistanceLewisCarlson(0.008, 2.94, 2 * 98.6e3, 98.6e3, 1.4) // ≈ 0.02716 m (0.69 · 0.008 · 2.94 · √2.8)
 */
export function machDiskDistanceLewisCarlson(
  exitDiameter: number,
  exitMach: number,
  exitPressure: number,
  ambientPressure: number,
  gamma: number,
): number {
  requirePositive('exitDiameter', exitDiameter)
  requireAtLeast('exitMach', exitMach, 1)
  requirePositive('ambientPressure', ambientPressure)
  requireUnderexpanded(exitPressure, ambientPressure)
  requireGamma(gamma)
  return LEWIS_CARLSON_COEFFICIENT * exitDiameter * exitMach * Math.sqrt((gamma * exitPressure) / ambientPressure)
}

/**
 * Exact defined constants used by the formula library and the unit table.
 *
 * Every value here is exact by definition, not a measured or rounded figure, so conversions built
 * from them carry no error beyond floating-point rounding.
 */

/**
 * Standard acceleration of gravity, m/s². Exact by definition (3rd CGPM, 1901). Used to turn
 * impulse per unit mass into specific impulse in seconds and kilogram-force into newtons.
 */
export const G0 = 9.80665

/** One standard atmosphere, Pa. Exact by definition (10th CGPM, 1954). */
export const STANDARD_ATMOSPHERE = 101325

/** One bar, Pa. Exact by definition. */
export const BAR = 100000

/** One international inch, m. Exact (international yard and pound agreement, 1959). */
export const INCH = 0.0254

/** One square inch, m². Exact: 0.0254² written out so no product rounding enters. */
export const SQUARE_INCH = 0.00064516

/** One avoirdupois pound (mass), kg. Exact (international yard and pound agreement, 1959). */
export const POUND_MASS = 0.45359237

/** One pound-force, N. Exact: 0.45359237 kg × 9.80665 m/s² = 4.4482216152605 N. */
export const POUND_FORCE = 4.4482216152605

/** One kilogram-force, N. Exact: 1 kg × 9.80665 m/s² (NIST SP 811, 2008 edition, appendix B). */
export const KILOGRAM_FORCE = 9.80665

/**
 * One gram-force, N. Exact: 1 g × 9.80665 m/s² = 0.00980665 N, from the standard acceleration of
 * gravity as the kilogram-force is (NIST SP 811 gives the kilogram-force; 1 gf = 10⁻³ kgf).
 * Written as the decimal rather than 9.80665 / 1000, so no division rounding enters.
 */
export const GRAM_FORCE = 0.00980665

/**
 * One pound-force per square inch, Pa: 4.4482216152605 N / 0.00064516 m² = 6894.757293168361… Pa
 * (usually quoted as 6894.757293168). Computed from the two exact definitions rather than typed in
 * rounded, so psi stays consistent with lbf and in².
 */
export const PSI = POUND_FORCE / SQUARE_INCH

/** One US liquid gallon, m³. Exact: 231 in³ = 3.785411784 L. */
export const US_GALLON = 0.003785411784

/** 0 °C in kelvin. Exact by definition. */
export const ZERO_CELSIUS = 273.15

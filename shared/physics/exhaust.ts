/**
 * The ideal exhaust of a nozzle: the velocity a calorically perfect gas reaches expanding
 * isentropically from the chamber (at rest) down to a given pressure, and the specific impulse of a
 * nozzle that expands exactly to the ambient pressure (optimum expansion) — the ceiling a measured
 * specific impulse is judged against.
 *
 * Sources: the energy equation of steady adiabatic flow, cp·T0 = cp·T + v²/2 with cp = γR/(γ−1),
 * and the isentropic relation T/T0 = (p/p0)^((γ−1)/γ) (NACA Report 1135, 1953, the isentropic-flow
 * relations; equation numbers not checked); the same result is Sutton & Biblarz, "Rocket Propulsion
 * Elements" (8th ed.), eq. 3-16 (from memory). The tests check it against the equation written out
 * independently and against NACA 1135's isentropic table at Mach 2.
 */
import { G0 } from './constants'
import { requireGamma, requireInterval, requirePositive } from './validate'

/**
 * Ideal exhaust velocity: isentropic expansion from the chamber (at rest) to the pressure p.
 *
 * v = √( 2γ/(γ−1) · R·T0 · [1 − (p/p0)^((γ−1)/γ)] ).
 *
 * Source: the energy equation with the isentropic T/T0 (NACA Report 1135); Sutton & Biblarz
 * eq. 3-16 (from memory).
 *
 * @param chamberPressure - stagnation pressure p0, Pa absolute, finite, > 0
 * @param exitPressure - pressure the gas expands to, Pa absolute, from 0 (vacuum) to p0
 * @param chamberTemperature - stagnation temperature T0, K, finite, > 0
 * @param gamma - ratio of specific heats, dimensionless, finite, > 1
 * @param gasConstant - specific gas constant R, J/(kg·K), finite, > 0 (air: 287.05)
 * @returns velocity, m/s (0 when p = p0; √(2 cp T0) when p = 0)
 * @throws RangeError naming the argument out of range
 * @example
 * idealExhaustVelocity(1e6, 0, 293.15, 1.4, 287.05) // ≈ 767.6 m/s = √(2 cp T0), expansion to vacuum
 */
export function idealExhaustVelocity(
  chamberPressure: number,
  exitPressure: number,
  chamberTemperature: number,
  gamma: number,
  gasConstant: number,
): number {
  const p0 = requirePositive('chamberPressure', chamberPressure)
  requireInterval(
    'exitPressure',
    exitPressure,
    { value: 0, open: false },
    { value: p0, open: false, text: `chamberPressure (${p0})` },
  )
  requirePositive('chamberTemperature', chamberTemperature)
  requireGamma(gamma)
  requirePositive('gasConstant', gasConstant)
  const expansion = 1 - (exitPressure / p0) ** ((gamma - 1) / gamma)
  return Math.sqrt(((2 * gamma) / (gamma - 1)) * gasConstant * chamberTemperature * expansion)
}

/**
 * Specific impulse of ideal, optimum expansion from the chamber pressure to the ambient pressure:
 * the exit pressure equals ambient, so there is no pressure thrust and Isp = v(pa)/g0. For given
 * p0, pa and T0 no full-flowing isentropic nozzle gives more (an exit pressure above or below
 * ambient loses thrust: Sutton & Biblarz ch. 3, "optimum expansion", from memory; checked in the
 * tests against nozzleFlow over a range of area ratios), so it is the ceiling of a
 * specific impulse measured at that chamber pressure. Expansion to vacuum (pa = 0) gives the
 * absolute ceiling √(2 cp T0)/g0, about 78 s for air at 20 °C; a stand at 84 kPa ambient and
 * 820 kPa chamber gives about 54 s.
 *
 * Isp = √( 2γ/(γ−1) · R·T0 · [1 − (pa/p0)^((γ−1)/γ)] ) / g0, g0 = 9.80665 m/s².
 *
 * @param chamberPressure - stagnation pressure p0, Pa absolute, finite, > 0 (for a blow-down, the
 *   peak chamber pressure gives the ceiling of the whole run)
 * @param ambientPressure - ambient (back) pressure pa, Pa absolute, from 0 to p0
 * @param chamberTemperature - stagnation temperature T0, K, finite, > 0
 * @param gamma - ratio of specific heats, dimensionless, finite, > 1
 * @param gasConstant - specific gas constant R, J/(kg·K), finite, > 0 (air: 287.05)
 * @returns specific impulse, s
 * @throws RangeError naming the argument out of range
 * @example
 * idealSpecificImpulse(820e3, 84e3, 293.15, 1.4, 287.05) // ≈ 54.1 s
 */
export function idealSpecificImpulse(
  chamberPressure: number,
  ambientPressure: number,
  chamberTemperature: number,
  gamma: number,
  gasConstant: number,
): number {
  const p0 = requirePositive('chamberPressure', chamberPressure)
  requireInterval(
    'ambientPressure',
    ambientPressure,
    { value: 0, open: false },
    { value: p0, open: false, text: `chamberPressure (${p0})` },
  )
  return idealExhaustVelocity(p0, ambientPressure, chamberTemperature, gamma, gasConstant) / G0
}

/**
 * Reduction of test-stand data: impulse, specific impulse, characteristic velocity, thrust
 * coefficient, and mean and peak of sampled signals.
 *
 * Source: Sutton & Biblarz, "Rocket Propulsion Elements" (8th ed.), eqs. 2-1, 2-3/2-5, 3-31 and
 * 3-32 (equation numbers from memory); trapezoid rule, e.g. Press et al., Numerical Recipes,
 * 3rd ed., eq. 4.1.11 (from memory).
 */
import { G0 } from './constants'
import { requireFinite, requirePositive, requireSameLength, requireSamples } from './validate'

function requireNonDecreasingTime(time: readonly number[]): void {
  for (let i = 1; i < time.length; i++) {
    // requireSamples has already checked every entry is a finite number.
    if ((time[i] as number) < (time[i - 1] as number)) {
      throw new RangeError(
        `time must not decrease from one sample to the next (got time[${i - 1}] = ${time[i - 1]} and time[${i}] = ${time[i]})`,
      )
    }
  }
}

function trapezoid(time: readonly number[], values: readonly number[]): number {
  let sum = 0
  for (let i = 1; i < time.length; i++) {
    sum += 0.5 * ((time[i] as number) - (time[i - 1] as number)) * ((values[i] as number) + (values[i - 1] as number))
  }
  return sum
}

/**
 * Total impulse: the time integral of thrust, by the trapezoid rule over possibly uneven samples.
 *
 * I = Σ ½·(t_i − t_{i−1})·(F_i + F_{i−1}) ≈ ∫F dt.
 *
 * Source: Sutton & Biblarz, Rocket Propulsion Elements, eq. 2-1 (I = ∫F dt, from memory); the
 * trapezoid rule. Samples with equal times (a repeated time stamp) add nothing; the integral is
 * taken over every sample given, so trim the record to the burn first if needed.
 *
 * @param time - sample times, s, finite, not decreasing, at least 2 samples
 * @param thrust - thrust at those times, N, finite (may be negative, e.g. a load-cell offset)
 * @returns total impulse, N·s
 * @throws RangeError on unequal lengths, fewer than 2 samples, non-finite entries or decreasing time
 * @example
 * totalImpulse([0, 0.5, 1.5, 2], [0, 100, 100, 0]) // = 25 + 100 + 25 = 150 N·s
 */
export function totalImpulse(time: readonly number[], thrust: readonly number[]): number {
  requireSamples('time', time, 2)
  requireSamples('thrust', thrust, 2)
  requireSameLength('time', time, 'thrust', thrust)
  requireNonDecreasingTime(time)
  return trapezoid(time, thrust)
}

/**
 * Specific impulse from total impulse and the propellant mass expended.
 *
 * Isp = I/(m_p·g0), with g0 = 9.80665 m/s².
 *
 * Source: Sutton & Biblarz, Rocket Propulsion Elements, eq. 2-3 (from memory).
 *
 * @param impulse - total impulse, N·s, finite, ≥ 0
 * @param propellantMass - propellant mass expended, kg, finite, > 0
 * @returns specific impulse, s
 * @example
 * specificImpulse(110.9, 0.189) // ≈ 59.83 s
 */
export function specificImpulse(impulse: number, propellantMass: number): number {
  requireFinite('impulse', impulse)
  if (impulse < 0) throw new RangeError(`impulse must be a finite number of at least 0 (got ${impulse})`)
  requirePositive('propellantMass', propellantMass)
  return impulse / (propellantMass * G0)
}

/**
 * Characteristic velocity from measured chamber pressure, throat area and mass flow.
 *
 * c* = p0·At/ṁ.
 *
 * Source: Sutton & Biblarz, Rocket Propulsion Elements, eq. 3-32 (from memory).
 *
 * @param chamberPressure - chamber (stagnation) pressure p0, Pa absolute, finite, > 0
 * @param throatArea - throat area At, m², finite, > 0
 * @param massFlow - mass flow ṁ, kg/s, finite, > 0
 * @returns c*, m/s
 * @example
 * characteristicVelocity(1e6, 1e-4, 0.2335) // ≈ 428.3 m/s
 */
export function characteristicVelocity(chamberPressure: number, throatArea: number, massFlow: number): number {
  requirePositive('chamberPressure', chamberPressure)
  requirePositive('throatArea', throatArea)
  requirePositive('massFlow', massFlow)
  return (chamberPressure * throatArea) / massFlow
}

/**
 * Thrust coefficient from measured thrust, chamber pressure and throat area.
 *
 * CF = F/(p0·At).
 *
 * Source: Sutton & Biblarz, Rocket Propulsion Elements, eq. 3-31 (from memory).
 *
 * @param thrust - thrust F, N, finite (a negative value is returned as a negative coefficient)
 * @param chamberPressure - chamber (stagnation) pressure p0, Pa absolute, finite, > 0
 * @param throatArea - throat area At, m², finite, > 0
 * @returns CF, dimensionless
 * @example
 * thrustCoefficient(125.24, 1e6, 1e-4) // ≈ 1.2524
 */
export function thrustCoefficient(thrust: number, chamberPressure: number, throatArea: number): number {
  requireFinite('thrust', thrust)
  requirePositive('chamberPressure', chamberPressure)
  requirePositive('throatArea', throatArea)
  return thrust / (chamberPressure * throatArea)
}

/**
 * Mean of a sampled signal: the arithmetic mean of the samples, or, when their times are given,
 * the time-weighted mean (trapezoid integral divided by the time span), which is what a mean thrust
 * over a burn with uneven sampling should be.
 *
 * mean = (1/N)·Σ x_i, or ∫x dt / (t_last − t_first) by the trapezoid rule.
 *
 * Source: definition of the mean; trapezoid rule (see {@link totalImpulse}).
 *
 * @param values - samples, any unit, finite, at least 1 (at least 2 when time is given)
 * @param time - optional sample times, s, not decreasing, same length as values, spanning > 0 s
 * @returns the mean, in the unit of the samples
 * @example
 * meanValue([1, 2, 3, 6])                // = 3
 * meanValue([0, 100, 100, 0], [0, 0.5, 1.5, 2]) // = 150 N·s / 2 s = 75
 */
export function meanValue(values: readonly number[], time?: readonly number[]): number {
  if (time === undefined) {
    requireSamples('values', values, 1)
    let sum = 0
    for (const v of values) sum += v
    return sum / values.length
  }
  requireSamples('values', values, 2)
  requireSamples('time', time, 2)
  requireSameLength('values', values, 'time', time)
  requireNonDecreasingTime(time)
  const span = (time[time.length - 1] as number) - (time[0] as number)
  if (!(span > 0)) throw new RangeError(`time must span more than 0 s (got ${span})`)
  return trapezoid(time, values) / span
}

/**
 * Largest value of a sampled signal (e.g. peak thrust or peak chamber pressure).
 *
 * Source: definition.
 *
 * @param values - samples, any unit, finite, at least 1
 * @returns the largest sample, in the unit of the samples
 * @example
 * peakValue([0, 12.5, 31.2, 30.9, 4]) // = 31.2
 */
export function peakValue(values: readonly number[]): number {
  requireSamples('values', values, 1)
  let peak = -Infinity
  for (const v of values) if (v > peak) peak = v
  return peak
}

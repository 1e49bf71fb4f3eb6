/**
 * Discharge of a gas receiver (tank) through a nozzle or orifice: flow through a restriction and
 * the pressure history of the tank, integrated numerically.
 *
 * Sources: isentropic flow relations (NACA Report 1135, 1953) with continuity; Sutton & Biblarz,
 * Rocket Propulsion Elements, eq. 3-24 (choked flow); the closed forms of the choked blow-down are
 * derived below. Equation numbers are cited from memory.
 */
import { chokedMassFlowUnchecked, nozzleFlow, nozzlePressureRatios } from './nozzle'
import { requireAtLeast, requireGamma, requireInterval, requireObject, requireOneOf, requirePositive } from './validate'

/**
 * Mass flow of a gas through a restriction from a reservoir at rest, choked or not.
 *
 * Choked (pb/p0 ≤ (2/(γ+1))^(γ/(γ−1))): ṁ = Cd·A·p0·√(γ/(R·T0))·(2/(γ+1))^((γ+1)/(2(γ−1))).
 * Unchoked: ṁ = Cd·A·p0·√( 2γ/((γ−1)·R·T0) · [ (pb/p0)^(2/γ) − (pb/p0)^((γ+1)/γ) ] ), the
 * isentropic expansion to the back pressure pb (the usual compressible-orifice equation); the two
 * agree, with equal slope, at the critical ratio.
 *
 * Source: Sutton & Biblarz, Rocket Propulsion Elements, eq. 3-24 (choked); the unchoked form follows
 * from NACA Report 1135 eqs. 43–45 with continuity at the throat (equation numbers from memory).
 *
 * @param upstreamPressure - reservoir (stagnation) pressure p0, Pa absolute, finite, > 0
 * @param upstreamTemperature - reservoir (stagnation) temperature T0, K, finite, > 0
 * @param downstreamPressure - back pressure pb, Pa absolute, from 0 to p0 (equal gives no flow)
 * @param area - geometric throat area A, m², finite, > 0
 * @param dischargeCoefficient - Cd, dimensionless, greater than 0 and at most 1
 * @param gamma - ratio of specific heats, dimensionless, finite, > 1
 * @param gasConstant - specific gas constant R, J/(kg·K), finite, > 0
 * @returns mass flow, kg/s, ≥ 0
 * @example
 * dischargeMassFlow(1e6, 300, 101325, 1e-4, 1, 1.4, 287)  // ≈ 0.23336 kg/s (choked)
 * dischargeMassFlow(150000, 300, 101325, 1e-4, 1, 1.4, 287) // ≈ 0.033278 kg/s (not choked)
 */
export function dischargeMassFlow(
  upstreamPressure: number,
  upstreamTemperature: number,
  downstreamPressure: number,
  area: number,
  dischargeCoefficient: number,
  gamma: number,
  gasConstant: number,
): number {
  requirePositive('upstreamPressure', upstreamPressure)
  requirePositive('upstreamTemperature', upstreamTemperature)
  requireInterval(
    'downstreamPressure',
    downstreamPressure,
    { value: 0, open: false },
    { value: upstreamPressure, open: false, text: `upstreamPressure (${upstreamPressure})` },
  )
  requirePositive('area', area)
  requireInterval('dischargeCoefficient', dischargeCoefficient, { value: 0, open: true }, { value: 1, open: false })
  requireGamma(gamma)
  requirePositive('gasConstant', gasConstant)
  return dischargeMassFlowUnchecked(
    upstreamPressure,
    upstreamTemperature,
    downstreamPressure,
    area,
    dischargeCoefficient,
    gamma,
    gasConstant,
  )
}

/**
 * {@link dischargeMassFlow} without argument checks; same equations and source. A back pressure at
 * or above p0 gives 0 (no reverse flow is modelled).
 *
 * @param p0 - upstream pressure, Pa absolute, > 0 (not checked)
 * @param t0 - upstream temperature, K, > 0 (not checked)
 * @param pb - back pressure, Pa absolute, ≥ 0 (not checked)
 * @param area - m², > 0 (not checked)
 * @param cd - discharge coefficient, in (0, 1] (not checked)
 * @param gamma - ratio of specific heats, > 1 (not checked)
 * @param gasConstant - J/(kg·K), > 0 (not checked)
 * @returns mass flow, kg/s, ≥ 0
 * @example
 * dischargeMassFlowUnchecked(2e5, 300, 1e5, 1e-5, 1, 1.4, 287) // ≈ 0.0046671 kg/s (just choked)
 */
export function dischargeMassFlowUnchecked(
  p0: number,
  t0: number,
  pb: number,
  area: number,
  cd: number,
  gamma: number,
  gasConstant: number,
): number {
  if (!(pb < p0)) return 0
  const ratio = pb / p0
  const critical = (2 / (gamma + 1)) ** (gamma / (gamma - 1))
  const scale = cd * area * p0 * Math.sqrt(gamma / (gasConstant * t0))
  if (ratio <= critical) return scale * (2 / (gamma + 1)) ** ((gamma + 1) / (2 * (gamma - 1)))
  // r^(2/γ) − r^((γ+1)/γ) = r^(2/γ)·(1 − r^((γ−1)/γ)), written with expm1 so it keeps its digits as r → 1.
  const bracket = ratio ** (2 / gamma) * -Math.expm1(((gamma - 1) / gamma) * Math.log(ratio))
  return scale * Math.sqrt((2 / (gamma - 1)) * bracket)
}

/** How the gas left in the tank behaves: held at its initial temperature, or expanding isentropically. */
export type BlowdownProcess = 'isothermal' | 'adiabatic'

/** The allowed values of {@link BlowdownProcess}. */
export const BLOWDOWN_PROCESSES: readonly BlowdownProcess[] = ['isothermal', 'adiabatic']

/** The most samples {@link tankBlowdown} will produce (duration/step), to bound time and memory. */
export const MAX_BLOWDOWN_SAMPLES = 1_000_000

/** Inputs of {@link tankBlowdown}; all SI, pressures absolute. */
export interface BlowdownInput {
  /** Tank volume V, m³, > 0. */
  volume: number
  /** Tank pressure at t = 0, Pa absolute, > ambientPressure. */
  initialPressure: number
  /** Tank temperature at t = 0, K, > 0. */
  initialTemperature: number
  /** Ambient (back) pressure, Pa absolute, from 0 up to but not including initialPressure. */
  ambientPressure: number
  /** Geometric throat area At, m², > 0. */
  throatArea: number
  /**
   * Exit area Ae of a converging–diverging nozzle, m², ≥ throatArea. Optional: without it the
   * outlet is a plain orifice (or converging nozzle), Ae = At. It sets when the throat unchokes
   * (see {@link tankBlowdown}).
   */
  exitArea?: number
  /** Discharge coefficient Cd, dimensionless, in (0, 1]. */
  dischargeCoefficient: number
  /** Ratio of specific heats, > 1. */
  gamma: number
  /** Specific gas constant R, J/(kg·K), > 0. */
  gasConstant: number
  /** 'isothermal' (slow discharge, tank walls keep T) or 'adiabatic' (fast discharge, isentropic tank gas). */
  process: BlowdownProcess
  /** Time to simulate, s, > 0. */
  duration: number
  /** Integration and output step, s, > 0, at least duration/MAX_BLOWDOWN_SAMPLES. */
  step: number
}

/** Sampled history of a blow-down; all four arrays have the same length and index. */
export interface Blowdown {
  /** Time, s, starting at 0. */
  time: number[]
  /** Tank pressure, Pa absolute. */
  pressure: number[]
  /** Tank temperature, K. */
  temperature: number[]
  /** Mass flow leaving the tank, kg/s. */
  massFlow: number[]
}

/**
 * Time constant of a choked blow-down, τ = V/(Cd·At·√(γ·R·T)·(2/(γ+1))^((γ+1)/(2(γ−1)))).
 *
 * With m = pV/(RT) and the choked mass flow, an isothermal tank obeys dp/dt = −p/τ, so
 * p = p_i·exp(−t/τ). An adiabatic (isentropic) tank obeys dp/dt = −γ·(R·T/V)·ṁ with
 * T = T_i·(p/p_i)^((γ−1)/γ), i.e. dP/dt = −(γ/τ)·P^((3γ−1)/(2γ)) for P = p/p_i and τ at T_i, whose
 * solution is p = p_i·(1 + (γ−1)/2·t/τ)^(−2γ/(γ−1)). Both hold while the throat is choked.
 *
 * Source: derived here from the ideal-gas law, the choked mass flow (Sutton & Biblarz eq. 3-24,
 * from memory) and the isentropic relation.
 *
 * @param volume - tank volume V, m³, > 0
 * @param temperature - tank temperature T (initial temperature for the adiabatic case), K, > 0
 * @param throatArea - At, m², > 0
 * @param dischargeCoefficient - Cd, in (0, 1]
 * @param gamma - ratio of specific heats, > 1
 * @param gasConstant - R, J/(kg·K), > 0
 * @returns τ, s
 * @example
 * blowdownTimeConstant(0.05, 293.15, 1e-5, 1, 1.4, 287) // ≈ 25.175 s
 */
export function blowdownTimeConstant(
  volume: number,
  temperature: number,
  throatArea: number,
  dischargeCoefficient: number,
  gamma: number,
  gasConstant: number,
): number {
  requirePositive('volume', volume)
  requirePositive('temperature', temperature)
  requirePositive('throatArea', throatArea)
  requireInterval('dischargeCoefficient', dischargeCoefficient, { value: 0, open: true }, { value: 1, open: false })
  requireGamma(gamma)
  requirePositive('gasConstant', gasConstant)
  const flowFunction = (2 / (gamma + 1)) ** ((gamma + 1) / (2 * (gamma - 1)))
  return volume / (dischargeCoefficient * throatArea * Math.sqrt(gamma * gasConstant * temperature) * flowFunction)
}

/**
 * Pressure, temperature and mass-flow history of a tank discharging through a nozzle.
 *
 * State: tank pressure p; the tank temperature is T_i (isothermal) or T_i·(p/p_i)^((γ−1)/γ)
 * (adiabatic). With m = pV/(RT): dp/dt = −n·(R·T/V)·ṁ(p, T), n = 1 (isothermal) or γ (adiabatic).
 * The outlet is a nozzle of throat At and exit Ae (a plain orifice when Ae is not given, Ae = At):
 * the throat is choked while pa/p ≤ chokeLimit of {@link nozzlePressureRatios}(Ae/At, γ), and then
 * ṁ = Cd·{@link chokedMassFlow}; above it ṁ = Cd times the subsonic mass flow of
 * {@link nozzleFlow} (isentropic to the exit at pa, ρe·ve·Ae). A converging–diverging nozzle stays
 * choked to a much higher back-pressure ratio than an orifice, because its diverging part
 * recovers pressure as a subsonic diffuser: pa/p ≈ 0.88 for ε = 1.5 in air, against 0.528
 * (NACA Report 1135, area–Mach relation, subsonic branch). For Ae = At both give the
 * compressible-orifice law of {@link dischargeMassFlow}. Integrated by the classical fourth-order
 * Runge–Kutta method with a fixed step; against the closed forms of {@link blowdownTimeConstant}
 * (which hold while the throat is choked, whatever Ae) it agrees to better than 1e-4 relative when the
 * step is below about τ/20. The run ends at `duration` or when the tank reaches ambient pressure:
 * near the end ṁ ∝ √(p − pa), so p − pa falls as (t_end − t)², and the last sample is placed at
 * t + 2(p − pa)/|dp/dt| with p = pa and no flow.
 *
 * Source: ideal-gas law and mass balance; Runge–Kutta: e.g. Press et al., Numerical Recipes, 3rd
 * ed., eq. 17.1.3 (from memory).
 *
 * @param input - volume (m³, > 0), initialPressure (Pa abs, > ambientPressure), initialTemperature
 *   (K, > 0), ambientPressure (Pa abs, ≥ 0), throatArea (m², > 0), exitArea (optional, m²,
 *   ≥ throatArea), dischargeCoefficient (in (0, 1]), gamma (> 1), gasConstant (J/(kg·K), > 0),
 *   process ('isothermal' | 'adiabatic'), duration (s, > 0), step (s, > 0,
 *   ≥ duration/MAX_BLOWDOWN_SAMPLES)
 * @returns time (s), pressure (Pa abs), temperature (K) and massFlow (kg/s) arrays, one entry per step
 * @throws RangeError naming the argument when any input is out of range
 * @example
 * tankBlowdown({ volume: 0.05, initialPressure: 1e6, initialTemperature: 293.15,
 *   ambientPressure: 101325, throatArea: 1e-5, dischargeCoefficient: 1, gamma: 1.4,
 *   gasConstant: 287, process: 'isothermal', duration: 10, step: 0.01 })
 * // → pressure[100] (t = 1 s) ≈ 1e6·exp(−1/25.175) ≈ 961 056 Pa
 * tankBlowdown({ volume: 0.05, initialPressure: 784e3, initialTemperature: 293.15,
 *   ambientPressure: 84e3, throatArea: 1.2566e-5, exitArea: 1.8857e-5, dischargeCoefficient: 0.98,
 *   gamma: 1.4, gasConstant: 287.05, process: 'adiabatic', duration: 60, step: 0.06 })
 * // → choked (p > 84 kPa / 0.880 ≈ 95.5 kPa) for about 35.9 s; as a plain orifice (no exitArea,
 * //   p > 84 kPa / 0.528 ≈ 159 kPa) for about 26.2 s
 */
export function tankBlowdown(input: BlowdownInput): Blowdown {
  requireObject('input', input)
  const volume = requirePositive('volume', input.volume)
  const initialPressure = requirePositive('initialPressure', input.initialPressure)
  const initialTemperature = requirePositive('initialTemperature', input.initialTemperature)
  const ambientPressure = requireInterval(
    'ambientPressure',
    input.ambientPressure,
    { value: 0, open: false },
    { value: initialPressure, open: true, text: `initialPressure (${initialPressure})` },
  )
  const throatArea = requirePositive('throatArea', input.throatArea)
  const exitArea =
    input.exitArea === undefined
      ? throatArea
      : requireAtLeast('exitArea', input.exitArea, throatArea, `throatArea (${throatArea})`)
  const cd = requireInterval(
    'dischargeCoefficient',
    input.dischargeCoefficient,
    { value: 0, open: true },
    { value: 1, open: false },
  )
  const gamma = requireGamma(input.gamma)
  const gasConstant = requirePositive('gasConstant', input.gasConstant)
  const process = requireOneOf('process', input.process, BLOWDOWN_PROCESSES)
  const duration = requirePositive('duration', input.duration)
  const step = requireInterval(
    'step',
    input.step,
    { value: duration / MAX_BLOWDOWN_SAMPLES, open: false, text: `duration / ${MAX_BLOWDOWN_SAMPLES}` },
    { value: duration, open: false, text: `duration (${duration})` },
  )

  const adiabatic = process === 'adiabatic'
  const n = adiabatic ? gamma : 1
  const temperatureExponent = (gamma - 1) / gamma
  // Highest pa/p at which the throat is still choked: 0.528 for an orifice in air, more with a diffuser.
  const chokeLimit = nozzlePressureRatios(exitArea / throatArea, gamma).chokeLimit
  const temperatureAt = (p: number): number =>
    adiabatic ? initialTemperature * (p / initialPressure) ** temperatureExponent : initialTemperature
  const flowAt = (p: number, t: number): number => {
    if (!(p > ambientPressure)) return 0
    if (ambientPressure / p <= chokeLimit) return cd * chokedMassFlowUnchecked(p, t, throatArea, gamma, gasConstant)
    return (
      cd *
      nozzleFlow({
        chamberPressure: p,
        chamberTemperature: t,
        ambientPressure,
        throatArea,
        exitArea,
        gamma,
        gasConstant,
      }).massFlow
    )
  }
  const rate = (p: number): number => {
    if (!(p > ambientPressure)) return 0
    const t = temperatureAt(p)
    return -((n * gasConstant * t) / volume) * flowAt(p, t)
  }

  const time = [0]
  const pressure = [initialPressure]
  const temperature = [initialTemperature]
  const massFlow = [flowAt(initialPressure, initialTemperature)]
  const finish = (at: number): void => {
    time.push(at)
    pressure.push(ambientPressure)
    temperature.push(temperatureAt(ambientPressure))
    massFlow.push(0)
  }

  const steps = Math.ceil(duration / step - 1e-9)
  let p = initialPressure
  let t = 0
  for (let i = 1; i <= steps; i++) {
    // Times are i·step, not a running sum, so long runs do not drift.
    const tNext = Math.min(i * step, duration)
    const h = tNext - t
    const k1 = rate(p)
    const excess = p - ambientPressure
    const timeToAmbient = k1 < 0 ? (2 * excess) / -k1 : Infinity
    const unchoked = ambientPressure / p > chokeLimit
    if (unchoked && timeToAmbient <= h) {
      finish(t + timeToAmbient)
      break
    }
    const k2 = rate(p + 0.5 * h * k1)
    const k3 = rate(p + 0.5 * h * k2)
    const k4 = rate(p + h * k3)
    const pNext = p + (h / 6) * (k1 + 2 * k2 + 2 * k3 + k4)
    if (!(pNext > ambientPressure)) {
      finish(t + Math.min(h, timeToAmbient))
      break
    }
    p = pNext
    t = tNext
    const temperatureNow = temperatureAt(p)
    time.push(t)
    pressure.push(p)
    temperature.push(temperatureNow)
    massFlow.push(flowAt(p, temperatureNow))
  }
  return { time, pressure, temperature, massFlow }
}

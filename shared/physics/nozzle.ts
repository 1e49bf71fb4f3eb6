/**
 * Quasi-one-dimensional flow of a calorically perfect gas through a converging–diverging nozzle
 * fed from a chamber at rest: operating regime, mass flow, exit state, thrust and performance
 * figures; flow separation in an over-expanded nozzle; choked mass flow; ideal thrust. The jet
 * outside the nozzle (the Mach disk) is in free-jet.ts.
 *
 * Sources: G. P. Sutton & O. Biblarz, "Rocket Propulsion Elements" (8th ed.), ch. 3; J. D. Anderson,
 * "Modern Compressible Flow", 3rd ed., ch. 5 (nozzle regimes, shock in the nozzle); NACA Report
 * 1135 (1953); M. Summerfield, C. R. Foster & W. C. Swan, "Flow separation in overexpanded
 * supersonic exhaust nozzles", Jet Propulsion 24 (1954) 319–321 (separation). Equation numbers and
 * the separation ratio are cited from memory.
 */
import { G0 } from './constants'
import {
  areaRatioUnchecked,
  machFromPressureRatioUnchecked,
  pressureRatioUnchecked,
  solveMachFromAreaRatio,
} from './isentropic'
import { machFromStagnationPressureRatioUnchecked, normalShockUnchecked } from './shocks'
import { requireAtLeast, requireGamma, requireInterval, requireObject, requirePositive } from './validate'

/** How a converging–diverging nozzle is running, from high to low back pressure. */
export type NozzleRegime = 'subsonic' | 'shock-in-nozzle' | 'overexpanded' | 'ideal' | 'underexpanded'

/** The regimes in the order they occur as the ambient (back) pressure falls. */
export const NOZZLE_REGIMES: readonly NozzleRegime[] = [
  'subsonic',
  'shock-in-nozzle',
  'overexpanded',
  'ideal',
  'underexpanded',
]

/**
 * Half-width of the band around the design exit pressure that is called 'ideal' expansion:
 * |pa − pe| ≤ 0.01·pe. One per cent is about the accuracy of the pressure transducers and gauges of a
 * teaching stand, so closer agreement could not be told apart from exact matching by measurement.
 */
export const IDEAL_EXPANSION_BAND = 0.01

/** Back-to-chamber pressure ratios pa/p0 that bound the regimes of a nozzle of given area ratio. */
export interface NozzlePressureRatios {
  /** pa/p0 at which the throat just chokes with subsonic flow everywhere else; above it the nozzle is 'subsonic'. */
  chokeLimit: number
  /** pa/p0 at which a normal shock stands exactly at the exit plane; between it and chokeLimit a shock sits inside. */
  shockAtExit: number
  /** pa/p0 of isentropic supersonic expansion to the exit (exit pressure equals ambient). */
  design: number
}

/**
 * Back-to-chamber pressure ratios that bound the operating regimes of a converging–diverging nozzle.
 *
 * chokeLimit = p/p0 at the subsonic Mach number of A/A* = ε; design = p/p0 at the supersonic Mach
 * number Me of A/A* = ε; shockAtExit = design · (p2/p1 of a normal shock at Me).
 *
 * Source: Anderson, Modern Compressible Flow, 3rd ed., section 5.4 (from memory); isentropic and
 * normal-shock relations of NACA Report 1135.
 *
 * @param areaRatio - exit-to-throat area ratio ε = Ae/At, dimensionless, finite, ≥ 1
 * @param gamma - ratio of specific heats, dimensionless, finite, > 1
 * @returns the three ratios pa/p0, dimensionless, with chokeLimit ≥ shockAtExit ≥ design
 * @example
 * nozzlePressureRatios(1.6875, 1.4) // → { chokeLimit: 0.90876…, shockAtExit: 0.57512…, design: 0.12780… }
 */
export function nozzlePressureRatios(areaRatio: number, gamma: number): NozzlePressureRatios {
  requireAtLeast('areaRatio', areaRatio, 1)
  requireGamma(gamma)
  const { chokeLimit, shockAtExit, design } = regimeBounds(areaRatio, gamma)
  return { chokeLimit, shockAtExit, design }
}

interface RegimeBounds extends NozzlePressureRatios {
  subsonicExitMach: number
  supersonicExitMach: number
}

/**
 * The bounds of the last nozzle asked about. They depend on the area ratio and γ alone, and a run is
 * checked or plotted sample by sample on one nozzle (a chart calls nozzleFlow for 2000 chamber
 * pressures), so the two root solves are done once per nozzle instead of once per call. Read-only:
 * callers copy what they hand out.
 */
let lastBounds: { areaRatio: number; gamma: number; bounds: Readonly<RegimeBounds> } | null = null

function regimeBounds(areaRatio: number, gamma: number): Readonly<RegimeBounds> {
  if (lastBounds !== null && lastBounds.areaRatio === areaRatio && lastBounds.gamma === gamma) return lastBounds.bounds
  const subsonicExitMach = solveMachFromAreaRatio(areaRatio, gamma, false).mach
  const supersonicExitMach = solveMachFromAreaRatio(areaRatio, gamma, true).mach
  const design = pressureRatioUnchecked(supersonicExitMach, gamma)
  const bounds: RegimeBounds = {
    chokeLimit: pressureRatioUnchecked(subsonicExitMach, gamma),
    shockAtExit: design * normalShockUnchecked(supersonicExitMach, gamma).pressureRatio,
    design,
    subsonicExitMach,
    supersonicExitMach,
  }
  lastBounds = { areaRatio, gamma, bounds }
  return bounds
}

/**
 * Mass flow through a choked throat (sonic at the throat), for isentropic flow from a chamber at rest.
 *
 * ṁ = At·p0·√(γ/(R·T0))·(2/(γ+1))^((γ+1)/(2(γ−1))).
 *
 * Source: Sutton & Biblarz, Rocket Propulsion Elements, eq. 3-24 (equation number from memory);
 * NACA Report 1135 eq. 80 with continuity.
 *
 * @param chamberPressure - stagnation pressure p0, Pa absolute, finite, > 0
 * @param chamberTemperature - stagnation temperature T0, K, finite, > 0
 * @param throatArea - throat area At, m², finite, > 0
 * @param gamma - ratio of specific heats, dimensionless, finite, > 1
 * @param gasConstant - specific gas constant R, J/(kg·K), finite, > 0 (air: 287.05)
 * @returns mass flow, kg/s
 * @example
 * chokedMassFlow(1e6, 300, 1e-4, 1.4, 287) // ≈ 0.23336 kg/s
 */
export function chokedMassFlow(
  chamberPressure: number,
  chamberTemperature: number,
  throatArea: number,
  gamma: number,
  gasConstant: number,
): number {
  requirePositive('chamberPressure', chamberPressure)
  requirePositive('chamberTemperature', chamberTemperature)
  requirePositive('throatArea', throatArea)
  requireGamma(gamma)
  requirePositive('gasConstant', gasConstant)
  return chokedMassFlowUnchecked(chamberPressure, chamberTemperature, throatArea, gamma, gasConstant)
}

/**
 * {@link chokedMassFlow} without argument checks; same equation and source.
 *
 * @param p0 - chamber pressure, Pa absolute, > 0 (not checked)
 * @param t0 - chamber temperature, K, > 0 (not checked)
 * @param throatArea - m², > 0 (not checked)
 * @param gamma - ratio of specific heats, > 1 (not checked)
 * @param gasConstant - J/(kg·K), > 0 (not checked)
 * @returns mass flow, kg/s
 * @example
 * chokedMassFlowUnchecked(1e6, 300, 1e-4, 1.4, 287) // ≈ 0.23336 kg/s
 */
export function chokedMassFlowUnchecked(
  p0: number,
  t0: number,
  throatArea: number,
  gamma: number,
  gasConstant: number,
): number {
  return (
    throatArea * p0 * Math.sqrt(gamma / (gasConstant * t0)) * (2 / (gamma + 1)) ** ((gamma + 1) / (2 * (gamma - 1)))
  )
}

/** Inputs of {@link nozzleFlow}; all SI, pressures absolute. */
export interface NozzleInput {
  /** Stagnation (chamber) pressure p0, Pa absolute, > 0. */
  chamberPressure: number
  /** Stagnation (chamber) temperature T0, K, > 0. */
  chamberTemperature: number
  /** Ambient (back) pressure pa, Pa absolute, from 0 (vacuum) up to but not including p0. */
  ambientPressure: number
  /** Throat area At, m², > 0. */
  throatArea: number
  /** Exit area Ae, m², ≥ At (equal gives a converging nozzle). */
  exitArea: number
  /** Ratio of specific heats, > 1. */
  gamma: number
  /** Specific gas constant R, J/(kg·K), > 0. */
  gasConstant: number
}

/** Result of {@link nozzleFlow}. */
export interface NozzleFlow {
  regime: NozzleRegime
  /** Mass flow ṁ, kg/s. */
  massFlow: number
  /** Exit-plane Mach number (behind the shock when there is one), dimensionless. */
  exitMach: number
  /** Exit-plane static pressure pe, Pa absolute (equals ambient when the exit is subsonic). */
  exitPressure: number
  /** Exit-plane velocity ve, m/s. */
  exitVelocity: number
  /** Thrust F = ṁ·ve + (pe − pa)·Ae, N. */
  thrust: number
  /** Thrust coefficient CF = F/(p0·At), dimensionless. */
  thrustCoefficient: number
  /** Characteristic velocity c* = p0·At/ṁ, m/s. */
  characteristicVelocity: number
  /** Specific impulse Isp = F/(ṁ·g0), s. */
  specificImpulse: number
  /** Exit-to-throat area ratio ε = Ae/At, dimensionless. */
  areaRatio: number
  /** Exit-plane static temperature, K. */
  exitTemperature: number
  /** Exit-plane density, kg/m³. */
  exitDensity: number
  /** Whether the throat is sonic. */
  throatChoked: boolean
  /** Area at which the normal shock stands, m², when regime is 'shock-in-nozzle'; otherwise null. */
  shockArea: number | null
  /** Mach number just upstream of that shock, when regime is 'shock-in-nozzle'; otherwise null. */
  shockMach: number | null
  /** Stagnation pressure ratio across the shock p02/p01 (1 when there is no shock in the nozzle). */
  stagnationPressureRatio: number
  /** The regime bounds for this nozzle (see {@link nozzlePressureRatios}). */
  pressureRatios: NozzlePressureRatios
  /**
   * Whether the flow separates from the wall inside the diverging section by the Summerfield
   * criterion (see {@link SEPARATION_PRESSURE_RATIO}): the wall pressure of the full-flowing nozzle
   * falls to that fraction of ambient before the exit (or before the normal shock of the
   * 'shock-in-nozzle' regime). Never true for a subsonic, ideal or under-expanded nozzle.
   */
  separated: boolean
  /** Local-to-throat area ratio A/At at the separation point, dimensionless, in (1, ε), when separated; otherwise null. */
  separationAreaRatio: number | null
  /**
   * Thrust of the separated nozzle, N, when separated; otherwise null. Estimated as the full-flowing
   * thrust of the nozzle cut off at the separation point, F = ṁ·vs + (ps − pa)·As, with ambient
   * pressure on the wall downstream of it (see {@link nozzleFlow} for the model and its limits).
   * It is always above {@link NozzleFlow.thrust}: the cut-off wall felt less than ambient pressure.
   */
  separatedThrust: number | null
}

/**
 * Summerfield criterion for flow separation in an over-expanded nozzle: the boundary layer
 * separates where the wall pressure has fallen to about 0.4 of the ambient pressure,
 * ps ≈ 0.4·pa.
 *
 * Source: M. Summerfield, C. R. Foster & W. C. Swan, "Flow separation in overexpanded supersonic
 * exhaust nozzles", Jet Propulsion 24 (1954) 319–321 (the ratio from memory; later work quotes
 * 0.25–0.4 and a weak dependence on the Mach number at separation, so treat the point it gives as
 * an estimate). Dimensionless.
 */
export const SEPARATION_PRESSURE_RATIO = 0.4

/**
 * Quasi-one-dimensional flow through a converging–diverging nozzle for a given back pressure.
 *
 * With r = pa/p0 and the bounds of {@link nozzlePressureRatios}:
 * - r ≥ chokeLimit, 'subsonic': isentropic and subsonic throughout, pe = pa, Me from p/p0 = r,
 *   ṁ = ρe·ve·Ae (the throat is sonic only at r = chokeLimit).
 * - shockAtExit < r < chokeLimit, 'shock-in-nozzle': the throat is choked and a normal shock stands
 *   in the diverging part, where the exit pressure behind it equals pa. Across the shock p0 falls
 *   to p02 and A*₂ = A*₁/(p02/p01), so pe·Ae/(p0·At) = (p/p0)(Me)·(A/A*)(Me), which depends on Me
 *   only; solving it gives Me² = z/((γ−1)(1 + √(1+z))), z = 2(γ−1)(2/(γ+1))^((γ+1)/(γ−1))/(r·ε)²
 *   (Anderson, Modern Compressible Flow, section 5.4, from memory). Then p02/p01 = r/(p/p0)(Me),
 *   the upstream shock Mach number follows from the normal-shock p02/p01 relation, and the shock
 *   area is At·(A/A*)(M1). pe = pa.
 * - r ≤ shockAtExit: shock-free supersonic exit at the design Mach number, pe = p0·design;
 *   'ideal' when |pa − pe| ≤ IDEAL_EXPANSION_BAND·pe (1 %), otherwise 'overexpanded' (pa > pe)
 *   or 'underexpanded' (pa < pe).
 * In every regime Te = T0/(1 + (γ−1)/2·Me²), ve = Me·√(γ·R·Te), F = ṁ·ve + (pe − pa)·Ae,
 * CF = F/(p0·At), c* = p0·At/ṁ, Isp = F/(ṁ·g0) (Sutton & Biblarz, eqs. 2-14, 3-29, 3-31 and 3-32,
 * from memory). Thrust is continuous across every regime boundary (momentum is conserved across
 * the shock when it stands at the exit).
 *
 * Flow separation (Summerfield, Foster & Swan 1954, ratio from memory): while the throat is choked
 * the wall pressure follows the supersonic isentrope p/p0(M) down to the exit (or to the normal
 * shock). If it falls below ps = SEPARATION_PRESSURE_RATIO·pa on the way, the flow leaves the wall
 * where p = ps: separationAreaRatio = (A/A*)(Ms) with p/p0(Ms) = ps/p0 (supersonic branch).
 * separatedThrust models the nozzle as cut off there: F = ṁ·vs + (ps − pa)·As, with vs and As at
 * Ms and ambient pressure on the wall downstream. By the momentum balance on the wall the
 * full-flowing thrust is this minus ∫(pa − p)dA over the cut-off wall, so the estimate is the
 * larger. Limits: one-dimensional; the 0.4 ratio is an empirical mean with scatter (0.25–0.4); the
 * real wall pressure behind separation recovers from ps towards pa over a short distance and
 * stays a little below pa, so the estimate is somewhat high; restricted-shock separation in
 * contoured nozzles, hysteresis between opening and closing, and side loads are not modelled; in
 * the 'shock-in-nozzle' regime it replaces the normal shock of the full-flowing model, so
 * separatedThrust is not continuous with thrust where separation sets in there.
 *
 * @param input - chamberPressure (Pa abs, > 0), chamberTemperature (K, > 0), ambientPressure
 *   (Pa abs, 0 ≤ pa < p0), throatArea (m², > 0), exitArea (m², ≥ throatArea), gamma (> 1),
 *   gasConstant (J/(kg·K), > 0)
 * @returns regime, mass flow (kg/s), exit Mach, pressure (Pa), velocity (m/s), thrust (N), thrust
 *   coefficient, c* (m/s), Isp (s), plus exit temperature and density, area ratio, the shock's
 *   area (m²) and Mach number when there is one, the regime bounds, and whether the flow
 *   separates, where (A/At) and the thrust then (N)
 * @throws RangeError naming the argument when any input is out of range
 * @example
 * nozzleFlow({ chamberPressure: 1e6, chamberTemperature: 300, ambientPressure: 101325,
 *   throatArea: 1e-4, exitArea: 1.6875e-4, gamma: 1.4, gasConstant: 287 })
 * // → regime 'underexpanded' (design exit pressure 127.8 kPa > 101.3 kPa), exitMach 2,
 * //   massFlow ≈ 0.23336 kg/s, thrust ≈ 125.24 N, thrustCoefficient ≈ 1.2524, c* ≈ 428.53 m/s,
 * //   separated false
 * nozzleFlow({ chamberPressure: 1e6, chamberTemperature: 300, ambientPressure: 2e5,
 *   throatArea: 1e-4, exitArea: 4e-4, gamma: 1.4, gasConstant: 287 })
 * // → regime 'overexpanded', thrust ≈ 76.1 N (CF ≈ 0.761); separated true,
 * //   separationAreaRatio ≈ 2.19 (ps = 80 kPa, Ms ≈ 2.30), separatedThrust ≈ 103.6 N (CF ≈ 1.036)
 */
export function nozzleFlow(input: NozzleInput): NozzleFlow {
  requireObject('input', input)
  const p0 = requirePositive('chamberPressure', input.chamberPressure)
  const t0 = requirePositive('chamberTemperature', input.chamberTemperature)
  const pa = requireInterval(
    'ambientPressure',
    input.ambientPressure,
    { value: 0, open: false },
    { value: p0, open: true, text: `chamberPressure (${p0})` },
  )
  const throatArea = requirePositive('throatArea', input.throatArea)
  const exitArea = requireAtLeast('exitArea', input.exitArea, throatArea, `throatArea (${throatArea})`)
  const gamma = requireGamma(input.gamma)
  const gasConstant = requirePositive('gasConstant', input.gasConstant)

  const areaRatio = exitArea / throatArea
  const bounds = regimeBounds(areaRatio, gamma)
  const r = pa / p0

  let regime: NozzleRegime
  let exitMach: number
  let exitPressure: number
  let shockArea: number | null = null
  let shockMach: number | null = null
  let stagnationPressureRatio = 1

  if (r >= bounds.chokeLimit) {
    regime = 'subsonic'
    exitMach = machFromPressureRatioUnchecked(r, gamma)
    exitPressure = pa
  } else if (r > bounds.shockAtExit) {
    regime = 'shock-in-nozzle'
    const z = (2 * (gamma - 1) * (2 / (gamma + 1)) ** ((gamma + 1) / (gamma - 1))) / (r * areaRatio) ** 2
    exitMach = Math.sqrt(z / ((gamma - 1) * (1 + Math.sqrt(1 + z))))
    exitPressure = pa
    stagnationPressureRatio = Math.min(1, r / pressureRatioUnchecked(exitMach, gamma))
    shockMach = machFromStagnationPressureRatioUnchecked(stagnationPressureRatio, gamma, bounds.supersonicExitMach)
    shockArea = Math.min(exitArea, throatArea * areaRatioUnchecked(shockMach, gamma))
  } else {
    exitMach = bounds.supersonicExitMach
    exitPressure = p0 * bounds.design
    if (Math.abs(pa - exitPressure) <= IDEAL_EXPANSION_BAND * exitPressure) regime = 'ideal'
    else regime = pa > exitPressure ? 'overexpanded' : 'underexpanded'
  }

  const exitTemperature = t0 / (1 + 0.5 * (gamma - 1) * exitMach * exitMach)
  const exitDensity = exitPressure / (gasConstant * exitTemperature)
  const exitVelocity = exitMach * Math.sqrt(gamma * gasConstant * exitTemperature)
  const throatChoked = regime !== 'subsonic' || r === bounds.chokeLimit
  const massFlow =
    regime === 'subsonic'
      ? exitDensity * exitVelocity * exitArea
      : chokedMassFlowUnchecked(p0, t0, throatArea, gamma, gasConstant)
  const thrust = massFlow * exitVelocity + (exitPressure - pa) * exitArea

  // Separation: where the supersonic wall pressure first reaches ps, if it does before the exit
  // (or before the normal shock). pressureRatioUnchecked(M) is the isentropic p/p0 there.
  const separationRatio = SEPARATION_PRESSURE_RATIO * r
  const lowestWallRatio =
    regime === 'subsonic'
      ? 1
      : regime === 'shock-in-nozzle' && shockMach !== null
        ? pressureRatioUnchecked(shockMach, gamma)
        : bounds.design
  let separationAreaRatio: number | null = null
  let separatedThrust: number | null = null
  if (lowestWallRatio < separationRatio) {
    const separationMach = machFromPressureRatioUnchecked(separationRatio, gamma)
    separationAreaRatio = areaRatioUnchecked(separationMach, gamma)
    const separationTemperature = t0 / (1 + 0.5 * (gamma - 1) * separationMach * separationMach)
    const separationVelocity = separationMach * Math.sqrt(gamma * gasConstant * separationTemperature)
    separatedThrust = massFlow * separationVelocity + (separationRatio * p0 - pa) * separationAreaRatio * throatArea
  }

  return {
    regime,
    massFlow,
    exitMach,
    exitPressure,
    exitVelocity,
    thrust,
    thrustCoefficient: thrust / (p0 * throatArea),
    characteristicVelocity: (p0 * throatArea) / massFlow,
    specificImpulse: thrust / (massFlow * G0),
    areaRatio,
    exitTemperature,
    exitDensity,
    throatChoked,
    shockArea,
    shockMach,
    stagnationPressureRatio,
    pressureRatios: { chokeLimit: bounds.chokeLimit, shockAtExit: bounds.shockAtExit, design: bounds.design },
    separated: separationAreaRatio !== null,
    separationAreaRatio,
    separatedThrust,
  }
}

/**
 * Ideal (isentropic, quasi-one-dimensional, frozen-γ) thrust of a converging–diverging nozzle for
 * a given chamber pressure: the upper bound a measured thrust is checked against.
 *
 * F = ṁ·ve + (pe − pa)·Ae from {@link nozzleFlow}. It does not depend on T0 or R: ṁ scales as
 * p0·At/√(R·T0) and ve as √(R·T0), so their product and pe are functions of p0, pa, At, Ae and γ
 * alone (checked in the tests). T0 = 1 K and R = 1 J/(kg·K) are therefore passed internally.
 *
 * Source: Sutton & Biblarz, Rocket Propulsion Elements, eqs. 2-14 and 3-29/3-30 (from memory).
 *
 * @param chamberPressure - stagnation pressure p0, Pa absolute, finite, > 0
 * @param ambientPressure - ambient pressure pa, Pa absolute, 0 ≤ pa < p0
 * @param throatArea - throat area At, m², finite, > 0
 * @param exitArea - exit area Ae, m², ≥ At
 * @param gamma - ratio of specific heats, dimensionless, finite, > 1
 * @returns thrust, N
 * @example
 * idealThrust(1e6, 101325, 1e-4, 1.6875e-4, 1.4) // ≈ 125.24 N (CF ≈ 1.2524)
 */
export function idealThrust(
  chamberPressure: number,
  ambientPressure: number,
  throatArea: number,
  exitArea: number,
  gamma: number,
): number {
  return nozzleFlow({
    chamberPressure,
    chamberTemperature: 1,
    ambientPressure,
    throatArea,
    exitArea,
    gamma,
    gasConstant: 1,
  }).thrust
}

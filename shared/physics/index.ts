/**
 * The formula library: pure functions of compressible flow and test-stand data reduction, shared by
 * the client calculators and the server's grading. SI units throughout, pressures absolute (Pa),
 * temperatures in K, angles in radians. Out-of-range arguments throw a RangeError that names the
 * argument and its allowed range.
 */
export { G0, STANDARD_ATMOSPHERE } from './constants'
export {
  isentropic,
  machFromAreaRatio,
  machFromPressureRatio,
  criticalPressureRatio,
  FLOW_BRANCHES,
} from './isentropic'
export type { IsentropicRatios, FlowBranch } from './isentropic'
export { normalShock, obliqueShock, maxDeflection, OBLIQUE_SHOCK_BRANCHES } from './shocks'
export type { NormalShock, ObliqueShock, ObliqueShockBranch, MaxDeflection } from './shocks'
export { prandtlMeyer, machFromPrandtlMeyer, maxPrandtlMeyer } from './expansion'
export {
  nozzleFlow,
  nozzlePressureRatios,
  chokedMassFlow,
  idealThrust,
  IDEAL_EXPANSION_BAND,
  NOZZLE_REGIMES,
} from './nozzle'
export type { NozzleInput, NozzleFlow, NozzlePressureRatios, NozzleRegime } from './nozzle'
export { SEPARATION_PRESSURE_RATIO } from './nozzle'
export {
  machDiskDistance,
  machDiskDistanceLewisCarlson,
  fullyExpandedJet,
  shockCellSpacing,
  MACH_DISK_COEFFICIENT,
  LEWIS_CARLSON_COEFFICIENT,
  SHOCK_CELL_COEFFICIENT,
  BESSEL_J0_FIRST_ZERO,
} from './free-jet'
export type { FullyExpandedJet } from './free-jet'
export {
  tankBlowdown,
  dischargeMassFlow,
  blowdownTimeConstant,
  BLOWDOWN_PROCESSES,
  MAX_BLOWDOWN_SAMPLES,
} from './blowdown'
export type { BlowdownInput, Blowdown, BlowdownProcess } from './blowdown'
export {
  totalImpulse,
  specificImpulse,
  characteristicVelocity,
  thrustCoefficient,
  meanValue,
  peakValue,
} from './reduction'
export { areaFromDiameter, diameterFromArea } from './geometry'
export { reduceThrustRun, tareAlongRun, RUN_THRESHOLD } from './thrust-run'
export type { ThrustRun, ThrustRunOptions } from './thrust-run'
export { windowIntegral, windowMean } from './window'
export { idealExhaustVelocity, idealSpecificImpulse } from './exhaust'

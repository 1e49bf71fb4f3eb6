/**
 * Hand-made assignments and logs for the grading tests. Every number here is chosen so the
 * expected results can be worked out on paper; nothing is produced by the code under test.
 */
import { AssignmentSchema } from '../../../shared/modules/schema'
import type { Assignment } from '../../../shared/modules/schema'
import type { SubmissionData } from '../../../shared/modules/scope'

export const GAMMA = 1.4
/** 1 psi in Pa from the exact definitions: 4.4482216152605 N / 0.00064516 m². */
export const PSI = 4.4482216152605 / 0.00064516
export const STANDARD_ATMOSPHERE = 101325

/**
 * A nozzle whose exit-to-throat area ratio is that of Mach 2 in air:
 * A/A* = (1/M)·[(2/(γ+1))(1 + (γ−1)/2·M²)]^((γ+1)/(2(γ−1))) = ½·(1.8/1.2)³ = 1.6875 (NACA 1135, Table I).
 */
export const THROAT_DIAMETER = 0.004
export const AREA_RATIO = 1.6875
export const EXIT_DIAMETER = THROAT_DIAMETER * Math.sqrt(AREA_RATIO)
export const THROAT_AREA = (Math.PI * THROAT_DIAMETER ** 2) / 4

/**
 * Ideal thrust coefficient of the Mach-2 nozzle, Sutton & Biblarz eq. 3-30, written out here
 * independently of the formula library:
 * C_F = √(2γ²/(γ−1) · (2/(γ+1))^((γ+1)/(γ−1)) · (1 − (pe/p0)^((γ−1)/γ))) + (pe/p0 − pa/p0)·ε,
 * with pe/p0 = 1.8^−3.5 at Mach 2, so (pe/p0)^((γ−1)/γ) = 1/1.8 exactly.
 * Valid while the exit is supersonic (pa/p0 below the shock-at-exit ratio 0.1278 × 4.5 = 0.5751).
 */
export function idealThrustCoefficientMach2(chamberPressure: number, ambientPressure: number): number {
  const g = GAMMA
  const momentum = Math.sqrt(((2 * g * g) / (g - 1)) * (2 / (g + 1)) ** ((g + 1) / (g - 1)) * (1 - 1 / 1.8))
  return momentum + (1.8 ** -3.5 - ambientPressure / chamberPressure) * AREA_RATIO
}

/** A run-log assignment with every role, and no results or review rules of its own. */
export function rolesAssignment(extra: { results?: unknown[]; reviewRules?: unknown[] } = {}): Assignment {
  return AssignmentSchema.parse({
    tables: [
      {
        key: 'run',
        label: 'Run log',
        minRows: 10,
        columns: [
          { key: 't', label: 'Time', unit: 's', role: 'time' },
          { key: 'thrust', label: 'Thrust', unit: 'N', role: 'thrust' },
          { key: 'p_receiver', label: 'Receiver pressure', unit: 'kPa', pressure: 'gauge', role: 'receiver-pressure' },
          { key: 'p_chamber', label: 'Chamber pressure', unit: 'kPa', pressure: 'gauge', role: 'chamber-pressure' },
        ],
      },
    ],
    measurements: [
      { key: 'p_ambient', label: 'Barometer', unit: 'kPa', pressure: 'absolute', role: 'ambient-pressure' },
      { key: 'd_throat', label: 'Throat diameter', unit: 'mm', role: 'throat-diameter' },
      { key: 'd_exit', label: 'Exit diameter', unit: 'mm', role: 'exit-diameter' },
      { key: 'v_receiver', label: 'Receiver volume', unit: 'L', role: 'receiver-volume' },
    ],
    results: extra.results ?? [],
    reviewRules: extra.reviewRules ?? [],
  })
}

export interface LogOptions {
  /** Samples in all (0.01 s apart); the first and last `rest` are at rest. */
  samples?: number
  rest?: number
  /** Chamber pressure while flowing, Pa absolute. */
  chamberPressure?: number
  /** Thrust while flowing as a multiple of the ideal thrust at that chamber pressure. */
  thrustRatio?: number
  ambient?: number
}

/**
 * A clean run in SI as parseLog gives it (pressures gauge, in Pa): at rest for `rest` samples at
 * each end (thrust 0, chamber at ambient), then a plateau at `chamberPressure` with thrust
 * `thrustRatio` × ideal; the receiver is full (10 % above the plateau) before the run, 5 % above the
 * chamber during it, and empty (at ambient) after it.
 */
export function cleanLog(options: LogOptions = {}): SubmissionData {
  const samples = options.samples ?? 100
  const rest = options.rest ?? 10
  const p0 = options.chamberPressure ?? 1e6
  const pa = options.ambient ?? STANDARD_ATMOSPHERE
  const ratio = options.thrustRatio ?? 0.9
  const flowingThrust = ratio * idealThrustCoefficientMach2(p0, pa) * p0 * THROAT_AREA
  const t: number[] = []
  const thrust: number[] = []
  const chamber: number[] = []
  const receiver: number[] = []
  for (let i = 0; i < samples; i++) {
    const flowing = i >= rest && i < samples - rest
    t.push(i * 0.01)
    thrust.push(flowing ? flowingThrust : 0)
    chamber.push(flowing ? p0 - pa : 0)
    receiver.push(flowing ? 1.05 * p0 - pa : i < rest ? 1.1 * p0 - pa : 0)
  }
  return {
    tables: { run: { t, thrust, p_receiver: receiver, p_chamber: chamber } },
    measurements: { p_ambient: pa, d_throat: THROAT_DIAMETER, d_exit: EXIT_DIAMETER, v_receiver: 0.05 },
  }
}

/** The same data with one column replaced. */
export function withColumn(data: SubmissionData, key: string, values: number[]): SubmissionData {
  const run = data.tables.run ?? {}
  return { ...data, tables: { run: { ...run, [key]: values } } }
}

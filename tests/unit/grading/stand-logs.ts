/**
 * Generated stand logs for the unit-mistake and near-copy tests: a receiver blowing down through the
 * Mach-2 nozzle of fixtures.ts, logged at 100 Hz with a load-cell zero offset and Gaussian noise.
 * INVENTED TEST DATA. The truth of every log is written out here from closed forms (the chamber
 * pressure an exponential, the thrust a fixed fraction of the ideal thrust of eq. 3-30 in
 * fixtures.ts), never through the code under test.
 */
import { AssignmentSchema } from '../../../shared/modules/schema'
import type { Assignment } from '../../../shared/modules/schema'
import { EXIT_DIAMETER, THROAT_AREA, THROAT_DIAMETER, idealThrustCoefficientMach2 } from './fixtures'

/** Exact unit definitions (NIST SP 811): newtons per unit. */
export const NEWTONS_PER = { N: 1, kgf: 9.80665, gf: 0.00980665, lbf: 4.4482216152605 } as const
export type ForceUnit = keyof typeof NEWTONS_PER

/** Decimals the logger writes per force unit: a resolution near 1 mN in each. */
const DECIMALS: Readonly<Record<ForceUnit, number>> = { N: 3, kgf: 4, gf: 1, lbf: 4 }

export interface StandLogOptions {
  /** PRNG seed: another seed is another run (its own noise). */
  seed?: number
  /** Chamber pressure when the valve opens, Pa absolute. */
  startPressure?: number
  /** Time constant of the exponential blow-down, s. */
  tau?: number
  /** Barometric pressure, Pa. */
  ambient?: number
  /** Logged thrust as a fraction of the ideal. */
  efficiency?: number
  /** Load-cell zero, N. */
  offset?: number
  /** Load-cell noise (one standard deviation), N, and transducer noise, Pa. */
  noise?: number
  pressureNoise?: number
  /** The unit the load cell logs in. */
  forceUnit?: ForceUnit
  /** Header of the thrust column. */
  thrustHeader?: string
}

export interface StandLog {
  csv: string
  /** Header row. */
  headers: string[]
  /** Measurements in SI. */
  measurements: Record<string, number>
  /** The closed-form truth: times (s), thrust as logged converted to N, chamber pressure absolute (Pa). */
  truth: { t: number[]; thrustN: number[]; chamber: number[] }
  options: Required<StandLogOptions>
}

export const STEP = 0.01
/** Samples at rest before the valve opens, while it opens, flowing, and at rest after. */
export const REST = 100
export const OPENING = 5
export const FLOWING = 400
export const AFTER = 100

/** mulberry32, uniform in [0, 1). */
function seeded(seed: number): () => number {
  let a = seed >>> 0
  return () => {
    a = (a + 0x6d2b79f5) >>> 0
    let t = a
    t = Math.imul(t ^ (t >>> 15), t | 1)
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61)
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296
  }
}

/** Box–Muller: a standard normal variate per call. */
function gaussian(random: () => number): () => number {
  return () => Math.sqrt(-2 * Math.log(1 - random())) * Math.cos(2 * Math.PI * random())
}

/**
 * One run: at rest, the valve opening over 5 samples (chamber and thrust rising linearly), 4 s of
 * exponential blow-down p0 = p_start·e^(−t/τ) with thrust = efficiency × C_F(p0)·p0·At, then at
 * rest. The chamber stays above pa/0.5751 while flowing, so eq. 3-30 of fixtures.ts holds.
 */
export function standLog(options: StandLogOptions = {}): StandLog {
  const o: Required<StandLogOptions> = {
    seed: 1,
    startPressure: 9e5,
    tau: 6,
    ambient: 84e3,
    efficiency: 0.92,
    offset: 0.2,
    noise: 0.08,
    pressureNoise: 300,
    forceUnit: 'N',
    thrustHeader: `thrust [${options.forceUnit ?? 'N'}]`,
    ...options,
  }
  const noise = gaussian(seeded(o.seed))
  const per = NEWTONS_PER[o.forceUnit]
  const headers = ['t', o.thrustHeader, 'p_chamber (kPa)']
  const lines = [headers.join(',')]
  const truth = { t: [] as number[], thrustN: [] as number[], chamber: [] as number[] }
  const total = REST + OPENING + FLOWING + AFTER
  for (let i = 0; i < total; i++) {
    const t = i * STEP
    const k = i - REST
    let p0 = o.ambient
    let force = 0
    if (k >= 0 && k < OPENING + FLOWING) {
      const open = Math.min(1, (k + 1) / OPENING)
      const flowing = o.startPressure * Math.exp(-(k * STEP) / o.tau)
      p0 = o.ambient + open * (flowing - o.ambient)
      force = open * o.efficiency * idealThrustCoefficientMach2(flowing, o.ambient) * flowing * THROAT_AREA
    }
    const loggedForce = Number(((force + o.offset + o.noise * noise()) / per).toFixed(DECIMALS[o.forceUnit]))
    const loggedGaugeKPa = Number(((p0 - o.ambient + o.pressureNoise * noise()) / 1000).toFixed(1))
    const tText = t.toFixed(2)
    lines.push(`${tText},${loggedForce},${loggedGaugeKPa}`)
    truth.t.push(Number(tText))
    truth.thrustN.push(loggedForce * per)
    truth.chamber.push(loggedGaugeKPa * 1000 + o.ambient)
  }
  return {
    csv: `${lines.join('\n')}\n`,
    headers,
    measurements: { p_ambient: o.ambient, d_throat: THROAT_DIAMETER, d_exit: EXIT_DIAMETER },
    truth,
    options: o,
  }
}

/** The log's rows as cells (header first), for making edited copies. */
export function rowsOf(csv: string): string[][] {
  return csv
    .trim()
    .split('\n')
    .map((l) => l.split(','))
}

export function csvOf(rows: readonly (readonly string[])[]): string {
  return `${rows.map((r) => r.join(',')).join('\n')}\n`
}

/** A run-log assignment with a time column, the thrust and the chamber pressure (gauge, kPa), and the nozzle. */
export function standAssignment(): Assignment {
  return AssignmentSchema.parse({
    tables: [
      {
        key: 'run',
        label: 'Run log',
        minRows: 50,
        columns: [
          { key: 't', label: 'Time', unit: 's', role: 'time' },
          { key: 'thrust', label: 'Thrust', unit: 'N', role: 'thrust' },
          { key: 'p_chamber', label: 'Chamber pressure', unit: 'kPa', pressure: 'gauge', role: 'chamber-pressure' },
        ],
      },
    ],
    measurements: [
      { key: 'p_ambient', label: 'Barometer', unit: 'kPa', pressure: 'absolute', role: 'ambient-pressure' },
      { key: 'd_throat', label: 'Throat diameter', unit: 'mm', role: 'throat-diameter' },
      { key: 'd_exit', label: 'Exit diameter', unit: 'mm', role: 'exit-diameter' },
    ],
    results: [
      {
        key: 'impulse',
        label: 'Total impulse',
        unit: 'N*s',
        expected: 'totalImpulse(t, thrust)',
        tolerance: { relative: 0.03 },
        points: 1,
      },
    ],
  })
}

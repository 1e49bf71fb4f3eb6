/**
 * DEMO DATA — invented. Cold-flow run logs and lab reports for the eight demo lab groups, made by
 * our own model of a fictional test stand; the numbers are not measurements of anything.
 *
 * The model: the stand's air receiver blows down through the group's converging–diverging nozzle
 * (tankBlowdown, adiabatic, from the formula library); the chamber just upstream of the nozzle reads
 * a fixed fraction of the receiver pressure while the valve is open (feed-line loss), the thrust is
 * the ideal nozzle thrust at that chamber pressure (nozzleFlow) times a thrust efficiency. The logger
 * then adds what a real stand adds: a load-cell zero offset that creeps slowly over the log (drift),
 * a ring of the stand when the valve slams fully open (one sample well above the thrust, then a few
 * small swings), a chamber-transducer zero offset, Gaussian noise and its resolution. A seeded
 * generator makes every run the same on every machine.
 *
 * Each run comes with the group's measurements (in the demo module's units, rounded as read off
 * the instruments) and the results the group reports. The groups reduce their runs carefully — the
 * zero taken and removed, the window found from the tared thrust, the peak read past the ring — so
 * their results are the model's own values, worked out here in closed form from the noise-free
 * signals (not by the grading engine), with a small human error; one clear reporting mistake for
 * two groups, and three runs made wrong on purpose so the staff review queue has work (see
 * {@link DEMO_WRONG_RUNS}).
 *
 * Usage: `npx tsx scripts/demo/demo-runs.ts [outDir]` writes one CSV per group (for trying the
 * upload by hand; outDir defaults to isentrope-demo-runs in the system's temporary folder); the
 * seed imports {@link demoRuns}.
 */
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import path from 'node:path'
import { suggestMapping } from '../../shared/grading/csv'
import type { ColumnMapping, ColumnMappingEntry } from '../../shared/grading/csv'
import { parseModuleSource } from '../../shared/modules/front-matter'
import { valueToSI } from '../../shared/modules/quantities'
import type { Assignment, TableSpec } from '../../shared/modules/schema'
import { G0, NOZZLE_REGIMES, areaFromDiameter, nozzleFlow, tankBlowdown } from '../../shared/physics'
import { DEMO_STUDENTS } from './scenario'

/** The fictional stand of the demo course (demo data, invented). */
export const DEMO_STAND = {
  /** Receiver volume from its (fictional) plate, m³: 40 L. */
  receiverVolume: 0.04,
  /** Receiver charge before a run, gauge, Pa: about 8 bar gauge, varied a little per group. */
  chargeGauge: 800e3,
  /** Nozzle throat and exit diameters, m: 6 mm and 9 mm (area ratio 2.25). */
  throatDiameter: 0.006,
  exitDiameter: 0.009,
  /** Barometric pressure of the fictional high-altitude campus, Pa (about 1600 m). */
  ambient: 84e3,
  /** Discharge coefficient of the nozzle throat. */
  dischargeCoefficient: 0.97,
  /** Chamber-to-receiver pressure ratio while air flows (loss in the valve and feed line). */
  feedRatio: 0.93,
  /** Logged thrust as a fraction of the ideal nozzle thrust (divergence and friction losses). */
  thrustEfficiency: 0.92,
  /** Logger sampling rate, Hz. */
  sampleRate: 100,
  /** Logging before the valve opens and after the flow stops, s. */
  preRoll: 2,
  postRoll: 2,
  /** Time for the valve to open fully, s. */
  valveOpening: 0.25,
  /**
   * Load-cell zero offset, N (each group's lies in this range), and how fast it creeps, N/s (either
   * way, up to this rate: 0.004 N/s is 0.08 N over a 20 s log).
   */
  loadCellOffset: [0.15, 0.4],
  zeroDrift: 0.004,
  /**
   * Ring of the stand when the valve slams fully open: a damped oscillation of the load-cell force,
   * N (each group's amplitude lies in this range, about 10 % of the peak thrust), its frequency, Hz,
   * and decay time, s. At 100 Hz one sample carries almost all of it.
   */
  ringAmplitude: [2, 3],
  ringFrequency: 30,
  ringDecay: 0.012,
  /** Chamber-transducer zero offset, Pa (each group's lies within ± this). */
  chamberZero: 1500,
  /** Noise (one standard deviation) of the load cell, N, and of the pressure transducers, Pa. */
  thrustNoise: 0.03,
  pressureNoise: 300,
  gamma: 1.4,
  gasConstant: 287.05,
} as const

/** The demo lab groups, in scenario order: A1…A4, B1…B4. */
export const DEMO_GROUPS: readonly string[] = [...new Set(DEMO_STUDENTS.map((s) => s.labGroup))]

/** A run that is wrong on purpose, and the flags the grading engine must raise for it. */
export interface DemoWrongRun {
  group: string
  problem: string
  /** Flags gradeSubmission raises for this run; no others but those in `mayAlso`. */
  flags: readonly string[]
  /** Flags it may raise as well, depending on how a built-in check reads the data (see the run's reasons). */
  mayAlso?: readonly string[]
  /** The group whose file this one copies (the server's 'identical-file' flag, not the engine's). */
  copiesGroup?: string
}

/**
 * The runs made wrong on purpose. Reasons for each flag:
 * - B2 logged the chamber pressure gauge (as the stand's transducer reads) but declared it absolute,
 *   so at rest it reads about 0 where an absolute reading is near 84 kPa ('pressure-looks-gauge').
 *   The group reduced its data as it declared them (the gauge numbers taken as absolute), so its
 *   results match what the engine computes from the hand-in; the flag is what brings it to staff.
 *   At the peak the chamber reads about 700 kPa gauge; the ideal thrust for that reading taken as
 *   absolute is about 1/1.15 of the ideal at the true absolute pressure (reading plus 84 kPa), so
 *   the thrust, 0.92 of the true ideal, is about 0.92 × 1.15 = 1.06 times the ideal the engine
 *   computes: below the 10 % margin when the peak is read through the moving median (the module's
 *   rule), above it when a check reads the single largest sample, which the ring at valve opening
 *   lifts by about 10 % ('thrust-above-ideal' may then be raised too).
 * - A3 uploaded A1's log byte for byte; the server's sha256 comparison flags it ('identical-file').
 *   The data are a real run, so the engine raises nothing.
 * - B4's load-cell calibration factor is 1.6 times too large: the peak thrust is 1.6 × 0.92 = 1.47
 *   times the ideal, above the 10 % margin of the built-in check and of the module's own rule. The
 *   group reduced its (wrongly scaled) log carefully, so its results match the engine's.
 */
export const DEMO_WRONG_RUNS: readonly DemoWrongRun[] = [
  {
    group: 'B2',
    problem: 'chamber pressure logged gauge but declared absolute',
    flags: ['pressure-looks-gauge'],
    mayAlso: ['thrust-above-ideal'],
  },
  { group: 'A3', problem: "log copied byte for byte from group A1's", flags: [], copiesGroup: 'A1' },
  {
    group: 'B4',
    problem: 'load-cell calibration 1.6 times too large: thrust above the ideal',
    // The built-in check and the module's rule of the same name are one cause: one flag.
    flags: ['thrust-above-ideal'],
  },
]

/**
 * Load-cell calibration factor of a group's cold-flow log when it is not 1 (B4's, see
 * {@link DEMO_WRONG_RUNS}); the hot-fire demo divides it out of the cold-flow specific impulse the
 * group carries over, as the group would once a teaching assistant had found it.
 */
export const DEMO_COLD_FLOW_THRUST_SCALE: Readonly<Record<string, number>> = { B4: 1.6 }

/** Reporting mistakes of groups whose data are fine: the named results fall outside their tolerance. */
export const DEMO_REPORTING_MISTAKES: readonly { group: string; results: readonly string[]; mistake: string }[] = [
  {
    group: 'A2',
    results: ['air_mass', 'isp'],
    mistake:
      'used 0 kPa gauge for the final receiver pressure (the reading straight after the run, still cold) instead of the warm reading they recorded',
  },
  { group: 'B1', results: ['peak_thrust'], mistake: 'reported the peak thrust in kgf where the form asks for N' },
]

export interface DemoRun {
  group: string
  /** The run log as the logger wrote it: CSV text with the module's column keys as headers. */
  csv: string
  /** How the group maps the file's columns (units as logged, gauge/absolute as they declared it). */
  mapping: ColumnMapping
  /** Measurements in the module's units (kPa, mm, L, degC), pressures gauge where the module says so. */
  measurements: Record<string, number>
  /** The results the group reports, in each result's unit. */
  reported: Record<string, number>
}

/** mulberry32: a small seeded PRNG, uniform in [0, 1). */
export function seeded(seed: number): () => number {
  let a = seed >>> 0
  return () => {
    a = (a + 0x6d2b79f5) >>> 0
    let t = a
    t = Math.imul(t ^ (t >>> 15), t | 1)
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61)
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296
  }
}

/** Standard normal deviates by the Box–Muller transform. */
export function gaussian(random: () => number): () => number {
  return () => {
    const u = 1 - random()
    return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * random())
  }
}

const CONTENT = path.resolve(import.meta.dirname, '..', '..', 'content')

/** The demo cold-flow module's assignment, read from content/. */
export function coldFlowAssignment(): Assignment {
  return contentAssignment('02-cold-flow-characterisation.md')
}

/** The assignment of a module in content/ (the demo's own sheets); throws if it does not parse or has none. */
export function contentAssignment(file: string): Assignment {
  const parsed = parseModuleSource(readFileSync(path.join(CONTENT, file), 'utf8'), file)
  if (!parsed.ok) throw new Error(`content/${file}: ${parsed.errors.map((e) => e.message).join('; ')}`)
  if (!parsed.frontMatter.assignment) throw new Error(`content/${file} has no assignment`)
  return parsed.frontMatter.assignment
}

interface Conditions {
  ambient: number
  roomTemperature: number
  chargeGauge: number
  thrustScale: number
  /** Load-cell zero at the start of the log, N, and its creep, N/s. */
  zeroOffset: number
  zeroDrift: number
  /** Amplitude of the ring at valve opening, N. */
  ringAmplitude: number
  /** Chamber-transducer zero offset, Pa. */
  chamberZero: number
}

/** What the logger would have written without zero, drift, ring, noise or rounding: the model itself. */
interface TrueRun {
  /** Sample times, s. */
  time: number[]
  /** Force on the load cell from the nozzle, N, times the group's calibration error (1 when right). */
  thrust: number[]
  /** Chamber pressure, gauge, Pa. */
  chamberGauge: number[]
  /** The chamber transducer's zero offset, Pa (in the log, not in chamberGauge). */
  chamberZero: number
}

interface SimulatedRun {
  csv: string
  /** Receiver pressure, gauge, Pa, after the run once back at room temperature. */
  finalGauge: number
  truth: TrueRun
}

export function linearAt(xs: readonly number[], ys: readonly number[], x: number): number {
  if (x <= (xs[0] as number)) return ys[0] as number
  const last = xs.length - 1
  if (x >= (xs[last] as number)) return ys[last] as number
  let lo = 0
  let hi = last
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1
    if ((xs[mid] as number) <= x) lo = mid
    else hi = mid
  }
  const x0 = xs[lo] as number
  const x1 = xs[hi] as number
  return (ys[lo] as number) + (((ys[hi] as number) - (ys[lo] as number)) * (x - x0)) / (x1 - x0)
}

/** One run of the model, written as the logger writes it (at the stand's 100 Hz unless told). */
function simulate(c: Conditions, noise: () => number, sampleRate: number = DEMO_STAND.sampleRate): SimulatedRun {
  const s = DEMO_STAND
  const throatArea = areaFromDiameter(s.throatDiameter)
  const exitArea = areaFromDiameter(s.exitDiameter)
  const initialPressure = c.chargeGauge + c.ambient
  const step = 1 / sampleRate
  // Enough decimals for the time stamps to tell samples apart: 2 at 100 Hz, 4 at 2.5 kHz.
  const timeDecimals = Math.max(2, Math.ceil(Math.log10(sampleRate) - 1e-9))
  // The receiver empties through the throat; flow is choked at the chamber pressure, a fixed
  // fraction of the receiver's, so the receiver sees a discharge coefficient Cd × feedRatio. With the
  // nozzle's exit area the blow-down stays choked as long as the converging–diverging nozzle does
  // (up to its choke limit, not the converging nozzle's 0.528), then flows unchoked through it.
  const tank = tankBlowdown({
    volume: s.receiverVolume,
    initialPressure,
    initialTemperature: c.roomTemperature,
    ambientPressure: c.ambient,
    throatArea,
    exitArea,
    dischargeCoefficient: s.dischargeCoefficient * s.feedRatio,
    gamma: s.gamma,
    gasConstant: s.gasConstant,
    process: 'adiabatic',
    duration: 120,
    step,
  })
  const flowEnd = tank.time[tank.time.length - 1] as number
  const endTemperature = tank.temperature[tank.temperature.length - 1] as number
  const samples = Math.round((s.preRoll + flowEnd + s.postRoll) * sampleRate)
  const lines = ['t,thrust,p_receiver,p_chamber']
  const truth: TrueRun = { time: [], thrust: [], chamberGauge: [], chamberZero: c.chamberZero }
  for (let i = 0; i <= samples; i++) {
    const t = i * step
    const sinceOpen = t - s.preRoll
    const receiver = sinceOpen <= 0 ? initialPressure : linearAt(tank.time, tank.pressure, sinceOpen)
    const temperature = sinceOpen <= 0 ? c.roomTemperature : linearAt(tank.time, tank.temperature, sinceOpen)
    // Valve opening: smoothstep from closed to open over valveOpening seconds; closed once the flow stops.
    const x = Math.min(1, Math.max(0, sinceOpen / s.valveOpening))
    const open = sinceOpen > flowEnd ? 0 : x * x * (3 - 2 * x)
    const chamber = c.ambient + open * Math.max(0, s.feedRatio * receiver - c.ambient)
    let thrust = 0
    if (chamber > c.ambient * 1.0001) {
      thrust =
        s.thrustEfficiency *
        nozzleFlow({
          chamberPressure: chamber,
          chamberTemperature: temperature,
          ambientPressure: c.ambient,
          throatArea,
          exitArea,
          gamma: s.gamma,
          gasConstant: s.gasConstant,
        }).thrust
    }
    // The stand rings when the valve reaches its stop: a damped oscillation of the force the load
    // cell feels, starting at full opening.
    const sinceSlam = sinceOpen - s.valveOpening
    const ring =
      sinceSlam >= 0
        ? c.ringAmplitude * Math.exp(-sinceSlam / s.ringDecay) * Math.cos(2 * Math.PI * s.ringFrequency * sinceSlam)
        : 0
    const zero = c.zeroOffset + c.zeroDrift * t
    const loggedThrust = c.thrustScale * (thrust + ring) + zero + s.thrustNoise * noise()
    const loggedReceiver = (receiver - c.ambient + s.pressureNoise * noise()) / 1000
    const loggedChamber = (chamber - c.ambient + c.chamberZero + s.pressureNoise * noise()) / 1000
    // The logger's resolution: one sample period, 1 mN, 0.1 kPa.
    lines.push(
      `${t.toFixed(timeDecimals)},${loggedThrust.toFixed(3)},${loggedReceiver.toFixed(1)},${loggedChamber.toFixed(1)}`,
    )
    truth.time.push(Number(t.toFixed(timeDecimals)))
    truth.thrust.push(c.thrustScale * thrust)
    truth.chamberGauge.push(chamber - c.ambient)
  }
  // After the run the valve is closed and the cold air left in the receiver warms back up to room
  // temperature at constant volume: p = p_ambient · T_room / T_end.
  const finalGauge = (c.ambient * c.roomTemperature) / endTemperature - c.ambient
  return { csv: `${lines.join('\n')}\n`, finalGauge, truth }
}

/**
 * A single demo run logged at a higher rate (for the grading benchmark: 50 000 rows is a 2.5 kHz
 * logger over one blow-down), with the measurements that go with it. Demo data, invented.
 *
 * @param sampleRate - logger rate, Hz
 * @param seed - PRNG seed
 * @returns the CSV (the module's column keys as headers) and the measurements in the module's units
 */
export function demoLog(sampleRate: number, seed = 7): { csv: string; measurements: Record<string, number> } {
  const random = seeded(seed)
  const conditions: Conditions = {
    ambient: 84_000,
    roomTemperature: 293.15,
    chargeGauge: 800_000,
    thrustScale: 1,
    zeroOffset: 0.25,
    zeroDrift: 0.002,
    ringAmplitude: 3,
    chamberZero: 800,
  }
  const sim = simulate(conditions, gaussian(random), sampleRate)
  return {
    csv: sim.csv,
    measurements: {
      p_ambient: 84,
      d_throat: 1000 * DEMO_STAND.throatDiameter,
      d_exit: 1000 * DEMO_STAND.exitDiameter,
      v_receiver: 1000 * DEMO_STAND.receiverVolume,
      p_initial: 800,
      p_final: Math.round(sim.finalGauge / 1000),
      t_air: 20,
    },
  }
}

/** Rounds to a number of significant figures, as a person copies a result off a calculator. */
export function significant(x: number, figures: number): number {
  return x === 0 ? 0 : Number(x.toPrecision(figures))
}

function tableOf(assignment: Assignment): TableSpec {
  const table = assignment.tables[0]
  if (!table) throw new Error('the cold-flow assignment has no table')
  return table
}

/** Trapezoid integral of x over [a, b], with x interpolated linearly at a and b. */
export function integralBetween(t: readonly number[], x: readonly number[], a: number, b: number): number {
  let sum = 0
  for (let i = 1; i < t.length; i++) {
    const t0 = Math.max(t[i - 1] as number, a)
    const t1 = Math.min(t[i] as number, b)
    if (!(t1 > t0)) continue
    const at = (u: number) => linearAt(t, x, u)
    sum += 0.5 * (t1 - t0) * (at(t0) + at(t1))
  }
  return sum
}

/** Where x first rises through `level` and last falls through it, interpolated between samples. */
export function crossingsOf(t: readonly number[], x: readonly number[], level: number): { start: number; end: number } {
  const first = x.findIndex((v) => v >= level)
  let last = x.length - 1
  while ((x[last] as number) < level) last--
  const between = (i: number, j: number) =>
    (t[i] as number) +
    (((t[j] as number) - (t[i] as number)) * (level - (x[i] as number))) / ((x[j] as number) - (x[i] as number))
  return {
    start: first === 0 ? (t[0] as number) : between(first - 1, first),
    end: last === x.length - 1 ? (t[last] as number) : between(last, last + 1),
  }
}

/**
 * A group's careful reduction, worked out on the model's noise-free signals: what the group's
 * results are when the zero is taken out exactly, the ring is read past and the noise averages
 * away. Each result of the cold-flow module as its text defines it (content/02), in its unit. The
 * chamber pressure is made absolute as the group declared it: a gauge reading plus the barometer
 * (its transducer zero taken), or, declared absolute, the logged numbers as they are.
 */
function carefulResults(
  truth: TrueRun,
  m: Record<string, number>,
  chamberRead: 'gauge' | 'absolute',
): Record<string, number> {
  const s = DEMO_STAND
  const { time, thrust } = truth
  const ambient = 1000 * (m.p_ambient as number)
  const throatArea = areaFromDiameter((m.d_throat as number) / 1000)
  const exitArea = areaFromDiameter((m.d_exit as number) / 1000)
  const roomTemperature = 273.15 + (m.t_air as number)
  const chamber = truth.chamberGauge.map((p) => (chamberRead === 'gauge' ? p + ambient : p + truth.chamberZero))
  const peak = Math.max(...thrust)
  const { start, end } = crossingsOf(time, thrust, 0.05 * peak)
  const impulse = integralBetween(time, thrust, time[0] as number, time[time.length - 1] as number)
  const windowImpulse = integralBetween(time, thrust, start, end)
  const airMass =
    (1000 * ((m.p_initial as number) - (m.p_final as number)) * ((m.v_receiver as number) / 1000)) /
    (s.gasConstant * roomTemperature)
  const flow = nozzleFlow({
    chamberPressure: Math.max(...chamber),
    chamberTemperature: roomTemperature,
    ambientPressure: ambient,
    throatArea,
    exitArea,
    gamma: s.gamma,
    gasConstant: s.gasConstant,
  })
  return {
    impulse,
    peak_thrust: peak,
    burn_time: end - start,
    mean_thrust: windowImpulse / (end - start),
    cf_mean: windowImpulse / (throatArea * integralBetween(time, chamber, start, end)),
    air_mass: airMass,
    isp: impulse / (airMass * G0),
    exit_mach: flow.exitMach,
    regime: NOZZLE_REGIMES.indexOf(flow.regime) + 1,
  }
}

/**
 * The demo runs, one per lab group (A1…A4, B1…B4), always the same.
 *
 * @param assignment - the cold-flow assignment (read from content/ when left out)
 */
export function demoRuns(assignment: Assignment = coldFlowAssignment()): DemoRun[] {
  const random = seeded(0x15e47a0e)
  const noise = gaussian(random)
  const table = tableOf(assignment)
  const s = DEMO_STAND
  const uniform = (lo: number, hi: number) => lo + (hi - lo) * random()
  const runs: DemoRun[] = []
  const byGroup = new Map<string, { csv: string; measurements: Record<string, number>; truth: TrueRun }>()

  for (const group of DEMO_GROUPS) {
    const wrong = DEMO_WRONG_RUNS.find((w) => w.group === group)
    const conditions: Conditions = {
      ambient: (1000 * Math.round(10 * uniform(83.4, 84.8))) / 10,
      roomTemperature: 273.15 + uniform(16, 22),
      chargeGauge: 1000 * Math.round(uniform(780, 820)),
      thrustScale: DEMO_COLD_FLOW_THRUST_SCALE[group] ?? 1,
      zeroOffset: uniform(s.loadCellOffset[0], s.loadCellOffset[1]),
      zeroDrift: uniform(-s.zeroDrift, s.zeroDrift),
      ringAmplitude: uniform(s.ringAmplitude[0], s.ringAmplitude[1]),
      chamberZero: uniform(-s.chamberZero, s.chamberZero),
    }
    const sim = simulate(conditions, noise)
    let csv = sim.csv
    let truth = sim.truth
    const measurements: Record<string, number> = {
      p_ambient: conditions.ambient / 1000,
      // Pin-gauge readings: the true size within ±0.01 mm.
      d_throat: Number((1000 * s.throatDiameter + uniform(-0.01, 0.01)).toFixed(2)),
      d_exit: Number((1000 * s.exitDiameter + uniform(-0.01, 0.01)).toFixed(2)),
      v_receiver: 1000 * s.receiverVolume,
      p_initial: conditions.chargeGauge / 1000,
      p_final: Math.round(sim.finalGauge / 1000),
      t_air: Number((conditions.roomTemperature - 273.15).toFixed(1)),
    }
    if (wrong?.copiesGroup) {
      const original = byGroup.get(wrong.copiesGroup)
      if (!original) throw new Error(`demo group ${group} copies ${wrong.copiesGroup}, which comes later`)
      // The copied file, and the receiver readings that go with it; their own barometer and thermometer.
      csv = original.csv
      truth = original.truth
      measurements.p_initial = original.measurements.p_initial as number
      measurements.p_final = original.measurements.p_final as number
    }
    byGroup.set(group, { csv, measurements, truth })

    // The headers are the module's column keys, so the suggested mapping is the right one (kPa
    // gauge for both pressures); B2 changes the chamber pressure to absolute.
    const asLogged = suggestMapping(csv.slice(0, csv.indexOf('\n')).split(','), table)
    const mapping: Record<string, ColumnMappingEntry> = { ...asLogged }
    if (group === 'B2' && mapping.p_chamber) mapping.p_chamber = { ...mapping.p_chamber, pressure: 'absolute' }

    const careful = carefulResults(
      truth,
      measurements,
      mapping.p_chamber?.pressure === 'absolute' ? 'absolute' : 'gauge',
    )
    const reported: Record<string, number> = {}
    for (const r of assignment.results) {
      const value = careful[r.key]
      if (value === undefined) throw new Error(`demo run ${group}: the careful reduction has no value for ${r.key}`)
      // Small human error: within 30 % of the tolerance, then 4 significant figures.
      const relative = r.tolerance.relative ?? 0
      reported[r.key] = relative === 0 ? value : significant(value * (1 + 0.3 * relative * uniform(-1, 1)), 4)
    }
    if (group === 'A2') {
      // With the cold reading of 0 kPa gauge as the final pressure, more air seems to have left.
      const p0 = valueToSI(measurements.p_initial as number, 'kPa')
      const airMass = (p0 * s.receiverVolume) / (s.gasConstant * (273.15 + (measurements.t_air as number)))
      reported.air_mass = significant(airMass, 4)
      reported.isp = significant((reported.impulse as number) / (airMass * G0), 4)
    }
    if (group === 'B1') reported.peak_thrust = significant((reported.peak_thrust as number) / G0, 4)
    runs.push({ group, csv, mapping, measurements, reported })
  }
  return runs
}

// `npx tsx scripts/demo/demo-runs.ts [outDir]`: write the logs for trying the upload by hand.
if (process.argv[1] && path.resolve(process.argv[1]) === path.resolve(import.meta.filename)) {
  const outDir = path.resolve(process.argv[2] ?? path.join(tmpdir(), 'isentrope-demo-runs'))
  mkdirSync(outDir, { recursive: true })
  for (const run of demoRuns()) {
    const file = path.join(outDir, `cold-flow-${run.group}.csv`)
    writeFileSync(file, run.csv)
    console.log(`${file}  ${run.csv.split('\n').length - 2} rows  reported ${JSON.stringify(run.reported)}`)
  }
}

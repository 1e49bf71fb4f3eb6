/**
 * DEMO DATA — invented. Hot-fire run logs and lab reports for the demo lab groups, made by our own
 * model of the fictional test stand of demo-runs.ts burning gaseous propane with the receiver's air;
 * the numbers are not measurements of anything.
 *
 * The model: the combustor burns the air with propane metered at a fixed equivalence ratio (each
 * group's lies in {@link HOT_FIRE_STAND}.equivalenceRatio). The equilibrium flame of that mixture at
 * the run's middle chamber pressure (`combustion`, shared/thermo) gives the theoretical c*, and the
 * group's combustor reaches a fraction of it (its c* efficiency, also drawn per group). The throat
 * then passes ṁ = p0·At / c*, of which the fraction MR/(1 + MR) is air from the receiver: the
 * receiver blows down (tankBlowdown, isothermal: a slow run whose walls keep the air at room
 * temperature) as through a nozzle of discharge coefficient
 * Cd = (p0/p_receiver) · MR/(1 + MR) · c*_air / c*_hot, c*_air = √(R·T)/Γ(1.4) being cold air's. The
 * operator closes air and fuel together when the receiver is down to {@link HOT_FIRE_STAND}.closeGauge.
 * The chamber reads a fixed fraction of the receiver while the valves are open, as in cold flow; the
 * thrust is the ideal nozzle thrust of the hot gas (the flame's frozen γ and molar mass) at that
 * chamber pressure times the stand's thrust efficiency. The logger adds the load-cell zero and its
 * creep, the stand's ring at full opening, the chamber-transducer zero, noise and resolution, as in
 * the cold-flow demo.
 *
 * Each group reports what a careful reduction of the noise-free signals gives (the module's own
 * definitions, worked out here in closed form, not by the grading engine), with a small human
 * error. Three runs are wrong on purpose, for the staff review queue: see {@link HOT_FIRE_WRONG_RUNS}.
 *
 * Usage: `npx tsx scripts/demo/hot-fire-runs.ts [outDir]` writes one CSV per group; the seed imports
 * {@link hotFireRuns}.
 */
import { mkdirSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import path from 'node:path'
import { suggestMapping } from '../../shared/grading/csv'
import type { Assignment } from '../../shared/modules/schema'
import { G0, areaFromDiameter, nozzleFlow, tankBlowdown } from '../../shared/physics'
import { combustion, equivalenceRatioFromMixtureRatio, mixtureRatioFromEquivalenceRatio } from '../../shared/thermo'
import {
  DEMO_COLD_FLOW_THRUST_SCALE,
  DEMO_GROUPS,
  DEMO_STAND,
  contentAssignment,
  crossingsOf,
  demoRuns,
  gaussian,
  integralBetween,
  linearAt,
  seeded,
  significant,
} from './demo-runs'
import type { DemoRun, DemoWrongRun } from './demo-runs'

/** Molar gas constant, J/(mol·K) (CODATA 2018, exact). */
const MOLAR_GAS_CONSTANT = 8.314462618

/** The hot-fire set-up of the fictional demo stand (demo data, invented). */
export const HOT_FIRE_STAND = {
  fuel: 'propane',
  /** Receiver pressure, gauge, Pa, at which the operator closes air and fuel. */
  closeGauge: 200e3,
  /** Equivalence ratio the fuel regulator is set to; each group's lies in this range. */
  equivalenceRatio: [0.7, 0.95],
  /**
   * c* efficiency of the small combustor; each group's lies in this range. A short, small air-fed
   * combustor loses much to its walls and to mixing, so this is well below 1 (a model choice, chosen
   * so the hot specific impulse lands near the 60 s such stands are said to reach, common practice).
   */
  cstarEfficiency: [0.62, 0.76],
  /** Fuel bottle mass before the run, g; each group's lies in this range. */
  bottleMass: [850, 1150],
  /**
   * A hard start (group A4): the chamber pressure jumps at ignition (full opening) by this fraction
   * of the receiver pressure and falls back with this time constant, s.
   */
  hardStartRise: 0.25,
  hardStartDecay: 0.04,
  /** B1 typed the volume of the stand's smaller receiver, L, for the 40 L one it used. */
  wrongVolume: 20,
  /**
   * B4 ran at this equivalence ratio, and the frost and condensate on its cold bottle at the second
   * weighing came to this fraction of the fuel it had burnt (about 7 g).
   */
  frostGroupEquivalenceRatio: 0.85,
  frostFraction: 0.45,
} as const

/**
 * The runs wrong on purpose, and the flags the grading engine must raise for each:
 * - A4: a hard start. The chamber pressure jumps about 18 % above the receiver pressure for a few
 *   samples at ignition: the module's `hard_start` rule and the built-in chamber-above-receiver check
 *   (which allows ±5 kPa for each transducer) both see it. The peak thrust is read through the
 *   5-sample moving median, which the three or four spiking samples barely move.
 * - B1: typed 20 L for the 40 L receiver, so the air mass is half the true one and the c* worked
 *   out from the data about twice the true one (the mixture worked out moves richer too): a c*
 *   efficiency well above 1 ('cstar_above_theory').
 * - B4: weighed the cold bottle after the run with frost and condensate on it, so the fuel used comes
 *   out 0.55 of the true mass: φ 0.85 burnt, φ 0.47 worked out. The mixture worked out from the
 *   masses lies lean of propane's flammable range ('outside_flammable_range'). Its equilibrium c* is
 *   lower than that of the mixture that burned, so the c* efficiency worked out comes out higher than
 *   the combustor's, though still below 1.
 */
export const HOT_FIRE_WRONG_RUNS: readonly DemoWrongRun[] = [
  {
    group: 'A4',
    problem: 'hard start: chamber pressure spike above the receiver at ignition',
    flags: ['rule:hard_start', 'chamber-above-receiver'],
  },
  {
    group: 'B1',
    problem: 'receiver volume typed as 20 L for the 40 L receiver: c* efficiency above 1',
    flags: ['rule:cstar_above_theory'],
  },
  {
    group: 'B4',
    problem: 'bottle weighed with frost on it after the run: fuel mass too small, mixture outside the flammable range',
    flags: ['rule:outside_flammable_range'],
  },
]

/** The demo hot-fire module's assignment, read from content/. */
export function hotFireAssignment(): Assignment {
  return contentAssignment('03-hot-fire.md')
}

interface HotConditions {
  ambient: number
  roomTemperature: number
  chargeGauge: number
  equivalenceRatio: number
  cstarEfficiency: number
  zeroOffset: number
  zeroDrift: number
  ringAmplitude: number
  chamberZero: number
  hardStart: boolean
}

/** The model's noise-free signals, and what it says about the run. */
interface HotTruth {
  time: number[]
  /** Thrust on the load cell, N. */
  thrust: number[]
  /** Chamber pressure, gauge, Pa. */
  chamberGauge: number[]
  /** Receiver pressure, gauge, Pa, when the valves closed (and after: the receiver stays at room temperature). */
  closeGauge: number
  /** Mass of propane burnt, kg. */
  fuelMass: number
}

/** Γ(γ) = √γ·(2/(γ+1))^((γ+1)/(2(γ−1))), the choked-flow function (Sutton & Biblarz). */
function vandenkerckhove(gamma: number): number {
  return Math.sqrt(gamma) * (2 / (gamma + 1)) ** ((gamma + 1) / (2 * (gamma - 1)))
}

function simulateHot(c: HotConditions, noise: () => number): { csv: string; truth: HotTruth } {
  const s = DEMO_STAND
  const h = HOT_FIRE_STAND
  const throatArea = areaFromDiameter(s.throatDiameter)
  const exitArea = areaFromDiameter(s.exitDiameter)
  const initialPressure = c.chargeGauge + c.ambient
  const closePressure = h.closeGauge + c.ambient
  const step = 1 / s.sampleRate
  // The flame at the middle of the run's chamber pressures.
  const flame = combustion({
    fuel: h.fuel,
    equivalenceRatio: c.equivalenceRatio,
    pressure: (s.feedRatio * (initialPressure + closePressure)) / 2,
    reactantTemperature: c.roomTemperature,
  })
  const cstarHot = c.cstarEfficiency * flame.characteristicVelocity
  const mixtureRatio = mixtureRatioFromEquivalenceRatio(h.fuel, c.equivalenceRatio)
  const cstarAir = Math.sqrt(s.gasConstant * c.roomTemperature) / vandenkerckhove(s.gamma)
  const receiverCd = s.feedRatio * (mixtureRatio / (1 + mixtureRatio)) * (cstarAir / cstarHot)
  const tank = tankBlowdown({
    volume: s.receiverVolume,
    initialPressure,
    initialTemperature: c.roomTemperature,
    ambientPressure: c.ambient,
    throatArea,
    dischargeCoefficient: receiverCd,
    gamma: s.gamma,
    gasConstant: s.gasConstant,
    process: 'isothermal',
    duration: 120,
    step,
  })
  const closing = tank.pressure.findIndex((p) => p <= closePressure)
  if (closing < 1) throw new Error('hot-fire demo: the receiver never reaches the closing pressure')
  const closeAt = tank.time[closing] as number
  const receiverClosed = tank.pressure[closing] as number
  const hotGas = {
    gamma: flame.gamma,
    gasConstant: MOLAR_GAS_CONSTANT / flame.molarMass,
    // The temperature that gives the combustor's c* with the flame's γ and M.
    temperature: flame.temperature * c.cstarEfficiency ** 2,
  }
  const samples = Math.round((s.preRoll + closeAt + s.valveOpening + s.postRoll) * s.sampleRate)
  const lines = ['t,thrust,p_receiver,p_chamber']
  const truth: HotTruth = {
    time: [],
    thrust: [],
    chamberGauge: [],
    closeGauge: receiverClosed - c.ambient,
    fuelMass:
      ((initialPressure - receiverClosed) * s.receiverVolume) / (s.gasConstant * c.roomTemperature) / mixtureRatio,
  }
  const smoothstep = (x: number) => {
    const u = Math.min(1, Math.max(0, x))
    return u * u * (3 - 2 * u)
  }
  for (let i = 0; i <= samples; i++) {
    const t = i * step
    const sinceOpen = t - s.preRoll
    const receiver =
      sinceOpen <= 0
        ? initialPressure
        : sinceOpen >= closeAt
          ? receiverClosed
          : linearAt(tank.time, tank.pressure, sinceOpen)
    // Air and fuel valves open together over valveOpening and close together once the receiver is down.
    const open = smoothstep(sinceOpen / s.valveOpening) * (1 - smoothstep((sinceOpen - closeAt) / s.valveOpening))
    const sinceIgnition = sinceOpen - s.valveOpening
    const spike =
      c.hardStart && sinceIgnition >= 0 ? h.hardStartRise * receiver * Math.exp(-sinceIgnition / h.hardStartDecay) : 0
    const chamber = c.ambient + open * Math.max(0, s.feedRatio * receiver - c.ambient) + spike
    let thrust = 0
    if (chamber > c.ambient * 1.0001) {
      thrust =
        s.thrustEfficiency *
        nozzleFlow({
          chamberPressure: chamber,
          chamberTemperature: hotGas.temperature,
          ambientPressure: c.ambient,
          throatArea,
          exitArea,
          gamma: hotGas.gamma,
          gasConstant: hotGas.gasConstant,
        }).thrust
    }
    const ring =
      sinceIgnition >= 0
        ? c.ringAmplitude *
          Math.exp(-sinceIgnition / s.ringDecay) *
          Math.cos(2 * Math.PI * s.ringFrequency * sinceIgnition)
        : 0
    const zero = c.zeroOffset + c.zeroDrift * t
    const loggedThrust = thrust + ring + zero + s.thrustNoise * noise()
    const loggedReceiver = (receiver - c.ambient + s.pressureNoise * noise()) / 1000
    const loggedChamber = (chamber - c.ambient + c.chamberZero + s.pressureNoise * noise()) / 1000
    lines.push(`${t.toFixed(2)},${loggedThrust.toFixed(3)},${loggedReceiver.toFixed(1)},${loggedChamber.toFixed(1)}`)
    truth.time.push(Number(t.toFixed(2)))
    truth.thrust.push(thrust)
    truth.chamberGauge.push(chamber - c.ambient)
  }
  return { csv: `${lines.join('\n')}\n`, truth }
}

/**
 * A group's careful reduction of the noise-free signals, each result of the hot-fire module as its
 * text defines it (content/03), in its unit, from the measurements as the group typed them.
 */
function carefulHotResults(truth: HotTruth, m: Record<string, number>): Record<string, number> {
  const { time, thrust } = truth
  const ambient = 1000 * (m.p_ambient as number)
  const throatArea = areaFromDiameter((m.d_throat as number) / 1000)
  const roomTemperature = 273.15 + (m.t_air as number)
  const chamber = truth.chamberGauge.map((p) => p + ambient)
  const peakOf = (f: readonly number[]) => {
    // The centred 5-sample moving median's largest value.
    let peak = -Infinity
    for (let i = 2; i < f.length - 2; i++) peak = Math.max(peak, [...f.slice(i - 2, i + 3)].sort((a, b) => a - b)[2]!)
    return peak
  }
  const peak = peakOf(thrust)
  const { start, end } = crossingsOf(time, thrust, 0.05 * peak)
  const impulse = integralBetween(time, thrust, time[0] as number, time[time.length - 1] as number)
  const windowImpulse = integralBetween(time, thrust, start, end)
  const chamberIntegral = integralBetween(time, chamber, start, end)
  const airMass =
    (1000 * ((m.p_initial as number) - (m.p_final as number)) * ((m.v_receiver as number) / 1000)) /
    (DEMO_STAND.gasConstant * roomTemperature)
  const fuelMass = ((m.m_bottle_before as number) - (m.m_bottle_after as number)) / 1000
  const mixtureRatio = airMass / fuelMass
  const phi = equivalenceRatioFromMixtureRatio(HOT_FIRE_STAND.fuel, mixtureRatio)
  const flame = combustion({
    fuel: HOT_FIRE_STAND.fuel,
    equivalenceRatio: phi,
    pressure: chamberIntegral / (end - start),
    reactantTemperature: roomTemperature,
  })
  const cstar = (throatArea * chamberIntegral) / (airMass + fuelMass)
  const ispHot = impulse / ((airMass + fuelMass) * G0)
  return {
    impulse,
    peak_thrust: peak,
    burn_time: end - start,
    mean_thrust: windowImpulse / (end - start),
    cf: windowImpulse / (throatArea * chamberIntegral),
    air_mass: airMass,
    fuel_mass: 1000 * fuelMass,
    mixture_ratio: mixtureRatio,
    equivalence_ratio: phi,
    cstar,
    t_flame: flame.temperature,
    cstar_theory: flame.characteristicVelocity,
    cstar_efficiency: cstar / flame.characteristicVelocity,
    isp_hot: ispHot,
    isp_ratio: ispHot / (m.isp_cold as number),
    isp_ratio_estimate: Math.sqrt(flame.temperature / roomTemperature),
  }
}

/**
 * The demo hot-fire runs, one per lab group (A1…A4, B1…B4), always the same.
 *
 * @param assignment - the hot-fire assignment (read from content/ when left out)
 * @param coldFlow - the cold-flow demo runs, whose specific impulse each group carries over
 */
export function hotFireRuns(assignment: Assignment = hotFireAssignment(), coldFlow: DemoRun[] = demoRuns()): DemoRun[] {
  const random = seeded(0x4f7e_c0de)
  const noise = gaussian(random)
  const table = assignment.tables[0]
  if (!table) throw new Error('the hot-fire assignment has no table')
  const s = DEMO_STAND
  const h = HOT_FIRE_STAND
  const uniform = (lo: number, hi: number) => lo + (hi - lo) * random()
  const runs: DemoRun[] = []
  for (const group of DEMO_GROUPS) {
    const conditions: HotConditions = {
      ambient: (1000 * Math.round(10 * uniform(83.4, 84.8))) / 10,
      roomTemperature: 273.15 + uniform(16, 22),
      chargeGauge: 1000 * Math.round(uniform(780, 820)),
      equivalenceRatio:
        group === 'B4' ? h.frostGroupEquivalenceRatio : uniform(h.equivalenceRatio[0], h.equivalenceRatio[1]),
      cstarEfficiency: uniform(h.cstarEfficiency[0], h.cstarEfficiency[1]),
      zeroOffset: uniform(s.loadCellOffset[0], s.loadCellOffset[1]),
      zeroDrift: uniform(-s.zeroDrift, s.zeroDrift),
      ringAmplitude: uniform(s.ringAmplitude[0], s.ringAmplitude[1]),
      chamberZero: uniform(-s.chamberZero, s.chamberZero),
      hardStart: group === 'A4',
    }
    const { csv, truth } = simulateHot(conditions, noise)
    const before = Number(uniform(h.bottleMass[0], h.bottleMass[1]).toFixed(1))
    // The lab scale reads to 0.1 g.
    const frost = group === 'B4' ? h.frostFraction * 1000 * truth.fuelMass : 0
    const after = Number((before - 1000 * truth.fuelMass + frost).toFixed(1))
    const cold = coldFlow.find((r) => r.group === group)?.reported.isp
    if (cold === undefined) throw new Error(`hot-fire demo: no cold-flow specific impulse for ${group}`)
    const measurements: Record<string, number> = {
      p_ambient: conditions.ambient / 1000,
      d_throat: Number((1000 * s.throatDiameter + uniform(-0.01, 0.01)).toFixed(2)),
      d_exit: Number((1000 * s.exitDiameter + uniform(-0.01, 0.01)).toFixed(2)),
      v_receiver: group === 'B1' ? h.wrongVolume : 1000 * s.receiverVolume,
      p_initial: conditions.chargeGauge / 1000,
      p_final: Math.round(truth.closeGauge / 1000),
      t_air: Number((conditions.roomTemperature - 273.15).toFixed(1)),
      m_bottle_before: before,
      m_bottle_after: after,
      isp_cold: significant(cold / (DEMO_COLD_FLOW_THRUST_SCALE[group] ?? 1), 4),
    }
    const mapping = suggestMapping(csv.slice(0, csv.indexOf('\n')).split(','), table)
    const careful = carefulHotResults(truth, measurements)
    const reported: Record<string, number> = {}
    for (const r of assignment.results) {
      const value = careful[r.key]
      if (value === undefined)
        throw new Error(`hot-fire demo ${group}: the careful reduction has no value for ${r.key}`)
      // Small human error: within 30 % of the tolerance, then 4 significant figures.
      const relative = r.tolerance.relative ?? 0
      reported[r.key] = significant(value * (1 + 0.3 * relative * uniform(-1, 1)), 4)
    }
    runs.push({ group, csv, mapping, measurements, reported })
  }
  return runs
}

// `npx tsx scripts/demo/hot-fire-runs.ts [outDir]`: write the logs for trying the upload by hand.
if (process.argv[1] && path.resolve(process.argv[1]) === path.resolve(import.meta.filename)) {
  const outDir = path.resolve(process.argv[2] ?? path.join(tmpdir(), 'isentrope-demo-runs'))
  mkdirSync(outDir, { recursive: true })
  for (const run of hotFireRuns()) {
    const file = path.join(outDir, `hot-fire-${run.group}.csv`)
    writeFileSync(file, run.csv)
    console.log(`${file}  ${run.csv.split('\n').length - 2} rows  reported ${JSON.stringify(run.reported)}`)
  }
}

import { areaFromDiameter, nozzleFlow, tankBlowdown } from '../../shared/physics'

/**
 * A cold-flow log for API tests, from the formula library's blow-down through a nozzle (noise-free unless asked):
 * 40 L receiver at 700 kPa gauge, throat 6 mm, exit 9 mm, barometer 84 kPa, chamber at 97 % of the
 * receiver pressure. Logged as a stand logs a run: half a second at rest before the valve opens
 * (thrust and chamber at 0), the valve opening over 5 samples, the blow-down, and half a second at
 * rest after the valve closes. Invented test data, not a measurement.
 */
export const COLD_FLOW = {
  ambientKPa: 84,
  throatMm: 6,
  exitMm: 9,
  volumeL: 40,
  initialKPaGauge: 700,
  airC: 20,
}

/** Samples logged at rest before the valve opens and after it closes, and while it opens. */
const REST_ROWS = 25
const OPENING_ROWS = 5

/** mulberry32 and Box–Muller: seeded Gaussian noise, the same on every machine. */
function seededGaussian(seed: number): () => number {
  let a = seed >>> 0
  const uniform = () => {
    a = (a + 0x6d2b79f5) >>> 0
    let t = a
    t = Math.imul(t ^ (t >>> 15), t | 1)
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61)
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296
  }
  return () => Math.sqrt(-2 * Math.log(1 - uniform())) * Math.cos(2 * Math.PI * uniform())
}

/**
 * @param opts.noise - a seed: when given, the logger adds Gaussian noise (0.05 N on the thrust,
 *   0.3 kPa on the pressures), so two seeds are two runs and no two logs are alike by chance
 */
export function coldFlowCsv(opts: { thrustScale?: number; duration?: number; step?: number; noise?: number } = {}): {
  csv: string
  t: number[]
  thrust: number[]
  finalKPaGauge: number
} {
  const noise = opts.noise === undefined ? () => 0 : seededGaussian(opts.noise)
  const pa = COLD_FLOW.ambientKPa * 1000
  const step = opts.step ?? 0.02
  const run = tankBlowdown({
    volume: COLD_FLOW.volumeL / 1000,
    initialPressure: COLD_FLOW.initialKPaGauge * 1000 + pa,
    initialTemperature: 273.15 + COLD_FLOW.airC,
    ambientPressure: pa,
    throatArea: areaFromDiameter(COLD_FLOW.throatMm / 1000),
    dischargeCoefficient: 0.98,
    gamma: 1.4,
    gasConstant: 287.05,
    process: 'isothermal',
    duration: opts.duration ?? 6,
    step,
  })
  // Rows of [time, thrust N, receiver kPa gauge, chamber kPa gauge] before rounding.
  const samples: [number, number, number, number][] = []
  for (let i = 0; i < run.time.length; i++) {
    const pr = run.pressure[i]!
    const pc = 0.97 * pr
    if (pc <= pa * 1.001) break
    const f =
      nozzleFlow({
        chamberPressure: pc,
        chamberTemperature: 293.15,
        ambientPressure: pa,
        throatArea: areaFromDiameter(COLD_FLOW.throatMm / 1000),
        exitArea: areaFromDiameter(COLD_FLOW.exitMm / 1000),
        gamma: 1.4,
        gasConstant: 287.05,
      }).thrust * (opts.thrustScale ?? 1)
    samples.push([run.time[i]! + (REST_ROWS + OPENING_ROWS) * step, f, (pr - pa) / 1000, (pc - pa) / 1000])
  }
  const first = samples[0]!
  const last = samples[samples.length - 1]!
  const before: [number, number, number, number][] = []
  for (let k = 0; k < REST_ROWS + OPENING_ROWS; k++) {
    const open = k < REST_ROWS ? 0 : (k - REST_ROWS + 1) / (OPENING_ROWS + 1)
    before.push([k * step, open * first[1], first[2], open * first[3]])
  }
  const after: [number, number, number, number][] = []
  for (let k = 1; k <= REST_ROWS; k++) after.push([last[0] + k * step, 0, last[2], 0])

  const rows = ['time_s,thrust_N,p_receiver_kPa,p_chamber_kPa']
  const t: number[] = []
  const thrust: number[] = []
  for (const [ts, f, pr, pc] of [...before, ...samples, ...after]) {
    // Rounded as a logger would write them; the values in the file are the truth for grading.
    const ti = Number(ts.toFixed(3))
    const fi = Number((f + 0.05 * noise()).toFixed(3))
    t.push(ti)
    thrust.push(fi)
    rows.push(`${ti},${fi},${(pr + 0.3 * noise()).toFixed(3)},${(pc + 0.3 * noise()).toFixed(3)}`)
  }
  return { csv: rows.join('\n') + '\n', t, thrust, finalKPaGauge: Number(last[2].toFixed(1)) }
}

/**
 * The peak thrust read as the cold-flow module reads it, written out here independently of the
 * library: the largest value of a centred 5-sample moving median (the log's zero is 0 N).
 */
export function medianPeak(f: number[]): number {
  let peak = -Infinity
  for (let i = 2; i < f.length - 2; i++) {
    const window = f.slice(i - 2, i + 3).sort((a, b) => a - b)
    peak = Math.max(peak, window[2]!)
  }
  return peak
}

/** The trapezoid rule written out here, independent of the library's totalImpulse. */
export function trapezoid(t: number[], f: number[]): number {
  let s = 0
  for (let i = 1; i < t.length; i++) s += ((f[i]! + f[i - 1]!) / 2) * (t[i]! - t[i - 1]!)
  return s
}

const MAPPING = {
  run: {
    t: { header: 'time_s', unit: 's' },
    thrust: { header: 'thrust_N', unit: 'N' },
    p_receiver: { header: 'p_receiver_kPa', unit: 'kPa', pressure: 'gauge' as const },
    p_chamber: { header: 'p_chamber_kPa', unit: 'kPa', pressure: 'gauge' as const },
  },
}

/**
 * The hand-in form's payload for the cold-flow demo module (content/02): measurements as typed
 * (the initial pressure in psi, to exercise unit conversion), impulse and peak thrust computed
 * independently here (the log's zero is 0 N, so the tared impulse is the plain trapezoid sum), the
 * other results deliberately wrong unless overridden.
 */
export function coldFlowPayload(
  log: ReturnType<typeof coldFlowCsv>,
  overrides: Record<string, { value: number; unit: string }> = {},
) {
  return {
    mappings: MAPPING,
    measurements: {
      p_ambient: { value: COLD_FLOW.ambientKPa, unit: 'kPa', pressure: 'absolute' as const },
      d_throat: { value: COLD_FLOW.throatMm, unit: 'mm' },
      d_exit: { value: COLD_FLOW.exitMm, unit: 'mm' },
      v_receiver: { value: COLD_FLOW.volumeL, unit: 'L' },
      // 700 kPa typed in psi: 700 / 6.894757293168 psi (exact psi definition).
      p_initial: { value: 700 / 6.894757293168, unit: 'psi', pressure: 'gauge' as const },
      p_final: { value: log.finalKPaGauge, unit: 'kPa', pressure: 'gauge' as const } as {
        value: number
        unit: string
        pressure?: 'gauge' | 'absolute'
      },
      t_air: { value: COLD_FLOW.airC, unit: 'degC' },
    } as Record<string, { value: number; unit: string; pressure?: 'gauge' | 'absolute' }>,
    reported: {
      impulse: { value: trapezoid(log.t, log.thrust), unit: 'N*s' },
      peak_thrust: { value: medianPeak(log.thrust), unit: 'N' },
      burn_time: { value: 1, unit: 's' },
      mean_thrust: { value: 1, unit: 'N' },
      cf_mean: { value: 0.5, unit: '1' },
      air_mass: { value: 0.1, unit: 'kg' },
      isp: { value: 10, unit: 's' },
      exit_mach: { value: 1.2, unit: '1' },
      regime: { value: 5, unit: '1' },
      ...overrides,
    } as Record<string, { value: number; unit: string }>,
  }
}

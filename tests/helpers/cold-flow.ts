import { areaFromDiameter, nozzleFlow, tankBlowdown } from '../../shared/physics'

/**
 * A cold-flow log for API tests, from the formula library's blow-down through a nozzle (noise-free unless asked):
 * 40 L receiver at 700 kPa gauge, throat 6 mm, exit 9 mm, barometer 84 kPa, chamber at 97 % of the
 * receiver pressure. Invented test data, not a measurement.
 */
export const COLD_FLOW = {
  ambientKPa: 84,
  throatMm: 6,
  exitMm: 9,
  volumeL: 40,
  initialKPaGauge: 700,
  airC: 20,
}

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
export function coldFlowCsv(opts: { thrustScale?: number; duration?: number; step?: number; noise?: number } = {}): { csv: string; t: number[]; thrust: number[]; finalKPaGauge: number } {
  const noise = opts.noise === undefined ? () => 0 : seededGaussian(opts.noise)
  const pa = COLD_FLOW.ambientKPa * 1000
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
    step: opts.step ?? 0.02,
  })
  const rows = ['time_s,thrust_N,p_receiver_kPa,p_chamber_kPa']
  const t: number[] = []
  const thrust: number[] = []
  let last = 0
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
    // Rounded as a logger would write them; the values in the file are the truth for grading.
    const ti = Number(run.time[i]!.toFixed(3))
    const fi = Number((f + 0.05 * noise()).toFixed(3))
    t.push(ti)
    thrust.push(fi)
    last = (pr - pa) / 1000
    rows.push(`${ti},${fi},${((pr - pa + 300 * noise()) / 1000).toFixed(3)},${((pc - pa + 300 * noise()) / 1000).toFixed(3)}`)
  }
  return { csv: rows.join('\n') + '\n', t, thrust, finalKPaGauge: Number(last.toFixed(1)) }
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
 * independently here, the other results deliberately wrong unless overridden.
 */
export function coldFlowPayload(log: ReturnType<typeof coldFlowCsv>, overrides: Record<string, { value: number; unit: string }> = {}) {
  return {
    mappings: MAPPING,
    measurements: {
      p_ambient: { value: COLD_FLOW.ambientKPa, unit: 'kPa', pressure: 'absolute' as const },
      d_throat: { value: COLD_FLOW.throatMm, unit: 'mm' },
      d_exit: { value: COLD_FLOW.exitMm, unit: 'mm' },
      v_receiver: { value: COLD_FLOW.volumeL, unit: 'L' },
      // 700 kPa typed in psi: 700 / 6.894757293168 psi (exact psi definition).
      p_initial: { value: 700 / 6.894757293168, unit: 'psi', pressure: 'gauge' as const },
      p_final: { value: log.finalKPaGauge, unit: 'kPa', pressure: 'gauge' as const } as { value: number; unit: string; pressure?: 'gauge' | 'absolute' },
      t_air: { value: COLD_FLOW.airC, unit: 'degC' },
    } as Record<string, { value: number; unit: string; pressure?: 'gauge' | 'absolute' }>,
    reported: {
      impulse: { value: trapezoid(log.t, log.thrust), unit: 'N*s' },
      peak_thrust: { value: Math.max(...log.thrust), unit: 'N' },
      cf_mean: { value: 0.5, unit: '1' },
      air_mass: { value: 0.1, unit: 'kg' },
      isp: { value: 10, unit: 's' },
      exit_mach: { value: 1.2, unit: '1' },
      regime: { value: 5, unit: '1' },
      ...overrides,
    } as Record<string, { value: number; unit: string }>,
  }
}

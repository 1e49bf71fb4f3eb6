import { describe, expect, it } from 'vitest'
import { CHART_MAX_POINTS, chartSeries } from '../../../shared/grading/grade'
import type { SubmissionData } from '../../../shared/modules/scope'
import { nozzleFlow } from '../../../shared/physics'
import { expectClose } from '../../helpers/expect-close'
import {
  EXIT_DIAMETER,
  GAMMA,
  STANDARD_ATMOSPHERE,
  THROAT_AREA,
  THROAT_DIAMETER,
  cleanLog,
  idealThrustCoefficientMach2,
  rolesAssignment,
} from './fixtures'

const assignment = rolesAssignment()

/** A log from absolute chamber pressures (Pa); receiver 10 % above, thrust 1 N, 10 ms steps. */
function logFromChamber(chamberAbsolute: number[]): SubmissionData {
  return {
    tables: {
      run: {
        t: chamberAbsolute.map((_, i) => i * 0.01),
        thrust: chamberAbsolute.map(() => 1),
        p_receiver: chamberAbsolute.map((p) => 1.1 * p - STANDARD_ATMOSPHERE),
        p_chamber: chamberAbsolute.map((p) => p - STANDARD_ATMOSPHERE),
      },
    },
    measurements: {
      p_ambient: STANDARD_ATMOSPHERE,
      d_throat: THROAT_DIAMETER,
      d_exit: EXIT_DIAMETER,
      v_receiver: 0.05,
    },
  }
}

describe('chartSeries on a short log', () => {
  const data = cleanLog()
  const chart = chartSeries(assignment, data)

  it('keeps every sample when there are fewer than the plotting limit', () => {
    expect(chart.time).toEqual((data.tables.run as Record<string, number[]>).t)
    expect(chart.thrust).toEqual((data.tables.run as Record<string, number[]>).thrust)
  })

  it('plots pressures absolute: the gauge readings plus the barometer', () => {
    expect(chart.chamberPressure?.[0]).toBe(STANDARD_ATMOSPHERE)
    expect(chart.chamberPressure?.[50]).toBe(1e6)
    expect(chart.receiverPressure?.[0]).toBe(1.1e6)
  })

  it('overlays the ideal thrust for the logged chamber pressure: C_F · p0 · At while flowing, 0 at rest', () => {
    expectClose(
      chart.idealThrust?.[50] as number,
      idealThrustCoefficientMach2(1e6, STANDARD_ATMOSPHERE) * 1e6 * THROAT_AREA,
      1e-9,
    )
    expect(chart.idealThrust?.[0]).toBe(0)
    expect(chart.idealThrust?.[99]).toBe(0)
  })

  it('shades the flowing part, where pa/p0 = 0.101 is below the shock-at-exit ratio 0.575: from t = 0.10 s to 0.89 s', () => {
    expect(chart.supersonicSpans).toEqual([[0.1, 0.89]])
  })
})

describe('chartSeries supersonic spans on a pressure ramp', () => {
  // Chamber 101.325 kPa + 1 kPa per sample up for 200 samples, then down again. The exit is
  // supersonic (no shock in the nozzle) while pa/p0 ≤ shock-at-exit = 1.8^−3.5 × 4.5 = 0.575122
  // (NACA 1135: p2/p1 = 4.5 across a Mach-2 normal shock), i.e. p0 ≥ 101 325 / 0.575122 = 176.18 kPa:
  // samples 75 (176.325 kPa) to 324 on the way down.
  const chamber = Array.from({ length: 400 }, (_, i) => STANDARD_ATMOSPHERE + 1000 * (i < 200 ? i : 399 - i))
  const chart = chartSeries(assignment, logFromChamber(chamber))

  it('starts at the first sample above 176.18 kPa and ends at the last one', () => {
    expect(chart.supersonicSpans).toHaveLength(1)
    const [start, end] = chart.supersonicSpans[0] as [number, number]
    expectClose(start, 0.75, 1e-12)
    expectClose(end, 3.24, 1e-12)
  })

  it('agrees sample by sample with the regime nozzleFlow gives (neither subsonic nor shock in nozzle)', () => {
    const [start, end] = chart.supersonicSpans[0] as [number, number]
    chamber.forEach((p0, i) => {
      const regime =
        p0 > STANDARD_ATMOSPHERE
          ? nozzleFlow({
              chamberPressure: p0,
              chamberTemperature: 293.15,
              ambientPressure: STANDARD_ATMOSPHERE,
              throatArea: THROAT_AREA,
              exitArea: THROAT_AREA * 1.6875,
              gamma: 1.4,
              gasConstant: 287.05,
            }).regime
          : 'subsonic'
      const inSpan = i * 0.01 >= start - 1e-9 && i * 0.01 <= end + 1e-9
      expect(inSpan, `sample ${i}, ${p0} Pa, ${regime}`).toBe(regime !== 'subsonic' && regime !== 'shock-in-nozzle')
    })
  })

  it('gives two spans for two runs in one log', () => {
    const twice = chartSeries(assignment, logFromChamber([...chamber, ...chamber]))
    expect(twice.supersonicSpans).toHaveLength(2)
    expectClose((twice.supersonicSpans[1] as [number, number])[0], 4.75, 1e-12)
  })
})

describe('chartSeries on a long log', () => {
  // 10 000 samples with one thrust spike and one dip; the plot must keep both.
  const n = 10_000
  const data = logFromChamber(Array.from({ length: n }, (_, i) => 3e5 + 1e5 * Math.sin(i / 500)))
  const run = data.tables.run as Record<string, number[]>
  const thrust = (run.thrust as number[]).map((_, i) => (i === 7777 ? 500 : i === 2222 ? -50 : 20 + Math.sin(i / 37)))
  const chart = chartSeries(assignment, { ...data, tables: { run: { ...run, thrust } } })

  it(`thins it to at most ${CHART_MAX_POINTS} points`, () => {
    expect(chart.time.length).toBeLessThanOrEqual(CHART_MAX_POINTS)
    expect(chart.time.length).toBeGreaterThan(CHART_MAX_POINTS / 2)
    for (const series of [chart.thrust, chart.chamberPressure, chart.receiverPressure, chart.idealThrust]) {
      expect(series).toHaveLength(chart.time.length)
    }
  })

  it('keeps the peaks: the spike and the dip, and the chamber maximum of 400 kPa', () => {
    expect(chart.thrust).toContain(500)
    expect(chart.thrust).toContain(-50)
    expect(chart.time).toContain(77.77)
    expect(Math.max(...(chart.chamberPressure ?? []))).toBe(
      Math.max(...(run.p_chamber as number[])) + STANDARD_ATMOSPHERE,
    )
  })

  it('keeps time in order', () => {
    for (let i = 1; i < chart.time.length; i++)
      expect(chart.time[i] as number).toBeGreaterThan(chart.time[i - 1] as number)
  })
})

describe('chartSeries keeps the whole time span of a long log', () => {
  // A quiet stand logged at 1 kHz from t = 0: every series flickers one step either side of its
  // rest value and the log starts and ends at rest, so the first and last samples are neither the
  // minimum nor the maximum of their stretch of the log.
  const n = 20_000
  const noise = (i: number) => (i === 0 || i === n - 1 ? 0 : i % 2 === 0 ? 1 : -1)
  const chamber = Array.from({ length: n }, (_, i) => 3e5 + 100 * noise(i))
  const data = logFromChamber(chamber)
  const run = data.tables.run as Record<string, number[]>
  const t = Array.from({ length: n }, (_, i) => i / 1000)
  const thrust = Array.from({ length: n }, (_, i) => 0.05 * noise(i))
  const chart = chartSeries(assignment, { ...data, tables: { run: { ...run, t, thrust } } })

  it('the fixture is one where bucket extremes alone would miss both ends', () => {
    // Within the first and the last 10 samples, the end sample is not an extreme of either series.
    for (const series of [thrust, chamber]) {
      const head = series.slice(0, 10)
      const tail = series.slice(-10)
      expect(series[0]).toBeGreaterThan(Math.min(...head))
      expect(series[0]).toBeLessThan(Math.max(...head))
      expect(series[n - 1]).toBeGreaterThan(Math.min(...tail))
      expect(series[n - 1]).toBeLessThan(Math.max(...tail))
    }
  })

  it('starts at the first sample (t = 0 s) and ends at the last (t = 19.999 s)', () => {
    expect(chart.time.length).toBeLessThanOrEqual(CHART_MAX_POINTS)
    expect(chart.time[0]).toBe(0)
    expect(chart.time[chart.time.length - 1]).toBe(19.999)
    expect(chart.thrust?.[0]).toBe(thrust[0])
    expect(chart.thrust?.[chart.thrust.length - 1]).toBe(thrust[n - 1])
  })
})

describe('chartSeries draws the separated estimate where the over-expanded flow separates', () => {
  // The Mach-2 nozzle (ε = 1.6875, pe/p0 = 1.8^−3.5 = 0.1278) at rest, then at 250 kPa absolute
  // (pa/p0 = 0.405: supersonic, and the wall pressure falls below 0.4 × ambient = 0.162 p0 inside the
  // nozzle, so the flow separates by the Summerfield criterion; Summerfield, Foster & Swan 1954, ratio
  // from memory), then at 1 MPa (0.4 × pa/p0 = 0.041 stays below 0.1278: it runs full), then at rest.
  const g = GAMMA
  const chamber = [
    ...Array<number>(10).fill(STANDARD_ATMOSPHERE),
    ...Array<number>(20).fill(250e3),
    ...Array<number>(20).fill(1e6),
    ...Array<number>(10).fill(STANDARD_ATMOSPHERE),
  ]
  const chart = chartSeries(assignment, logFromChamber(chamber))

  // Closed forms (NACA Report 1135 eqs. 44 and 80; Sutton & Biblarz eq. 3-30; from memory): the
  // separated nozzle is the nozzle cut off where p/p0 = 0.4 × pa/p0, running full to that point.
  const r = STANDARD_ATMOSPHERE / 250e3
  const ps = 0.4 * r
  const machOfPressureRatio = (p: number) => Math.sqrt((2 / (g - 1)) * (p ** (-(g - 1) / g) - 1))
  const areaRatioOf = (m: number) => ((2 / (g + 1)) * (1 + ((g - 1) / 2) * m * m)) ** ((g + 1) / (2 * (g - 1))) / m
  const separationAreaRatio = areaRatioOf(machOfPressureRatio(ps))
  const momentum = Math.sqrt(((2 * g * g) / (g - 1)) * (2 / (g + 1)) ** ((g + 1) / (g - 1)) * (1 - ps ** ((g - 1) / g)))
  const separatedThrust = (momentum + (ps - r) * separationAreaRatio) * 250e3 * THROAT_AREA

  it('gives the separated nozzle’s thrust at 250 kPa, above the full-flowing ideal there', () => {
    expect(chart.separatedThrust).toHaveLength(chart.time.length)
    expectClose(chart.separatedThrust?.[15] as number, separatedThrust, 1e-9)
    expectClose(
      chart.idealThrust?.[15] as number,
      idealThrustCoefficientMach2(250e3, STANDARD_ATMOSPHERE) * 250e3 * THROAT_AREA,
      1e-9,
    )
    expect(chart.separatedThrust?.[15] as number).toBeGreaterThan(chart.idealThrust?.[15] as number)
  })

  it('leaves it out (null) where the nozzle runs full and at rest', () => {
    expect(chart.separatedThrust?.[40]).toBeNull()
    expect(chart.separatedThrust?.[0]).toBeNull()
    expect(chart.separatedThrust?.[59]).toBeNull()
  })

  it('has no separated series at all when the flow never separates', () => {
    expect(chartSeries(assignment, cleanLog()).separatedThrust).toBeUndefined()
  })
})

describe('chartSeries ideal thrust on readings that repeat', () => {
  it('gives each plotted sample the ideal thrust of its own chamber pressure (repeated readings solved once)', () => {
    // Two plateaus visited in turn, 1 MPa and 0.6 MPa absolute, with rest between: every reading repeats.
    const chamber = Array.from(
      { length: 300 },
      (_, i) => [STANDARD_ATMOSPHERE, 1e6, 6e5][Math.floor(i / 10) % 3] as number,
    )
    const chart = chartSeries(assignment, logFromChamber(chamber))
    expect(chart.idealThrust).toHaveLength(300)
    chamber.forEach((p0, i) => {
      const expected =
        p0 > STANDARD_ATMOSPHERE ? idealThrustCoefficientMach2(p0, STANDARD_ATMOSPHERE) * p0 * THROAT_AREA : 0
      expectClose(chart.idealThrust?.[i] as number, expected, 1e-9, `sample ${i}`)
    })
  })
})

/**
 * The figures module 01 states about choking, blow-down, separation and the Mach disk, recomputed
 * here from closed forms written out in this file (not the formula library), so the text, the
 * calculators and the library cannot drift apart unnoticed. Then the library is held to the same
 * figures.
 */
import { readFileSync } from 'node:fs'
import { join } from 'node:path'
import { describe, expect, it } from 'vitest'
import { parseModuleSource } from '../../../shared/modules/front-matter'
import { scanTags } from './html-scan'
import { renderModule } from '../../../shared/modules/render'
import { areaFromDiameter, nozzleFlow, nozzlePressureRatios, tankBlowdown } from '../../../shared/physics/index'
import { expectClose } from '../../helpers/expect-close'

const FILE = '01-nozzle-flow-fundamentals.md'
const parsed = parseModuleSource(readFileSync(join(import.meta.dirname, '../../../content', FILE), 'utf8'), FILE)
if (!parsed.ok) throw new Error(parsed.errors.map((e) => e.message).join('\n'))
/** The module text with line breaks as spaces, so a phrase may wrap. */
const text = parsed.body.replace(/\s+/g, ' ')

// ---- Closed forms (NACA Report 1135 eqs. 44 and 80, Sutton & Biblarz eq. 3-30; from memory) ----
const g = 1.4
const pOverP0 = (m: number) => Math.pow(1 + ((g - 1) / 2) * m * m, -g / (g - 1))
const areaRatioOf = (m: number) => Math.pow((2 / (g + 1)) * (1 + ((g - 1) / 2) * m * m), (g + 1) / (2 * (g - 1))) / m
const machOfPressureRatio = (p: number) => Math.sqrt((2 / (g - 1)) * (Math.pow(p, -(g - 1) / g) - 1))
function machOfAreaRatio(x: number, supersonic: boolean): number {
  let lo = supersonic ? 1 : 1e-9
  let hi = supersonic ? 50 : 1
  for (let i = 0; i < 200; i++) {
    const mid = 0.5 * (lo + hi)
    if (areaRatioOf(mid) > x === supersonic) hi = mid
    else lo = mid
  }
  return 0.5 * (lo + hi)
}
const thrustCoefficient = (p2: number, p3: number, eps: number) =>
  Math.sqrt(((2 * g * g) / (g - 1)) * Math.pow(2 / (g + 1), (g + 1) / (g - 1)) * (1 - Math.pow(p2, (g - 1) / g))) +
  (p2 - p3) * eps

// The stand: 4.0 mm throat, 4.9 mm exit, 84 kPa barometer, 50 L receiver at 700 kPa gauge, 20 °C, Cd 0.98.
const EPSILON = (4.9 / 4.0) ** 2
const PA = 84
const chokeLimit = pOverP0(machOfAreaRatio(EPSILON, false))
const critical = Math.pow(2 / (g + 1), g / (g - 1))
const design = pOverP0(machOfAreaRatio(EPSILON, true))

/** Adiabatic choked blow-down, p = p_i·(1 + (γ−1)/2·t/τ)^(−2γ/(γ−1)), solved for the time p reaches `until` (kPa). */
function chokedFor(until: number): number {
  const tau =
    0.05 /
    (0.98 *
      ((Math.PI * 0.004 ** 2) / 4) *
      Math.sqrt(g * 287.05 * 293.15) *
      Math.pow(2 / (g + 1), (g + 1) / (2 * (g - 1))))
  return ((2 * tau) / (g - 1)) * (Math.pow(784 / until, (g - 1) / (2 * g)) - 1)
}

describe('module 01 states the choking and blow-down figures of the stand correctly', () => {
  it('the nozzle stays choked up to pa/p0 ≈ 0.88: down to about 95 kPa absolute (11 kPa gauge), against 159 kPa for an orifice', () => {
    expect(chokeLimit.toFixed(2)).toBe('0.88')
    expect((PA / chokeLimit).toFixed(0)).toBe('95')
    expect((PA / chokeLimit - PA).toFixed(0)).toBe('11')
    expect((PA / critical).toFixed(0)).toBe('159')
    expect(text).toContain(
      '$p_a/p_0 \\approx 0.88$: at 84 kPa ambient, down to a chamber pressure of about 95 kPa absolute (11 kPa gauge), far below the 159 kPa of a plain orifice',
    )
    expectClose(nozzlePressureRatios(EPSILON, g).chokeLimit, chokeLimit, 1e-12)
  })

  it('the 50 L receiver at 700 kPa gauge keeps the nozzle choked about 36 s, an orifice about 26 s, as the embedded calculator shows', () => {
    expect(chokedFor(PA / chokeLimit).toFixed(0)).toBe('36')
    expect(chokedFor(PA / critical).toFixed(0)).toBe('26')
    expect(text).toContain(
      'keeps the nozzle choked for about 36 s, where a plain orifice with the same throat would unchoke after about 26 s',
    )
    // The embedded blow-down calculator starts from that receiver and nozzle.
    const calculators = scanTags(renderModule(parsed.ok ? parsed.body : '')).filter(
      (t) => t.attributes.class === 'isentrope-calculator',
    )
    const blowdown = calculators.find((c) => c.attributes['data-kind'] === 'blowdown')
    expect(JSON.parse(blowdown?.attributes['data-defaults'] ?? '{}')).toMatchObject({
      volume: 50,
      initialPressure: 700,
      initialPressureReading: 'gauge',
      ambientPressure: 84,
      throatDiameter: 4,
      exitDiameter: 4.9,
    })
    // And the library, given the exit area, agrees with the closed form.
    const run = tankBlowdown({
      volume: 0.05,
      initialPressure: 784e3,
      initialTemperature: 293.15,
      ambientPressure: 84e3,
      throatArea: areaFromDiameter(0.004),
      exitArea: areaFromDiameter(0.0049),
      dischargeCoefficient: 0.98,
      gamma: g,
      gasConstant: 287.05,
      process: 'adiabatic',
      duration: 60,
      step: 0.01,
    })
    const unchoke = (PA * 1000) / chokeLimit
    const i = run.pressure.findIndex((p) => p < unchoke)
    expectClose(run.time[i] as number, chokedFor(PA / chokeLimit), 1e-3)
  })
})

describe('module 01 states the separation figures correctly', () => {
  it('ε = 4 at pa/p0 = 0.2 separates at A/A* ≈ 2.19 with CF ≈ 1.04 against 0.76 running full, some 36 % more', () => {
    const ps = 0.4 * 0.2
    const as = areaRatioOf(machOfPressureRatio(ps))
    const separated = thrustCoefficient(ps, 0.2, as)
    const full = thrustCoefficient(pOverP0(machOfAreaRatio(4, true)), 0.2, 4)
    expect(as.toFixed(2)).toBe('2.19')
    expect(separated.toFixed(2)).toBe('1.04')
    expect(full.toFixed(2)).toBe('0.76')
    expect(((separated / full - 1) * 100).toFixed(0)).toBe('36')
    expect(text).toContain(
      'the flow separates at $A/A^* \\approx 2.19$, and $C_F$ is about 1.04 instead of the 0.76 of the nozzle running full: some 36 % more thrust',
    )
  })

  it('the stand nozzle separates once the chamber is below about 126 kPa gauge, and does at the 100 kPa gauge the text suggests', () => {
    // Separation sets in where the design exit pressure equals 0.4·pa: p0 = 0.4·pa/(pe/p0).
    expect(((0.4 * PA) / design - PA).toFixed(0)).toBe('126')
    expect(text).toContain('once the chamber is below about 126 kPa gauge at 84 kPa ambient')
    const flow = nozzleFlow({
      chamberPressure: 184e3,
      chamberTemperature: 293.15,
      ambientPressure: 84e3,
      throatArea: areaFromDiameter(0.004),
      exitArea: areaFromDiameter(0.0049),
      gamma: g,
      gasConstant: 287.05,
    })
    expect(flow.separated).toBe(true)
  })

  it('the Mach disk of the 4.9 mm exit at 784 kPa is about 10 mm (Ashkenas & Sherman) and about 9 mm (Lewis & Carlson)', () => {
    expect((0.67 * 4.9 * Math.sqrt(784 / PA)).toFixed(0)).toBe('10')
    const me = machOfAreaRatio(EPSILON, true)
    expect((0.69 * 4.9 * me * Math.sqrt((g * design * 784) / PA)).toFixed(0)).toBe('9')
    expect(text).toContain('the first gives about 10 mm and the second about 9 mm')
  })
})

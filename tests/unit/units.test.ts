import { describe, expect, it } from 'vitest'
import {
  SI_UNITS,
  absoluteToGauge,
  convert,
  fromSI,
  gaugeToAbsolute,
  isUnitSymbol,
  toSI,
  unitKind,
  unitsOfKind,
} from '../../shared/units'
import type { UnitSymbol } from '../../shared/units'
import { expectClose } from '../helpers/expect-close'
import { expectRangeError } from '../helpers/expect-range-error'

// Exact definitions (NIST SP 811, appendix B; the 1959 international yard and pound agreement;
// CGPM definitions of the standard atmosphere and standard gravity):
// 1 in = 0.0254 m; 1 lb = 0.45359237 kg; 1 lbf = 4.4482216152605 N; 1 psi = 1 lbf/in²
// = 6894.757293168… Pa; 1 atm = 101325 Pa; 1 bar = 1e5 Pa; 1 kgf = 9.80665 N; 1 gf = 10⁻³ kgf;
// 1 US gal = 231 in³ = 3.785411784 L; T(K) = T(°C) + 273.15; T(°F) = T(°C)·9/5 + 32.
const EXACT: ReadonlyArray<readonly [UnitSymbol, number]> = [
  ['Pa', 1],
  ['kPa', 1000],
  ['MPa', 1e6],
  ['bar', 1e5],
  ['atm', 101325],
  ['N', 1],
  ['kN', 1000],
  ['kgf', 9.80665],
  ['gf', 0.00980665],
  ['lbf', 4.4482216152605],
  ['m', 1],
  ['mm', 0.001],
  ['cm', 0.01],
  ['in', 0.0254],
  ['m2', 1],
  ['mm2', 1e-6],
  ['cm2', 1e-4],
  ['in2', 0.0254 * 0.0254],
  ['m3', 1],
  ['L', 0.001],
  ['gal', 3.785411784e-3],
  ['kg', 1],
  ['g', 0.001],
  ['lb', 0.45359237],
  ['s', 1],
  ['ms', 0.001],
]

describe('unit table: linear units against their exact definitions', () => {
  for (const [unit, factor] of EXACT) {
    it(`1 ${unit} = ${factor} ${SI_UNITS[unitKind(unit)]}, and back`, () => {
      expectClose(toSI(1, unit), factor, 1e-15, `toSI(1, ${unit})`)
      expectClose(toSI(123.456, unit), 123.456 * factor, 1e-15, `toSI(123.456, ${unit})`)
      expectClose(fromSI(factor, unit), 1, 1e-15, `fromSI(${factor}, ${unit})`)
    })
  }

  it('1 psi = 1 lbf/in² = 6894.757293168 Pa (to the 13 digits usually quoted)', () => {
    expectClose(toSI(1, 'psi'), 4.4482216152605 / (0.0254 * 0.0254), 1e-15, 'psi = lbf/in²')
    expectClose(toSI(1, 'psi'), 6894.757293168, 1e-13, 'psi')
    expectClose(convert(1, 'psi', 'Pa'), convert(1, 'lbf', 'N') / convert(1, 'in2', 'm2'), 1e-15)
  })

  it('1 US gal = 231 in³', () => {
    expectClose(toSI(1, 'gal'), 231 * 0.0254 ** 3, 1e-14)
  })

  it('2.73 kgf is 26.8 N: a unit definition, 1 kgf = 9.80665 N exactly (NIST SP 811, appendix B), not common practice', () => {
    // 2.73 × 9.80665 = 26.7721545 N by the definition.
    expect(convert(2.73, 'kgf', 'N').toFixed(1)).toBe('26.8')
    expectClose(convert(2.73, 'kgf', 'N'), 2.73 * 9.80665, 1e-15)
  })

  it('68 psi is 468.8 kPa (worked from 1 psi = 6894.757 Pa)', () => {
    expect(convert(68, 'psi', 'kPa').toFixed(1)).toBe('468.8')
  })

  it('converts between non-SI units of one kind through SI', () => {
    expectClose(convert(1, 'atm', 'psi'), 101325 / 6894.757293168361, 1e-14)
    expectClose(convert(1, 'bar', 'atm'), 1e5 / 101325, 1e-15)
    expectClose(convert(1, 'lbf', 'kgf'), 0.45359237, 1e-15) // lbf/kgf = lb/kg exactly
    expectClose(convert(1000, 'gf', 'kgf'), 1, 1e-15) // both from g0 = 9.80665 m/s²
    expectClose(convert(1, 'lbf', 'gf'), 453.59237, 1e-15) // lbf/gf = lb/g exactly
    expectClose(convert(1, 'in2', 'mm2'), 645.16, 1e-14)
    expectClose(convert(1, 'gal', 'L'), 3.785411784, 1e-15)
    expectClose(convert(1000, 'ms', 's'), 1, 1e-15)
  })
})

describe('temperature (affine)', () => {
  it('maps the fixed points: 0 °C = 273.15 K = 32 °F, 100 °C = 212 °F, −40 °C = −40 °F', () => {
    expectClose(toSI(0, 'degC'), 273.15, 1e-15)
    expectClose(toSI(32, 'degF'), 273.15, 1e-14)
    expectClose(toSI(212, 'degF'), 373.15, 1e-14)
    expectClose(convert(100, 'degC', 'degF'), 212, 1e-14)
    expectClose(convert(-40, 'degC', 'degF'), -40, 1e-13)
    expectClose(fromSI(0, 'degF'), -459.67, 1e-14)
    expectClose(convert(20, 'degC', 'K'), 293.15, 1e-15)
  })

  it('rejects temperatures below absolute zero', () => {
    expectRangeError(() => toSI(-300, 'degC'), 'value', 'absolute zero', '-300 degC')
    expectRangeError(() => toSI(-1, 'K'), 'value', 'absolute zero')
    expectRangeError(() => fromSI(-0.5, 'degF'), 'value', 'absolute zero')
  })
})

describe('gauge and absolute pressure', () => {
  it('converts only with an explicit ambient pressure', () => {
    expect(gaugeToAbsolute(400000, 101325)).toBe(501325)
    expect(absoluteToGauge(501325, 101325)).toBe(400000)
    expect(gaugeToAbsolute(400000, 95000)).toBe(495000) // a lab at altitude
    expectClose(gaugeToAbsolute(toSI(68, 'psi'), toSI(14.696, 'psi')), toSI(82.696, 'psi'), 1e-15)
  })

  it('treats every pressure unit in the table as absolute: converting never adds an atmosphere', () => {
    expect(convert(0, 'psi', 'Pa')).toBe(0)
    expect(convert(0, 'bar', 'atm')).toBe(0)
    for (const unit of unitsOfKind('pressure')) expect(toSI(0, unit)).toBe(0)
  })

  it('rejects a gauge reading below vacuum and a negative ambient', () => {
    expectRangeError(() => gaugeToAbsolute(-2e5, 101325), 'gauge', 'at least −ambient')
    expectRangeError(() => gaugeToAbsolute(1e5, -1), 'ambient', 'at least 0')
    expectRangeError(() => gaugeToAbsolute(1e5, Number.NaN), 'ambient', 'NaN')
    expectRangeError(() => absoluteToGauge(-1, 101325), 'absolute', 'at least 0')
  })
})

describe('unit kinds and errors', () => {
  it('groups the symbols by kind', () => {
    expect(unitKind('psi')).toBe('pressure')
    expect(unitKind('lbf')).toBe('force')
    expect(unitKind('in2')).toBe('area')
    expect(unitKind('degF')).toBe('temperature')
    expect(unitsOfKind('force')).toEqual(['N', 'kN', 'kgf', 'gf', 'lbf'])
    expect(unitsOfKind('pressure')).toEqual(['Pa', 'kPa', 'MPa', 'bar', 'psi', 'atm'])
    for (const [kind, symbol] of Object.entries(SI_UNITS)) expect(unitKind(symbol)).toBe(kind)
  })

  it('throws a RangeError naming both units when their kinds differ', () => {
    expectRangeError(() => convert(1, 'psi', 'N'), 'psi', 'N', 'pressure', 'force')
    expectRangeError(() => convert(1, 'in', 'in2'), 'in', 'in2', 'length', 'area')
    expectRangeError(() => convert(1, 'kg', 'lbf'), 'kg', 'lbf', 'mass', 'force')
  })

  it('rejects unknown symbols and non-finite values', () => {
    expect(isUnitSymbol('psi')).toBe(true)
    expect(isUnitSymbol('psig')).toBe(false)
    expect(isUnitSymbol('toString')).toBe(false)
    expectRangeError(() => toSI(1, 'psig' as UnitSymbol), 'unit', 'psig')
    expectRangeError(() => convert(1, 'furlong' as UnitSymbol, 'm'), 'from', 'furlong')
    expectRangeError(() => convert(1, 'm', 'Mm' as UnitSymbol), 'to', 'Mm')
    expectRangeError(() => unitKind('' as UnitSymbol), 'unit')
    expectRangeError(() => toSI(Number.NaN, 'Pa'), 'value', 'NaN')
    expectRangeError(() => fromSI(Infinity, 'bar'), 'value', 'Infinity')
  })
})

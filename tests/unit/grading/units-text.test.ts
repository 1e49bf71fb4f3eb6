import { describe, expect, it } from 'vitest'
import { readHeader, readUnit } from '../../../shared/grading/units-text'

describe('readUnit', () => {
  it.each([
    ['kPa', { unit: 'kPa' }],
    ['kpa', { unit: 'kPa' }],
    ['[N]', { unit: 'N' }],
    ['(s)', { unit: 's' }],
    ['sec', { unit: 's' }],
    ['msec', { unit: 'ms' }],
    ['°C', { unit: 'degC' }],
    ['litres', { unit: 'L' }],
    ['psig', { unit: 'psi', pressure: 'gauge' }],
    ['psia', { unit: 'psi', pressure: 'absolute' }],
    ['barg', { unit: 'bar', pressure: 'gauge' }],
    ['kPa(g)', { unit: 'kPa', pressure: 'gauge' }],
    ['kPa (a)', { unit: 'kPa', pressure: 'absolute' }],
    ['kPa g', { unit: 'kPa', pressure: 'gauge' }],
    ['bar gauge', { unit: 'bar', pressure: 'gauge' }],
    ['psi abs', { unit: 'psi', pressure: 'absolute' }],
  ])('%s', (text, expected) => {
    expect(readUnit(text)).toEqual(expected)
  })

  it('reads lb as pound-force in a force column and as pound (mass) elsewhere', () => {
    expect(readUnit('lbs', 'force')).toEqual({ unit: 'lbf' })
    expect(readUnit('lb')).toEqual({ unit: 'lb' })
  })

  it('reads kg and g as kilogram- and gram-force in a force column, and as masses elsewhere', () => {
    expect(readUnit('kg', 'force')).toEqual({ unit: 'kgf' })
    expect(readUnit('g', 'force')).toEqual({ unit: 'gf' })
    expect(readUnit('grams', 'force')).toEqual({ unit: 'gf' })
    expect(readUnit('kgf', 'force')).toEqual({ unit: 'kgf' })
    expect(readUnit('gf', 'force')).toEqual({ unit: 'gf' })
    expect(readUnit('N', 'force')).toEqual({ unit: 'N' })
    expect(readUnit('kg')).toEqual({ unit: 'kg' })
    expect(readUnit('g', 'mass')).toEqual({ unit: 'g' })
  })

  it('is not fooled by words that are not units, or by gauge marks on other quantities', () => {
    expect(readUnit('chamber')).toBeUndefined()
    expect(readUnit('')).toBeUndefined()
    expect(readUnit('N (g)')).toBeUndefined()
    expect(readUnit('gauge')).toBeUndefined()
  })
})

describe('readHeader', () => {
  it.each([
    ['thrust [N]', { name: 'thrust', unit: { unit: 'N' } }],
    ['pc (psi)', { name: 'pc', unit: { unit: 'psi' } }],
    ['Chamber pressure (kPa g)', { name: 'Chamber pressure', unit: { unit: 'kPa', pressure: 'gauge' } }],
    ['p_chamber_kPa', { name: 'p_chamber', unit: { unit: 'kPa' } }],
    ['time s', { name: 'time', unit: { unit: 's' } }],
    ['p_chamber', { name: 'p_chamber' }],
    ['note (first run)', { name: 'note (first run)' }],
  ])('%s', (header, expected) => {
    expect(readHeader(header)).toEqual(expected)
  })
})

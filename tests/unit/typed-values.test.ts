import { describe, expect, it } from 'vitest'
import { compatibleUnits, isCompatibleUnit, toSpecSense, toSpecUnit } from '../../shared/typed-values'
import { expectClose } from '../helpers/expect-close'

// Exact definitions: 1 psi = 6894.757293168 Pa; 1 bar = 100 000 Pa; 1 in = 0.0254 m;
// 1 lbf = 4.4482216152605 N.
describe('typed values', () => {
  it('68 psi, 4.7 bar and 470 kPa become kPa for a spec in kPa', () => {
    expectClose(toSpecUnit(68, 'psi', 'kPa'), (68 * 6894.757293168) / 1000, 1e-12)
    expectClose(toSpecUnit(4.7, 'bar', 'kPa'), 470, 1e-12)
    expect(toSpecUnit(470, 'kPa', 'kPa')).toBe(470)
  })

  it('converts impulse typed in lbf·s to N·s', () => {
    expectClose(toSpecUnit(10, 'lbf*s', 'N*s'), 44.482216152605, 1e-12)
    expect(isCompatibleUnit('lbf·s', 'N*s')).toBe(true)
  })

  it('refuses a unit of the wrong kind, naming both', () => {
    expect(() => toSpecUnit(5, 'mm', 'kPa')).toThrow(/mm .* kPa/)
    expect(isCompatibleUnit('kg/s', 'N*s')).toBe(false)
  })

  it('offers units of the same kind, the spec unit first', () => {
    const u = compatibleUnits('kPa')
    expect(u[0]).toBe('kPa')
    expect(u).toEqual(expect.arrayContaining(['Pa', 'bar', 'psi', 'atm', 'MPa']))
    expect(u).not.toContain('mm')
    expect(compatibleUnits('1')).toEqual(['1'])
  })

  it('turns gauge into absolute only with an ambient pressure', () => {
    expect(toSpecSense(500, 'gauge', 'absolute', 84)).toBe(584)
    expect(toSpecSense(584, 'absolute', 'gauge', 84)).toBe(500)
    expect(toSpecSense(500, 'gauge', 'gauge', undefined)).toBe(500)
    expect(() => toSpecSense(500, 'gauge', 'absolute', undefined)).toThrow(/ambient/)
  })
})

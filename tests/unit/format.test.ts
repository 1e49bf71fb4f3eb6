import { describe, expect, it } from 'vitest'
import { formatCompact, formatNumber, formatScore, percentText, unitText, valueText } from '../../shared/format'

describe('how numbers and units are written for people', () => {
  it('keeps five significant figures, with trailing zeros, and a true minus sign', () => {
    expect(formatNumber(0.1278)).toBe('0.12780')
    expect(formatNumber(-701.325)).toBe('−701.33')
  })
  it('writes very small and very large magnitudes with a power of ten', () => {
    expect(formatNumber(2.35629e-5)).toBe('2.3563 × 10⁻⁵')
    expect(formatNumber(1.5e10, 3)).toBe('1.50 × 10¹⁰')
  })
  it('drops trailing zeros when echoing a typed value', () => {
    expect(formatCompact(20)).toBe('20')
    expect(formatCompact(0.5)).toBe('0.5')
  })
  it('writes units as read, values with their unit, errors as percentages and scores plainly', () => {
    expect(unitText('degC')).toBe('°C')
    expect(unitText('N*s')).toBe('N·s')
    expect(valueText(110.5, 'N*s')).toBe('110.5 N·s')
    expect(valueText(null, 'N')).toBe('—')
    expect(percentText(0.01234)).toBe('1.2 %')
    expect(percentText(0.00001)).toBe('< 0.01 %')
    expect(formatScore(7.499)).toBe('7.5')
  })
})

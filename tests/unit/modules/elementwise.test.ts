import { describe, expect, it } from 'vitest'
import { evaluateExpression } from '../../../shared/modules/expressions'

// The direct loops for element-wise operators must give what mathjs itself defines: plain IEEE
// arithmetic, and comparisons that treat nearly equal numbers (relative 1e-12) as equal.
describe('element-wise operators on number arrays', () => {
  const a = [1.5, -2, 3e5, 0.1 + 0.2]
  const b = [0.5, 4, 7, 0.3]

  it('arithmetic matches plain JavaScript element by element', () => {
    expect(evaluateExpression('sum(a ./ b) + 0', { a, b })).toBe(a.reduce((s, x, i) => s + x / b[i]!, 0))
    expect(evaluateExpression('max(a - 1)', { a })).toBe(Math.max(...a.map((x) => x - 1)))
    expect(evaluateExpression('min(2 * a)', { a })).toBe(Math.min(...a.map((x) => 2 * x)))
    expect(evaluateExpression('sum(a .* b)', { a, b })).toBe(a.reduce((s, x, i) => s + x * b[i]!, 0))
  })

  it('comparisons treat nearly equal values as equal, as mathjs does', () => {
    // 0.1 + 0.2 is 0.30000000000000004: nearly equal to 0.3, so not larger and not smaller.
    expect(evaluateExpression('sum(a > b) + 0', { a: [0.1 + 0.2], b: [0.3] })).toBe(0)
    expect(evaluateExpression('sum(a >= b) + 0', { a: [0.1 + 0.2], b: [0.3] })).toBe(1)
    expect(evaluateExpression('sum(a < 2) + 0', { a })).toBe(a.filter((x) => x < 2).length)
  })

  it('arrays of different lengths are left to mathjs: a one-element array broadcasts, others are an error', () => {
    expect(evaluateExpression('sum(a ./ b)', { a: [1, 2], b: [2] })).toBe(1.5)
    expect(() => evaluateExpression('sum(a ./ b)', { a: [1, 2, 3], b: [1, 2] })).toThrow()
  })
})

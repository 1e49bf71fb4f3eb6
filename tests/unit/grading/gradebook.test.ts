import { describe, expect, it } from 'vitest'
import { binLabel, histogram, mean, median, percentOf, weightedTotal } from '../../../shared/grading/gradebook'

describe('gradebook arithmetic', () => {
  it('the total is the weighted mean over modules that count; a missing module past due counts as 0 %', () => {
    // (2·80 + 1·50 + 1·0) / (2 + 1 + 1) = 210 / 4 = 52.5, worked by hand.
    expect(
      weightedTotal([
        { weight: 2, percent: 80, pastDue: false },
        { weight: 1, percent: 50, pastDue: true },
        { weight: 1, percent: null, pastDue: true },
        { weight: 5, percent: null, pastDue: false },
      ]),
    ).toBe(52.5)
  })

  it('weight 0 leaves a module out, and nothing that counts gives no total', () => {
    expect(
      weightedTotal([
        { weight: 0, percent: 10, pastDue: true },
        { weight: 1, percent: 90, pastDue: false },
      ]),
    ).toBe(90)
    expect(weightedTotal([{ weight: 1, percent: null, pastDue: false }])).toBeNull()
    expect(weightedTotal([{ weight: 0, percent: null, pastDue: true }])).toBeNull()
    expect(weightedTotal([])).toBeNull()
  })

  it('a module worth no points has no percentage', () => {
    expect(percentOf(3, 12)).toBe(25)
    expect(percentOf(0, 0)).toBeNull()
  })

  it('mean and median, odd and even counts, and none', () => {
    expect(mean([1, 2, 6])).toBe(3)
    expect(median([9, 1, 5])).toBe(5)
    expect(median([4, 1, 3, 10])).toBe(3.5)
    expect(mean([])).toBeNull()
    expect(median([])).toBeNull()
  })

  it('ten bins of 10 %: a bin edge goes up, 100 % goes to the last bin, outliers to the ends', () => {
    expect(histogram([0, 9.99, 10, 55, 90, 100, -3, 140, Number.NaN])).toEqual([3, 1, 0, 0, 0, 1, 0, 0, 0, 3])
    expect(binLabel(0)).toBe('0–10 %')
    expect(binLabel(9)).toBe('90–100 %')
  })
})

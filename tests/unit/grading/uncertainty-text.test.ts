import { describe, expect, it } from 'vitest'
import { dominantInputsText, expectedWithUncertaintyText } from '../../../shared/grading/uncertainty-text'

describe('the uncertainty in words and figures', () => {
  it('names the two largest contributions with their shares', () => {
    expect(
      dominantInputsText([
        { key: 'p_chamber', part: 'gain', label: 'Chamber pressure', share: 0.62 },
        { key: 'd_throat', part: 'value', label: 'Throat diameter', share: 0.3 },
      ]),
    ).toBe("mostly the chamber pressure column's gain (62 %) and the throat diameter (30 %)")
  })

  it('names both parts of one column once, a single input alone, and nothing when there is nothing', () => {
    expect(
      dominantInputsText([
        { key: 'thrust', part: 'offset', label: 'Thrust', share: 0.76 },
        { key: 'thrust', part: 'gain', label: 'Thrust', share: 0.24 },
      ]),
    ).toBe("mostly the thrust column's offset (76 %) and gain (24 %)")
    expect(dominantInputsText([{ key: 'd_throat', part: 'value', label: 'Throat diameter', share: 1 }])).toBe(
      'all from the throat diameter',
    )
    expect(dominantInputsText([{ key: 'd_throat', part: 'value', label: 'Throat diameter', share: 0.97 }])).toBe(
      'mostly the throat diameter (97 %)',
    )
    expect(dominantInputsText([{ key: 'co2', part: 'value', label: 'CO2 flow', share: 1 }])).toBe(
      'all from the CO2 flow',
    )
    expect(dominantInputsText([])).toBeNull()
  })

  it('writes expected ± U (k = 2), and the plain value without an uncertainty to show', () => {
    expect(expectedWithUncertaintyText(109.0912, 2.4123, 2, 'N*s')).toBe('109.09 ± 2.4 N·s (k = 2)')
    expect(expectedWithUncertaintyText(0.6757, 0.0231, 2, '1')).toBe('0.6757 ± 0.023 (k = 2)')
    expect(expectedWithUncertaintyText(109.0912, 0, 2, 'N*s')).toBe('109.09 N·s')
    expect(expectedWithUncertaintyText(109.0912, null, null, 'N*s')).toBe('109.09 N·s')
    expect(expectedWithUncertaintyText(null, null, null, 'N*s')).toBe('—')
  })
})

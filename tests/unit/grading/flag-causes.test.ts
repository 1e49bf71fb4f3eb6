import { describe, expect, it } from 'vitest'
import { oneFlagPerCause } from '../../../shared/grading/grade'
import type { GradeFlag } from '../../../shared/grading/grade'

const builtIn: GradeFlag = {
  code: 'thrust-above-ideal',
  message: 'The peak thrust is 47 % above the ideal.',
  detail: { ratio: 1.47 },
}

describe('one finding per cause', () => {
  it("merges a module rule named after a built-in check into that check's flag, keeping both reasons", () => {
    const flags = oneFlagPerCause(
      [builtIn, { code: 'time-gap', message: 'The clock jumps.' }],
      [
        {
          code: 'rule:thrust_above_ideal',
          message: 'Check the load-cell calibration.',
          detail: { rule: 'thrust_above_ideal' },
        },
        { code: 'rule:no_gain_over_cold', message: 'No better than cold flow.', detail: { rule: 'no_gain_over_cold' } },
      ],
    )
    expect(flags.map((f) => f.code)).toEqual(['thrust-above-ideal', 'time-gap', 'rule:no_gain_over_cold'])
    expect(flags[0]!.message).toBe(
      'The peak thrust is 47 % above the ideal. The module\'s rule "thrust_above_ideal" says: Check the load-cell calibration.',
    )
    expect(flags[0]!.detail).toEqual({ ratio: 1.47, rule: 'thrust_above_ideal' })
    // The input is left as it was.
    expect(builtIn.detail).toEqual({ ratio: 1.47 })
  })

  it('says a reason once when the rule words it the same way', () => {
    const [flag, ...rest] = oneFlagPerCause(
      [builtIn],
      [{ code: 'rule:thrust-above-ideal', message: ` ${builtIn.message} ` }],
    )
    expect(rest).toEqual([])
    expect(flag!.message).toBe(builtIn.message)
  })

  it('keeps a rule that fires alone, and a built-in check that fires alone', () => {
    const rule: GradeFlag = { code: 'rule:thrust_above_ideal', message: 'Check the load cell.' }
    expect(oneFlagPerCause([], [rule])).toEqual([rule])
    expect(oneFlagPerCause([builtIn], [])).toEqual([builtIn])
  })
})

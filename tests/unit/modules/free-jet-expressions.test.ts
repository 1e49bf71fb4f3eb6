import { describe, expect, it } from 'vitest'
import { evaluateExpression, validateExpression } from '../../../shared/modules/expressions'
import type { ExpressionContext } from '../../../shared/modules/expressions'
import { fullyExpandedJet, machDiskDistanceLewisCarlson, shockCellSpacing } from '../../../shared/physics'

/**
 * The free-jet relations in module expressions. The values are the formula library's (tested against
 * published tables in tests/unit/physics/free-jet.test.ts); here the engine must pass the arguments
 * through, read the fields, and refuse what is not part of the vocabulary.
 */
const scope = { p0: 6.5e5, pa: 98.6e3, d_throat: 0.004 }
const context: ExpressionContext = {
  produces: 'number',
  names: [
    { name: 'p0', shape: 'scalar', sample: scope.p0 },
    { name: 'pa', shape: 'scalar', sample: scope.pa },
    { name: 'd_throat', shape: 'scalar', sample: scope.d_throat },
  ],
}

describe('free-jet relations in module expressions', () => {
  const jet = fullyExpandedJet(0.004, 6.5e5, 98.6e3, 1.4)

  it('reads the fully expanded jet and gives the shock-cell spacing from it', () => {
    expect(evaluateExpression('fullyExpandedJet(d_throat, p0, pa, 1.4).mach', scope)).toBe(jet.mach)
    expect(evaluateExpression('fullyExpandedJet(d_throat, p0, pa, 1.4).diameter', scope)).toBe(jet.diameter)
    const spacing =
      'shockCellSpacing(fullyExpandedJet(d_throat, p0, pa, 1.4).diameter, fullyExpandedJet(d_throat, p0, pa, 1.4).mach)'
    expect(validateExpression(spacing, context)).toEqual([])
    expect(evaluateExpression(spacing, scope)).toBe(shockCellSpacing(jet.diameter, jet.mach))
    expect(evaluateExpression('machDiskDistanceLewisCarlson(0.008, 2.94, 2 * pa, pa, 1.4)', scope)).toBe(
      machDiskDistanceLewisCarlson(0.008, 2.94, 2 * 98.6e3, 98.6e3, 1.4),
    )
  })

  it('refuses a field the jet does not have and a wrong number of arguments', () => {
    expect(
      validateExpression('fullyExpandedJet(d_throat, p0, pa, 1.4).velocity', context)
        .map((i) => i.message)
        .join(' '),
    ).toMatch(/velocity/)
    expect(validateExpression('shockCellSpacing(d_throat)', context).length).toBeGreaterThan(0)
  })
})

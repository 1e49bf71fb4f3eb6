import { describe, expect, it } from 'vitest'
import { ExpressionError, evaluateExpression, validateExpression } from '../../../shared/modules/expressions'
import type { ExpressionContext } from '../../../shared/modules/expressions'
import { RESERVED_NAMES } from '../../../shared/modules/expression-names'
import { combustion, equivalenceRatioFromMixtureRatio, mixtureRatioFromEquivalenceRatio } from '../../../shared/thermo'

/**
 * The thermochemistry library in module expressions: combustion({…}) with its named inputs (one of
 * them optional) and its fields, and the two mixture-ratio helpers. The values themselves are the
 * library's (tested against published flame temperatures in its own tests); here the expression
 * engine must pass the inputs through and read the fields unchanged.
 */
const scope = { pc: [4e5, 5e5, 6e5], t_air: 293.15, m_air: 0.3, m_fuel: 0.016 }
const context: ExpressionContext = {
  produces: 'number',
  names: [
    { name: 'pc', shape: 'array', sample: scope.pc },
    { name: 't_air', shape: 'scalar', sample: scope.t_air },
    { name: 'm_air', shape: 'scalar', sample: scope.m_air },
    { name: 'm_fuel', shape: 'scalar', sample: scope.m_fuel },
  ],
}
const refusals = (expr: string) => validateExpression(expr, context).map((i) => i.message)

function evaluationError(expr: string): ExpressionError {
  try {
    evaluateExpression(expr, scope)
  } catch (error) {
    if (error instanceof ExpressionError) return error
    throw error
  }
  throw new Error(`${expr} did not fail`)
}

describe('combustion({…}) in module expressions', () => {
  const library = combustion({ fuel: 'propane', equivalenceRatio: 0.8, pressure: 5e5, reactantTemperature: 293.15 })

  it('reads every scalar field of the library’s result, with the fuel as quoted text', () => {
    const call = 'combustion({fuel: "propane", equivalenceRatio: 0.8, pressure: mean(pc), reactantTemperature: t_air})'
    for (const field of [
      'temperature',
      'molarMass',
      'gamma',
      'cp',
      'characteristicVelocity',
      'mixtureRatio',
    ] as const) {
      expect(evaluateExpression(`${call}.${field}`, scope), field).toBe(library[field])
      expect(refusals(`${call}.${field}`), field).toEqual([])
    }
    // Single quotes are text too.
    expect(
      evaluateExpression(
        "combustion({fuel: 'propane', equivalenceRatio: 0.8, pressure: 5e5, reactantTemperature: t_air}).temperature",
        scope,
      ),
    ).toBe(library.temperature)
  })

  it('reads one product species’ mole fraction; the whole group is refused', () => {
    const call = 'combustion({fuel: "propane", equivalenceRatio: 0.8, pressure: 5e5, reactantTemperature: t_air})'
    expect(evaluateExpression(`${call}.moleFractions.CO2`, scope)).toBe(library.moleFractions.CO2)
    expect(evaluateExpression(`${call}.moleFractions.NO`, scope)).toBe(library.moleFractions.NO)
    expect(refusals(`${call}.moleFractions`).join(' ')).toMatch(/is a group of values; read one of N2, O2, CO2/)
    expect(refusals(`${call}.moleFractions.C3H8`).join(' ')).toContain('there is no field "C3H8"')
  })

  it('leaves out the reactant temperature: the library’s default, 298.15 K', () => {
    const expr = 'combustion({fuel: "methane", equivalenceRatio: 1, pressure: 101325}).temperature'
    expect(refusals(expr)).toEqual([])
    expect(evaluateExpression(expr, scope)).toBe(
      combustion({ fuel: 'methane', equivalenceRatio: 1, pressure: 101325 }).temperature,
    )
  })

  it('refuses a missing or unknown input by name, and lists the inputs with the optional one', () => {
    expect(refusals('combustion({fuel: "propane", pressure: 5e5}).temperature')).toContain(
      'combustion({…}) needs equivalenceRatio',
    )
    expect(
      refusals('combustion({fuel: "propane", equivalenceRatio: 1, pressure: 5e5, airTemperature: 300}).temperature'),
    ).toContain(
      'combustion({…}) has no input named airTemperature; its inputs are fuel, equivalenceRatio, pressure, reactantTemperature',
    )
    expect(refusals('combustion("propane", 1, 5e5).temperature').join(' ')).toContain(
      'combustion takes one object of named inputs',
    )
  })

  it('an unknown fuel or a mixture outside 0.4–2.5 fails with the library’s reason', () => {
    expect(
      evaluationError('combustion({fuel: "butane", equivalenceRatio: 1, pressure: 5e5}).temperature').message,
    ).toMatch(/fuel/)
    expect(
      evaluationError('combustion({fuel: "propane", equivalenceRatio: 3, pressure: 5e5}).temperature').message,
    ).toMatch(/equivalenceRatio/)
    // At save time the trial run says so.
    expect(refusals('combustion({fuel: "butane", equivalenceRatio: 1, pressure: 5e5}).temperature').join(' ')).toMatch(
      /trial run with made-up data failed: .*fuel/,
    )
  })

  it('combustion and the helpers are reserved names a column or result may not take', () => {
    for (const name of ['combustion', 'mixtureRatioFromEquivalenceRatio', 'equivalenceRatioFromMixtureRatio'])
      expect(RESERVED_NAMES.has(name), name).toBe(true)
  })
})

describe('the mixture-ratio helpers in module expressions', () => {
  it('give the library’s values and are each other’s inverse', () => {
    expect(evaluateExpression('mixtureRatioFromEquivalenceRatio("propane", 0.8)', scope)).toBe(
      mixtureRatioFromEquivalenceRatio('propane', 0.8),
    )
    expect(evaluateExpression('equivalenceRatioFromMixtureRatio("propane", m_air / m_fuel)', scope)).toBe(
      equivalenceRatioFromMixtureRatio('propane', 0.3 / 0.016),
    )
    const back = evaluateExpression(
      'equivalenceRatioFromMixtureRatio("hydrogen", mixtureRatioFromEquivalenceRatio("hydrogen", 0.6))',
      scope,
    ) as number
    expect(back).toBeCloseTo(0.6, 12)
  })

  it('take two arguments', () => {
    expect(refusals('equivalenceRatioFromMixtureRatio(m_air / m_fuel)').join(' ')).toContain(
      'equivalenceRatioFromMixtureRatio takes 2 arguments, but 1 is given',
    )
  })
})

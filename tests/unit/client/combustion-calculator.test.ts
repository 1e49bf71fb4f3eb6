import { describe, expect, it } from 'vitest'
import { areaFromDiameter, nozzleFlow } from '@shared/physics'
import { combustion, equivalenceRatioFromMixtureRatio, mixtureRatioFromEquivalenceRatio } from '@shared/thermo'
import { gaugeToAbsolute, toSI } from '@shared/units'
import { FieldError, calculatorForm } from '@/composables/use-calculator'
import { COMBUSTION_FIELDS, carryOver, startingDefaults } from '@/composables/combustion-form'
import type { CombustionForm } from '@/composables/combustion-form'
import { CHART_POINTS, CHART_SPAN, computeCombustion } from '@/composables/use-combustion-calculator'
import { expectClose } from '../../helpers/expect-close'

/** The calculator's form with its built-in values, then the changes given (as a module's YAML or a person would type them). */
function form(changes: Partial<Record<string, number | string>> = {}): CombustionForm {
  return calculatorForm(COMBUSTION_FIELDS, changes)
}

/** The FieldError `run` throws (failing the test when it throws something else or nothing). */
function fieldError(run: () => unknown): FieldError {
  try {
    run()
  } catch (error) {
    if (error instanceof FieldError) return error
    throw error
  }
  throw new Error('expected a FieldError, got a result')
}

// Molar gas constant, J/(mol·K): exact since the 2019 SI redefinition (CODATA 2018).
const MOLAR_GAS_CONSTANT = 8.314462618

describe('the combustion calculator', () => {
  it('starts from its built-in values: propane at φ = 1, 5 bar gauge, 25 °C, a 6 mm throat and a 9 mm exit', () => {
    const f = form()
    expect({ ...f }).toMatchObject({
      fuel: 'propane',
      mixtureBy: 'equivalenceRatio',
      equivalenceRatio: '1',
      mixtureRatio: '',
      reactantTemperature: '25',
      reactantTemperatureUnit: 'degC',
      chamberPressure: '5',
      chamberPressureUnit: 'bar',
      chamberPressureReading: 'gauge',
      throatDiameter: '6',
      exitBy: 'exitDiameter',
      exitDiameter: '9',
      areaRatio: '',
    })
  })

  it("gives the thermochemistry library's flame for the typed inputs converted to SI", () => {
    const r = computeCombustion(
      form({ fuel: 'methane', equivalenceRatio: 0.85, chamberPressure: 600, chamberPressureUnit: 'kPa' }),
    )
    const gas = combustion({
      fuel: 'methane',
      equivalenceRatio: 0.85,
      pressure: gaugeToAbsolute(600e3, 101325),
      reactantTemperature: 298.15,
    })
    expect(r.gas).toEqual(gas)
    expect(r.equivalenceRatio).toBe(0.85)
    expect(r.mixtureRatio).toBe(gas.mixtureRatio)
  })

  it('runs the nozzle code with the products: R = R̄/M, and the nozzle c* is the library c*', () => {
    const r = computeCombustion(form({ fuel: 'hydrogen', equivalenceRatio: 1.1 }))
    // R from cp and γ (γ = cp/(cp − R)) is the gas constant of the products, R̄/M.
    expectClose(r.gasConstant, MOLAR_GAS_CONSTANT / r.gas.molarMass, 1e-6, 'R of the products')
    // c* = p0·At/ṁ of the nozzle code and √(R̄T/M)/Γ(γ) of the library agree.
    expectClose(r.flow.characteristicVelocity, r.gas.characteristicVelocity, 1e-6, 'c*')
    const expected = nozzleFlow({
      chamberPressure: gaugeToAbsolute(5e5, 101325),
      chamberTemperature: r.gas.temperature,
      ambientPressure: 101325,
      throatArea: areaFromDiameter(toSI(6, 'mm')),
      exitArea: areaFromDiameter(toSI(9, 'mm')),
      gamma: r.gas.gamma,
      gasConstant: r.gasConstant,
    })
    expect(r.flow).toEqual(expected)
    // The throat flow split by the mixture: air/fuel = the air-to-fuel ratio.
    expectClose(r.airFlow / r.fuelFlow, r.gas.mixtureRatio, 1e-12, 'air-to-fuel ratio of the flows')
    expectClose(r.airFlow + r.fuelFlow, r.flow.massFlow, 1e-12, 'air and fuel make up the mass flow')
  })

  it('takes an air-to-fuel ratio instead of φ and finds the matching equivalence ratio', () => {
    const r = computeCombustion(form({ mixtureBy: 'mixtureRatio', mixtureRatio: '17.2', equivalenceRatio: 2 }))
    const phi = equivalenceRatioFromMixtureRatio('propane', 17.2)
    expect(r.equivalenceRatio).toBe(phi)
    expectClose(r.mixtureRatio, 17.2, 1e-9, 'air-to-fuel ratio of the products')
  })

  it('gives an exit by its area ratio the same performance as by the diameters of that ratio', () => {
    const byDiameter = computeCombustion(form({ throatDiameter: 5, exitDiameter: 8 }))
    const byRatio = computeCombustion(form({ throatDiameter: 5, exitBy: 'areaRatio', areaRatio: (8 / 5) ** 2 }))
    expectClose(byRatio.flow.thrustCoefficient, byDiameter.flow.thrustCoefficient, 1e-12, 'CF')
    expectClose(byRatio.flow.specificImpulse, byDiameter.flow.specificImpulse, 1e-12, 'Isp')
    expect(byRatio.flow.regime).toBe(byDiameter.flow.regime)
  })

  it('puts a refusal at the input it concerns, in plain words', () => {
    const phi = fieldError(() => computeCombustion(form({ equivalenceRatio: 3 })))
    expect(phi.field).toBe('equivalenceRatio')
    expect(phi.message).toMatch(/^The equivalence ratio φ must be between 0\.4 \(very lean\) and 2\.5/)

    // A ratio far too rich for propane: the message gives the ratios the range allows for it.
    const ratio = fieldError(() => computeCombustion(form({ mixtureBy: 'mixtureRatio', mixtureRatio: 3 })))
    expect(ratio.field).toBe('mixtureRatio')
    expect(ratio.message).toMatch(/for propane, from [\d.]+ to [\d.]+ kg of air per kg of fuel/)

    const empty = fieldError(() => computeCombustion(form({ mixtureBy: 'mixtureRatio' })))
    expect(empty.field).toBe('mixtureRatio')
    expect(empty.message).toBe('Enter the air-to-fuel ratio.')

    const below = fieldError(() =>
      computeCombustion(form({ chamberPressure: 90, chamberPressureUnit: 'kPa', chamberPressureReading: 'absolute' })),
    )
    expect(below.field).toBe('chamberPressure')
    expect(below.message).toMatch(/must be above the ambient pressure/)

    const cold = fieldError(() => computeCombustion(form({ reactantTemperature: -300 })))
    expect(cold.field).toBe('reactantTemperature')
    expect(cold.message).toMatch(/above absolute zero/)
    const hot = fieldError(() => computeCombustion(form({ reactantTemperature: 3100, reactantTemperatureUnit: 'K' })))
    expect(hot.field).toBe('reactantTemperature')
    expect(hot.message).toMatch(/^The reactant temperature must be at most 3000 K/)

    const narrow = fieldError(() => computeCombustion(form({ exitBy: 'areaRatio', areaRatio: 0.8 })))
    expect(narrow.field).toBe('areaRatio')
    expect(narrow.message).toMatch(/at least 1/)
  })

  it('charts flame temperature and c* over φ 0.5–2, widened to take in a φ outside it, each point the library value', () => {
    const r = computeCombustion(form({ fuel: 'methane' }))
    expect(r.sweep).toHaveLength(CHART_POINTS)
    expect(r.sweep[0]?.equivalenceRatio).toBe(CHART_SPAN[0])
    expect(r.sweep[CHART_POINTS - 1]?.equivalenceRatio).toBe(CHART_SPAN[1])
    const middle = r.sweep[15]
    if (!middle) throw new Error('no middle point')
    const gas = combustion({
      fuel: 'methane',
      equivalenceRatio: middle.equivalenceRatio,
      pressure: r.chamberPressure,
      reactantTemperature: 298.15,
    })
    expect(middle.temperature).toBe(gas.temperature)
    expect(middle.characteristicVelocity).toBe(gas.characteristicVelocity)

    const rich = computeCombustion(form({ fuel: 'methane', equivalenceRatio: 2.3 }))
    expect(rich.sweep[0]?.equivalenceRatio).toBe(CHART_SPAN[0])
    expect(rich.sweep[CHART_POINTS - 1]?.equivalenceRatio).toBeCloseTo(2.3, 12)
  })

  it('a module that starts on the air-to-fuel ratio or the area ratio without one gets the equivalent of φ or the diameters', () => {
    const d = startingDefaults({
      fuel: 'hydrogen',
      mixtureBy: 'mixtureRatio',
      equivalenceRatio: 0.6,
      exitBy: 'areaRatio',
    })
    expect(Number(d.mixtureRatio)).toBeCloseTo(mixtureRatioFromEquivalenceRatio('hydrogen', 0.6), 3)
    // Built-in diameters 6 mm and 9 mm: (9/6)² = 2.25.
    expect(d.areaRatio).toBe('2.25')
    // What a module gives is kept; nothing is added when the box in use has a value or is not in use.
    expect(startingDefaults({ mixtureBy: 'mixtureRatio', mixtureRatio: 20 })).toEqual({
      mixtureBy: 'mixtureRatio',
      mixtureRatio: 20,
    })
    expect(startingDefaults(undefined)).toEqual({})
  })

  it('switching the way the mixture or exit is given starts the new box at the equivalent of the last results', () => {
    const f = form({ fuel: 'methane', equivalenceRatio: 1.3, throatDiameter: 0.25, throatDiameterUnit: 'in' })
    const last = computeCombustion(f)
    f.mixtureBy = 'mixtureRatio'
    carryOver(f, last, 'mixtureBy')
    expect(Number(f.mixtureRatio)).toBeCloseTo(mixtureRatioFromEquivalenceRatio('methane', 1.3), 3)
    const again = computeCombustion(f)
    expectClose(again.equivalenceRatio, 1.3, 1e-5, 'φ after the switch')

    f.exitBy = 'areaRatio'
    carryOver(f, again, 'exitBy')
    expectClose(Number(f.areaRatio), (9 / 6.35) ** 2, 1e-5, 'area ratio of a 9 mm exit on a 0.25 in throat')
    const byRatio = computeCombustion(f)
    f.exitBy = 'exitDiameter'
    f.exitDiameter = ''
    carryOver(f, byRatio, 'exitBy')
    expectClose(Number(f.exitDiameter), 9, 1e-5, 'exit diameter back from the area ratio, mm')

    // Without results (an input out of range) the box keeps what it had.
    f.mixtureBy = 'equivalenceRatio'
    f.equivalenceRatio = '7'
    carryOver(f, null, 'mixtureBy')
    expect(f.equivalenceRatio).toBe('7')
  })
})

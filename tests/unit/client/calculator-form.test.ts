import { describe, expect, it } from 'vitest'
import { calculatorForm } from '@/composables/use-calculator'
import type { FieldGroup } from '@/composables/use-calculator'

// A small field list with one input of each kind the calculators use.
const FIELDS = [
  {
    legend: 'Tank',
    fields: [
      { key: 'pressure', label: 'Pressure', start: 8, units: ['kPa', 'bar'], unit: 'bar', sense: true },
      { key: 'exit', label: 'Exit diameter', start: null, units: ['mm', 'in'] },
      { key: 'gamma', label: 'γ', start: 1.4 },
      {
        key: 'process',
        label: 'Process',
        choices: [
          { label: 'isothermal', value: 'isothermal' },
          { label: 'adiabatic', value: 'adiabatic' },
        ],
        start: 'adiabatic',
      },
    ],
  },
] as const satisfies readonly FieldGroup[]

describe('a calculator form built from its field list', () => {
  it('starts every input, unit, reading and choice at its built-in value', () => {
    const form = calculatorForm(FIELDS, undefined)
    expect({ ...form }).toEqual({
      pressure: '8',
      pressureUnit: 'bar',
      pressureReading: 'gauge',
      exit: '',
      exitUnit: 'mm',
      gamma: '1.4',
      process: 'adiabatic',
    })
  })

  it('takes the starting values a lab module gives, by the same keys', () => {
    const form = calculatorForm(FIELDS, {
      pressure: 600,
      pressureUnit: 'kPa',
      pressureReading: 'absolute',
      exit: '12',
      exitUnit: 'in',
      gamma: ' 1.3 ',
      process: 'isothermal',
    })
    expect({ ...form }).toEqual({
      pressure: '600',
      pressureUnit: 'kPa',
      pressureReading: 'absolute',
      exit: '12',
      exitUnit: 'in',
      gamma: '1.3',
      process: 'isothermal',
    })
  })

  it('keeps the built-in value for a unit, reading or choice it does not offer, and for a value of the wrong kind', () => {
    const form = calculatorForm(FIELDS, {
      pressure: Number.NaN,
      pressureUnit: 'psi',
      pressureReading: 'vacuum',
      exit: '',
      process: 'polytropic',
    })
    expect(form.pressure).toBe('8')
    expect(form.pressureUnit).toBe('bar')
    expect(form.pressureReading).toBe('gauge')
    expect(form.exit).toBe('')
    expect(form.process).toBe('adiabatic')
  })
})

/**
 * The combustion calculator's form (CombustionCalculator.vue renders it, use-combustion-calculator.ts
 * computes from it): its inputs, with two choices of which input is typed (φ or the air-to-fuel
 * ratio; the exit diameter or the area ratio), the fieldsets as shown for those choices, the
 * starting values a module gives, and the value carried over when the person switches.
 */
import { FUELS, mixtureRatioFromEquivalenceRatio } from '@shared/thermo'
import type { Fuel } from '@shared/thermo'
import { fromSI, toSI } from '@shared/units'
import type { UnitSymbol } from '@shared/units'
import { calculatorForm, formatCompact, readNumber } from './use-calculator'
import type { CalculatorDefaults, CalculatorForm, FieldGroup, InputsOf } from './use-calculator'

/** The units each input offers. */
export const PRESSURE_UNITS = ['kPa', 'bar', 'psi', 'MPa'] as const satisfies readonly UnitSymbol[]
export const TEMPERATURE_UNITS = ['K', 'degC'] as const satisfies readonly UnitSymbol[]
export const LENGTH_UNITS = ['mm', 'in'] as const satisfies readonly UnitSymbol[]

/** The fuels the thermochemistry library burns with air. */
const FUEL_CHOICES = FUELS.map((value) => ({ label: value, value })) as readonly { label: Fuel; value: Fuel }[]

/** Which of the two ways of giving the mixture the person types; the other is shown as a result. */
const MIXTURE_CHOICES = [
  { label: 'equivalence ratio', value: 'equivalenceRatio' },
  { label: 'air-to-fuel ratio', value: 'mixtureRatio' },
] as const
export type MixtureBy = (typeof MIXTURE_CHOICES)[number]['value']

/** Which of the two ways of giving the nozzle's exit the person types. */
const EXIT_CHOICES = [
  { label: 'exit diameter', value: 'exitDiameter' },
  { label: 'area ratio', value: 'areaRatio' },
] as const
export type ExitBy = (typeof EXIT_CHOICES)[number]['value']

/** The form's fieldsets and inputs, in order; CombustionCalculator.vue renders them from this list. */
export const COMBUSTION_FIELDS = [
  {
    legend: 'Mixture',
    fields: [
      { key: 'fuel', label: 'Fuel, burned with air', choices: FUEL_CHOICES, start: 'propane' },
      {
        key: 'mixtureBy',
        label: 'Mixture given as',
        choices: MIXTURE_CHOICES,
        start: 'equivalenceRatio',
        hint: 'φ = 1 burns all the fuel with all the oxygen; below 1 is lean (spare air), above 1 rich (spare fuel).',
      },
      { key: 'equivalenceRatio', label: 'Equivalence ratio φ', start: 1 },
      // Empty until the person switches to it; it then starts at the ratio of the φ typed before.
      {
        key: 'mixtureRatio',
        label: 'Air-to-fuel mass ratio',
        start: null,
        unitText: 'kg air per kg fuel',
      },
      {
        key: 'reactantTemperature',
        label: 'Reactant temperature',
        start: 25,
        units: TEMPERATURE_UNITS,
        unit: 'degC',
        hint: 'Air and fuel as they enter the chamber',
      },
    ],
  },
  {
    legend: 'Chamber',
    fields: [
      { key: 'chamberPressure', label: 'Chamber pressure', start: 5, units: PRESSURE_UNITS, unit: 'bar', sense: true },
    ],
  },
  {
    legend: 'Surroundings',
    fields: [
      {
        key: 'ambientPressure',
        label: 'Ambient pressure (absolute)',
        start: 101.325,
        units: PRESSURE_UNITS,
        unit: 'kPa',
        hint: 'From the lab barometer; standard atmosphere 101.325 kPa',
      },
    ],
  },
  {
    legend: 'Nozzle',
    fields: [
      { key: 'throatDiameter', label: 'Throat diameter', start: 6, units: LENGTH_UNITS, unit: 'mm' },
      { key: 'exitBy', label: 'Exit given as', choices: EXIT_CHOICES, start: 'exitDiameter' },
      { key: 'exitDiameter', label: 'Exit diameter', start: 9, units: LENGTH_UNITS, unit: 'mm' },
      // Empty until the person switches to it; it then starts at the ratio of the diameters typed before.
      { key: 'areaRatio', label: 'Area ratio Ae/At', start: null },
    ],
  },
] as const satisfies readonly FieldGroup[]

export type CombustionForm = CalculatorForm<InputsOf<typeof COMBUSTION_FIELDS>>
/**
 * A number to put back in a box the person will read and may edit: six figures (one more than the
 * results show, so a value carried over prints the same), no grouping.
 */
function typedText(value: number): string {
  return formatCompact(value, 6).replace(/,/g, '')
}

/** The keys hidden for each choice: the way of giving the mixture or exit that is not in use. */
function hiddenKeys(form: CombustionForm): Set<string> {
  return new Set([
    form.mixtureBy === 'equivalenceRatio' ? 'mixtureRatio' : 'equivalenceRatio',
    form.exitBy === 'exitDiameter' ? 'areaRatio' : 'exitDiameter',
  ])
}

/**
 * The starting values with the typed box of each choice filled in: a module may start on the
 * air-to-fuel ratio (or the area ratio) without giving one, and the box then starts at the
 * equivalent of the φ (or the diameters) given or built in, rather than empty.
 */
export function startingDefaults(defaults: CalculatorDefaults | undefined): CalculatorDefaults {
  const start = calculatorForm(COMBUSTION_FIELDS, defaults)
  const filled: CalculatorDefaults = { ...defaults }
  try {
    if (start.mixtureBy === 'mixtureRatio' && start.mixtureRatio === '') {
      const phi = readNumber('equivalenceRatio', start.equivalenceRatio, 'equivalence ratio')
      filled.mixtureRatio = typedText(mixtureRatioFromEquivalenceRatio(start.fuel, phi))
    }
  } catch {
    // Left empty: the box then asks for a value.
  }
  try {
    if (start.exitBy === 'areaRatio' && start.areaRatio === '') {
      const throat = toSI(readNumber('throatDiameter', start.throatDiameter, ''), start.throatDiameterUnit)
      const exit = toSI(readNumber('exitDiameter', start.exitDiameter, ''), start.exitDiameterUnit)
      const ratio = (exit / throat) ** 2
      if (Number.isFinite(ratio)) filled.areaRatio = typedText(ratio)
    }
  } catch {
    // Left empty, as above.
  }
  return filled
}

/** What the carry-over reads from the last results. */
export interface CarriedOver {
  equivalenceRatio: number
  /** Air-to-fuel mass ratio. */
  mixtureRatio: number
  flow: { areaRatio: number }
}

/**
 * After the person switches which way of giving the mixture (or the exit) is typed: the box now
 * shown starts at the equivalent of the last results, so they stay where they were. Nothing
 * changes while there are no results (the box keeps what it had).
 */
export function carryOver(form: CombustionForm, last: CarriedOver | null, choice: 'mixtureBy' | 'exitBy'): void {
  if (!last) return
  if (choice === 'mixtureBy') {
    if (form.mixtureBy === 'mixtureRatio') form.mixtureRatio = typedText(last.mixtureRatio)
    else form.equivalenceRatio = typedText(last.equivalenceRatio)
    return
  }
  if (form.exitBy === 'areaRatio') {
    form.areaRatio = typedText(last.flow.areaRatio)
    return
  }
  const throat = toSI(Number(form.throatDiameter), form.throatDiameterUnit)
  const exit = fromSI(throat * Math.sqrt(last.flow.areaRatio), form.exitDiameterUnit)
  if (Number.isFinite(exit)) form.exitDiameter = typedText(exit)
}

/** The fieldsets as shown: of each pair of ways to give the mixture or the exit, the one chosen. */
export function visibleFieldGroups(form: CombustionForm): readonly FieldGroup[] {
  const hidden = hiddenKeys(form)
  return COMBUSTION_FIELDS.map((g) => ({ legend: g.legend, fields: g.fields.filter((f) => !hidden.has(f.key)) }))
}

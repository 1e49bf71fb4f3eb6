/**
 * The combustion calculator's inputs and physics (CombustionCalculator.vue renders them): a fuel
 * burned with air at a mixture given as an equivalence ratio or as an air-to-fuel mass ratio, at
 * the chamber pressure, turned by the thermochemistry library (`@shared/thermo`) into the
 * equilibrium flame temperature, products, γ, molar mass, cp and c*; then the nozzle performance
 * with those gas properties through the formula library's nozzleFlow, the same code the nozzle
 * calculator runs; and the flame temperature and c* against the equivalence ratio for the chart.
 */
import { computed, watch } from 'vue'
import type { ComputedRef } from 'vue'
import { areaFromDiameter, nozzleFlow } from '@shared/physics'
import type { NozzleFlow } from '@shared/physics'
import {
  EQUIVALENCE_RATIO_RANGE,
  FUELS,
  combustion,
  equivalenceRatioFromMixtureRatio,
  mixtureRatioFromEquivalenceRatio,
} from '@shared/thermo'
import type { CombustionResult as FlameProducts, Fuel } from '@shared/thermo'
import { fromSI, toSI } from '@shared/units'
import type { UnitSymbol } from '@shared/units'
import {
  absolutePressure,
  calculatorForm,
  forField,
  formatCompact,
  formatPressure,
  readNumber,
  unitLabel,
  useCalculator,
  withArgumentFields,
} from './use-calculator'
import type { Calculator, CalculatorDefaults, CalculatorForm, FieldGroup, InputsOf } from './use-calculator'

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

/** The chart's equivalence ratios: this span, widened to take in the mixture typed when it lies outside. */
export const CHART_SPAN: readonly [number, number] = [0.5, 2]
/** Points of the chart's sweep (each one equilibrium calculation). */
export const CHART_POINTS = 31

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

/** The equilibrium products as the library gives them (see `combustion` in shared/thermo). */
export type CombustionGas = FlameProducts

/** One point of the chart: flame temperature (K) and c* (m/s) at an equivalence ratio. */
export interface SweepPoint {
  equivalenceRatio: number
  temperature: number
  characteristicVelocity: number
}

/** What the combustion calculator shows, in SI except where a field says otherwise. */
export interface CombustionResult {
  fuel: Fuel
  mixtureBy: MixtureBy
  equivalenceRatio: number
  /** Air-to-fuel mass ratio, kg of air per kg of fuel. */
  mixtureRatio: number
  /** The equilibrium products at the chamber pressure. */
  gas: CombustionGas
  /** Specific gas constant of the products, J/(kg·K): R = cp·(γ − 1)/γ, the same γ = cp/(cp − R) the library uses. */
  gasConstant: number
  chamberPressure: number
  ambientPressure: number
  reactantTemperature: number
  /** The nozzle run with the products' γ, R and the flame temperature as the chamber temperature. */
  flow: NozzleFlow
  /** Air and fuel mass flow through the throat, kg/s. */
  airFlow: number
  fuelFlow: number
  pressureUnit: UnitSymbol
  lengthUnit: UnitSymbol
  /** Flame temperature and c* against φ at this fuel, pressure and reactant temperature, φ increasing. */
  sweep: SweepPoint[]
}

/** The equivalence ratios of the chart: CHART_POINTS evenly spaced over the span, widened to take in φ. */
export function sweepRatios(equivalenceRatio: number): number[] {
  const lo = Math.min(CHART_SPAN[0], equivalenceRatio)
  const hi = Math.max(CHART_SPAN[1], equivalenceRatio)
  return Array.from({ length: CHART_POINTS }, (_, i) => lo + ((hi - lo) * i) / (CHART_POINTS - 1))
}

// The sweep changes only with the fuel, pressure, reactant temperature and span, not with each φ
// typed inside it: keep the last one.
let lastSweep: { key: string; points: SweepPoint[] } | null = null

function sweep(fuel: Fuel, pressure: number, reactantTemperature: number, equivalenceRatio: number): SweepPoint[] {
  const ratios = sweepRatios(equivalenceRatio)
  const key = `${fuel}|${pressure}|${reactantTemperature}|${ratios[0]}|${ratios[ratios.length - 1]}`
  if (lastSweep?.key === key) return lastSweep.points
  const points = ratios.map((phi) => {
    const gas = combustion({ fuel, equivalenceRatio: phi, pressure, reactantTemperature })
    return { equivalenceRatio: phi, temperature: gas.temperature, characteristicVelocity: gas.characteristicVelocity }
  })
  lastSweep = { key, points }
  return points
}

const { min: PHI_MIN, max: PHI_MAX } = EQUIVALENCE_RATIO_RANGE

/** The air-to-fuel ratios that bound the library's equivalence ratios for a fuel, as words ("from 6.2 to 39"). */
function mixtureRatioSpan(fuel: Fuel): string {
  try {
    const rich = mixtureRatioFromEquivalenceRatio(fuel, PHI_MAX)
    const lean = mixtureRatioFromEquivalenceRatio(fuel, PHI_MIN)
    return ` (for ${fuel}, from ${formatCompact(rich, 3)} to ${formatCompact(lean, 3)} kg of air per kg of fuel)`
  } catch {
    return ''
  }
}

/**
 * The combustion calculator's results from its form, or a FieldError at the input that the
 * thermochemistry or formula library refused. Exported for the unit tests.
 */
export function computeCombustion(form: CombustionForm): CombustionResult {
  const fuel: Fuel = form.fuel
  const pressureUnit = form.chamberPressureUnit
  const lengthUnit = form.exitBy === 'exitDiameter' ? form.exitDiameterUnit : form.throatDiameterUnit

  const ambientTyped = readNumber('ambientPressure', form.ambientPressure, 'ambient pressure')
  const ambient = toSI(ambientTyped, form.ambientPressureUnit)
  const ambientNegative = {
    field: 'ambientPressure',
    message: () => 'The ambient pressure cannot be negative: it is an absolute pressure (about 101 kPa at sea level).',
  }
  const chamberTyped = readNumber('chamberPressure', form.chamberPressure, 'chamber pressure')
  const chamber = withArgumentFields(
    {
      ambient: ambientNegative,
      gauge: {
        field: 'chamberPressure',
        message: () =>
          `A gauge reading cannot be below −${formatPressure(ambient, pressureUnit)} (the ambient pressure): that would be less than a perfect vacuum.`,
      },
    },
    () => absolutePressure(chamberTyped, pressureUnit, form.chamberPressureReading, ambient),
  )

  const temperatureTyped = readNumber('reactantTemperature', form.reactantTemperature, 'reactant temperature')
  const temperatureMessage = 'The reactant temperature must be above absolute zero (0 K, −273.15 °C).'
  const reactantTemperature = forField('reactantTemperature', temperatureMessage, () =>
    toSI(temperatureTyped, form.reactantTemperatureUnit),
  )

  // The mixture: φ typed, or the air-to-fuel ratio typed and φ from it.
  const mixtureField = form.mixtureBy
  const outOfRange =
    mixtureField === 'equivalenceRatio'
      ? () =>
          `The equivalence ratio φ must be between ${PHI_MIN} (very lean) and ${PHI_MAX} (very rich): the combustion library covers that range.`
      : () =>
          `The air-to-fuel ratio must give an equivalence ratio between ${PHI_MIN} and ${PHI_MAX}${mixtureRatioSpan(fuel)}: the combustion library covers that range.`
  let equivalenceRatio: number
  if (mixtureField === 'equivalenceRatio') {
    equivalenceRatio = readNumber('equivalenceRatio', form.equivalenceRatio, 'equivalence ratio')
  } else {
    const typed = readNumber('mixtureRatio', form.mixtureRatio, 'air-to-fuel ratio')
    equivalenceRatio = withArgumentFields(
      {
        mixtureRatio: {
          field: 'mixtureRatio',
          message: () => 'The air-to-fuel ratio must be greater than 0 (kg of air per kg of fuel).',
        },
      },
      () => equivalenceRatioFromMixtureRatio(fuel, typed),
    )
  }

  const gas = withArgumentFields(
    {
      equivalenceRatio: { field: mixtureField, message: outOfRange },
      pressure: { field: 'chamberPressure', message: () => 'The chamber pressure must be above 0 (absolute).' },
      reactantTemperature: { field: 'reactantTemperature', message: () => temperatureMessage },
    },
    () => combustion({ fuel, equivalenceRatio, pressure: chamber, reactantTemperature }),
  )

  // The nozzle: the throat, and the exit by its diameter or by the area ratio.
  const throatTyped = readNumber('throatDiameter', form.throatDiameter, 'throat diameter')
  const throatDiameter = toSI(throatTyped, form.throatDiameterUnit)
  const throatArea = forField('throatDiameter', 'The throat diameter must be greater than 0.', () =>
    areaFromDiameter(throatDiameter),
  )
  let exitArea: number
  let exitMessage: string
  if (form.exitBy === 'exitDiameter') {
    const exitTyped = readNumber('exitDiameter', form.exitDiameter, 'exit diameter')
    const exitDiameter = toSI(exitTyped, form.exitDiameterUnit)
    exitMessage = `The exit diameter must be at least the throat diameter (${throatTyped} ${unitLabel(form.throatDiameterUnit)}): the diverging section cannot be narrower than the throat.`
    exitArea = forField(
      'exitDiameter',
      exitDiameter > 0 ? exitMessage : 'The exit diameter must be greater than 0.',
      () => areaFromDiameter(exitDiameter),
    )
  } else {
    const areaRatio = readNumber('areaRatio', form.areaRatio, 'area ratio')
    exitMessage = 'The area ratio Ae/At must be at least 1: the exit cannot be narrower than the throat.'
    exitArea = areaRatio * throatArea
  }
  const exitField = form.exitBy

  // γ = cp/(cp − R), so R = cp·(γ − 1)/γ: the products' own gas constant, R̄/M.
  const gasConstant = (gas.cp * (gas.gamma - 1)) / gas.gamma
  const flow = withArgumentFields(
    {
      ambientPressure:
        ambient < 0
          ? ambientNegative
          : {
              field: 'chamberPressure',
              message: () =>
                `The chamber pressure (${formatPressure(chamber, pressureUnit)} absolute) must be above the ambient pressure (${formatPressure(ambient, pressureUnit)}): with no pressure drop, no gas flows.`,
            },
      throatArea: { field: 'throatDiameter', message: () => 'The throat diameter must be greater than 0.' },
      exitArea: { field: exitField, message: () => exitMessage },
    },
    () =>
      nozzleFlow({
        chamberPressure: chamber,
        chamberTemperature: gas.temperature,
        ambientPressure: ambient,
        throatArea,
        exitArea,
        gamma: gas.gamma,
        gasConstant,
      }),
  )

  return {
    fuel,
    mixtureBy: mixtureField,
    equivalenceRatio,
    mixtureRatio: gas.mixtureRatio,
    gas,
    gasConstant,
    chamberPressure: chamber,
    ambientPressure: ambient,
    reactantTemperature,
    flow,
    airFlow: (flow.massFlow * gas.mixtureRatio) / (1 + gas.mixtureRatio),
    fuelFlow: flow.massFlow / (1 + gas.mixtureRatio),
    pressureUnit,
    lengthUnit,
    sweep: sweep(fuel, chamber, reactantTemperature, equivalenceRatio),
  }
}

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

/**
 * After the person switches which way of giving the mixture (or the exit) is typed: the box now
 * shown starts at the equivalent of the last results, so they stay where they were. Nothing
 * changes while there are no results (the box keeps what it had).
 */
export function carryOver(form: CombustionForm, last: CombustionResult | null, choice: 'mixtureBy' | 'exitBy'): void {
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

/** What {@link useCombustionCalculator} gives the component: the fieldsets, the form to bind and the live results. */
export interface CombustionCalculator extends Calculator<typeof COMBUSTION_FIELDS, CombustionResult> {
  /** The fieldsets as shown: of each pair of ways to give the mixture or the exit, the one chosen. */
  visibleGroups: ComputedRef<readonly FieldGroup[]>
}

/**
 * The combustion calculator's form, starting from `defaults` (keys listed in
 * CombustionCalculator.vue), and its results, recomputed a moment after each edit. Switching
 * between φ and the air-to-fuel ratio (or between exit diameter and area ratio) starts the box
 * shown at the equivalent of what was typed before, so the results stay where they were.
 */
export function useCombustionCalculator(defaults: CalculatorDefaults | undefined): CombustionCalculator {
  const calculator = useCalculator(COMBUSTION_FIELDS, startingDefaults(defaults), computeCombustion)
  const { form, result } = calculator
  // Synchronous, so the carry-over reads the results of the inputs before the switch.
  watch(
    () => form.mixtureBy,
    () => carryOver(form, result.value, 'mixtureBy'),
    { flush: 'sync' },
  )
  watch(
    () => form.exitBy,
    () => carryOver(form, result.value, 'exitBy'),
    { flush: 'sync' },
  )

  const visibleGroups = computed<readonly FieldGroup[]>(() => {
    const hidden = hiddenKeys(form)
    return COMBUSTION_FIELDS.map((g) => ({ legend: g.legend, fields: g.fields.filter((f) => !hidden.has(f.key)) }))
  })
  return { ...calculator, visibleGroups }
}

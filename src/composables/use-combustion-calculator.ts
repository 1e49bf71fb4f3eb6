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
  MAX_REACTANT_TEMPERATURE,
  combustion,
  equivalenceRatioFromMixtureRatio,
  mixtureRatioFromEquivalenceRatio,
} from '@shared/thermo'
import type { CombustionResult as FlameProducts, Fuel } from '@shared/thermo'
import { toSI } from '@shared/units'
import type { UnitSymbol } from '@shared/units'
import { COMBUSTION_FIELDS, carryOver, startingDefaults, visibleFieldGroups } from './combustion-form'
import type { CombustionForm, MixtureBy } from './combustion-form'
import {
  AMBIENT_NEGATIVE,
  absolutePressureAt,
  forField,
  formatCompact,
  formatPressure,
  readNumber,
  unitLabel,
  useCalculator,
  withArgumentFields,
} from './use-calculator'
import type { Calculator, CalculatorDefaults, FieldGroup } from './use-calculator'

/** The chart's equivalence ratios: this span, widened to take in the mixture typed when it lies outside. */
export const CHART_SPAN: readonly [number, number] = [0.5, 2]
/** Points of the chart's sweep (each one equilibrium calculation). */
export const CHART_POINTS = 31

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
  const chamberTyped = readNumber('chamberPressure', form.chamberPressure, 'chamber pressure')
  const chamber = absolutePressureAt(
    'chamberPressure',
    chamberTyped,
    pressureUnit,
    form.chamberPressureReading,
    ambient,
  )

  const temperatureTyped = readNumber('reactantTemperature', form.reactantTemperature, 'reactant temperature')
  const coldMessage = 'The reactant temperature must be above absolute zero (0 K, −273.15 °C).'
  const reactantTemperature = forField('reactantTemperature', coldMessage, () =>
    toSI(temperatureTyped, form.reactantTemperatureUnit),
  )
  const temperatureMessage =
    reactantTemperature > 0
      ? `The reactant temperature must be at most ${MAX_REACTANT_TEMPERATURE} K: hotter reactants would give a flame beyond the combustion library's species data.`
      : coldMessage

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
          ? AMBIENT_NEGATIVE
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

  const visibleGroups = computed(() => visibleFieldGroups(form))
  return { ...calculator, visibleGroups }
}

/**
 * The receiver blow-down calculator's inputs and physics (BlowdownCalculator.vue renders them): the
 * form with its starting values, the conversion of what was typed to SI, the formula library's
 * tankBlowdown with its refusals turned into plain words at the input concerned, how long the
 * throat stays choked (by the outlet's own choke limit: a converging–diverging nozzle stays choked
 * to a much higher back pressure than a plain orifice) and the mass released.
 */
import { BLOWDOWN_PROCESSES, areaFromDiameter, nozzlePressureRatios, tankBlowdown } from '@shared/physics'
import type { Blowdown, BlowdownProcess } from '@shared/physics'
import { toSI } from '@shared/units'
import type { UnitSymbol } from '@shared/units'
import {
  AMBIENT_NEGATIVE,
  absolutePressureAt,
  forField,
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
export const VOLUME_UNITS = ['L', 'm3'] as const satisfies readonly UnitSymbol[]
/** Integration steps over the run: fine enough for the chart and the choked time, quick to compute. */
const STEPS = 1000

const PROCESS_CHOICES = BLOWDOWN_PROCESSES.map((value) => ({ label: value, value }))

/** The form's fieldsets and inputs, in order; BlowdownCalculator.vue renders them from this list. */
export const BLOWDOWN_FIELDS = [
  {
    legend: 'Receiver',
    fields: [
      { key: 'volume', label: 'Receiver volume', start: 50, units: VOLUME_UNITS, unit: 'L' },
      { key: 'initialPressure', label: 'Initial pressure', start: 8, units: PRESSURE_UNITS, unit: 'bar', sense: true },
      {
        key: 'initialTemperature',
        label: 'Initial temperature',
        start: 20,
        units: TEMPERATURE_UNITS,
        unit: 'degC',
      },
      {
        key: 'process',
        label: 'Gas in the receiver',
        choices: PROCESS_CHOICES as readonly { label: BlowdownProcess; value: BlowdownProcess }[],
        start: 'adiabatic',
        hint: 'Isothermal: a slow discharge, the walls keep the gas warm. Adiabatic: a fast one, the gas cools as it expands.',
      },
    ],
  },
  {
    legend: 'Outlet',
    fields: [
      { key: 'throatDiameter', label: 'Throat diameter', start: 4, units: LENGTH_UNITS, unit: 'mm' },
      // Empty: a plain orifice (or converging nozzle) with no diverging part.
      {
        key: 'exitDiameter',
        label: 'Exit diameter',
        start: null,
        units: LENGTH_UNITS,
        unit: 'mm',
        hint: 'Leave empty for a plain orifice',
      },
      { key: 'dischargeCoefficient', label: 'Discharge coefficient', start: 0.98, hint: 'Smooth nozzle: about 0.98' },
      {
        key: 'ambientPressure',
        label: 'Ambient pressure (absolute)',
        start: 101.325,
        units: PRESSURE_UNITS,
        unit: 'kPa',
      },
    ],
  },
  {
    legend: 'Gas and run',
    fields: [
      { key: 'gamma', label: 'Ratio of specific heats γ', start: 1.4, hint: 'Air: 1.4' },
      { key: 'gasConstant', label: 'Gas constant R', start: 287.05, unitText: 'J/(kg·K)', hint: 'Air: 287.05' },
      { key: 'duration', label: 'Duration', start: 60, unitText: 's' },
    ],
  },
] as const satisfies readonly FieldGroup[]

type BlowdownForm = CalculatorForm<InputsOf<typeof BLOWDOWN_FIELDS>>

/** What the blow-down calculator shows, in SI except where a field says otherwise. */
export interface BlowdownResult {
  run: Blowdown
  duration: number
  initialPressure: number
  ambientPressure: number
  /** Receiver pressure below which the throat is no longer choked, Pa absolute: pa / chokeLimit. */
  chokePressure: number
  /**
   * The highest pa/p at which the throat stays choked (nozzlePressureRatios(ε, γ).chokeLimit): the
   * critical ratio for a plain orifice, more for a converging–diverging nozzle.
   */
  chokeLimit: number
  /** Exit-to-throat area ratio ε of the nozzle, or null for a plain orifice (no exit diameter given). */
  areaRatio: number | null
  /** Ratio of specific heats used. */
  gamma: number
  /** Time the throat stays choked, s; null when it is still choked at the end of the run. */
  chokedFor: number | null
  /** Mass of gas that left the receiver during the run, kg. */
  massReleased: number
  /** Time at which the receiver reached ambient pressure and the flow stopped, s, or null. */
  flowStopsAt: number | null
  pressureUnit: UnitSymbol
  process: BlowdownProcess
}

/**
 * The time at which the sampled pressure first falls below `threshold`, interpolated linearly
 * between the two samples around it; 0 if it starts below, null if it never does.
 */
function crossingTime(run: Blowdown, threshold: number): number | null {
  const { time, pressure } = run
  if (!((pressure[0] as number) >= threshold)) return 0
  for (let i = 1; i < pressure.length; i++) {
    const p = pressure[i] as number
    if (p < threshold) {
      const p0 = pressure[i - 1] as number
      const t0 = time[i - 1] as number
      const t1 = time[i] as number
      return t0 + ((p0 - threshold) / (p0 - p)) * (t1 - t0)
    }
  }
  return null
}

function compute(form: BlowdownForm): BlowdownResult {
  const pressureUnit = form.initialPressureUnit
  const volumeTyped = readNumber('volume', form.volume, 'receiver volume')
  const volume = toSI(volumeTyped, form.volumeUnit)
  const ambientTyped = readNumber('ambientPressure', form.ambientPressure, 'ambient pressure')
  const ambient = toSI(ambientTyped, form.ambientPressureUnit)
  const initialTyped = readNumber('initialPressure', form.initialPressure, 'initial pressure')
  const initial = absolutePressureAt(
    'initialPressure',
    initialTyped,
    pressureUnit,
    form.initialPressureReading,
    ambient,
  )
  const temperatureTyped = readNumber('initialTemperature', form.initialTemperature, 'initial temperature')
  const temperatureMessage = 'The initial temperature must be above absolute zero (0 K, −273.15 °C).'
  const temperature = forField('initialTemperature', temperatureMessage, () =>
    toSI(temperatureTyped, form.initialTemperatureUnit),
  )
  const throatTyped = readNumber('throatDiameter', form.throatDiameter, 'throat diameter')
  const throatArea = forField('throatDiameter', 'The throat diameter must be greater than 0.', () =>
    areaFromDiameter(toSI(throatTyped, form.throatDiameterUnit)),
  )
  const exitText = String(form.exitDiameter).trim()
  const exitTyped = exitText === '' ? null : readNumber('exitDiameter', exitText, 'exit diameter')
  const exitMessage = `The exit diameter must be at least the throat diameter (${throatTyped} ${unitLabel(form.throatDiameterUnit)}), or left empty for a plain orifice.`
  const exitArea =
    exitTyped === null
      ? undefined
      : forField('exitDiameter', 'The exit diameter must be greater than 0, or left empty for a plain orifice.', () =>
          areaFromDiameter(toSI(exitTyped, form.exitDiameterUnit)),
        )
  const dischargeCoefficient = readNumber('dischargeCoefficient', form.dischargeCoefficient, 'discharge coefficient')
  const duration = readNumber('duration', form.duration, 'duration')
  const gamma = readNumber('gamma', form.gamma, 'ratio of specific heats')
  const gasConstant = readNumber('gasConstant', form.gasConstant, 'gas constant')

  return withArgumentFields(
    {
      volume: { field: 'volume', message: () => 'The receiver volume must be greater than 0.' },
      initialPressure: { field: 'initialPressure', message: () => 'The initial pressure must be above 0 (absolute).' },
      ambientPressure:
        ambient < 0
          ? AMBIENT_NEGATIVE
          : {
              field: 'initialPressure',
              message: () =>
                `The initial pressure (${formatPressure(initial, pressureUnit)} absolute) must be above the ambient pressure (${formatPressure(ambient, pressureUnit)}): otherwise nothing flows out.`,
            },
      initialTemperature: { field: 'initialTemperature', message: () => temperatureMessage },
      throatArea: { field: 'throatDiameter', message: () => 'The throat diameter must be greater than 0.' },
      exitArea: { field: 'exitDiameter', message: () => exitMessage },
      dischargeCoefficient: {
        field: 'dischargeCoefficient',
        message: () => 'The discharge coefficient must be greater than 0 and at most 1 (a smooth nozzle: about 0.98).',
      },
      duration: { field: 'duration', message: () => 'The duration must be greater than 0 s.' },
      gamma: { field: 'gamma', message: () => 'The ratio of specific heats γ must be greater than 1 (air: 1.4).' },
      gasConstant: {
        field: 'gasConstant',
        message: () => 'The gas constant must be greater than 0 (air: 287.05 J/(kg·K)).',
      },
    },
    () => {
      const run = tankBlowdown({
        volume,
        initialPressure: initial,
        initialTemperature: temperature,
        ambientPressure: ambient,
        throatArea,
        ...(exitArea === undefined ? {} : { exitArea }),
        dischargeCoefficient,
        gamma,
        gasConstant,
        process: form.process,
        duration,
        step: duration / STEPS,
      })
      const areaRatio = exitArea === undefined ? null : exitArea / throatArea
      // The same limit tankBlowdown judges choking by.
      const chokeLimit = nozzlePressureRatios(areaRatio ?? 1, gamma).chokeLimit
      const chokePressure = ambient / chokeLimit
      const last = run.time.length - 1
      const endPressure = run.pressure[last] as number
      const endTemperature = run.temperature[last] as number
      // Ideal-gas contents at the start and at the end of the run.
      const massReleased = (volume / gasConstant) * (initial / temperature - endPressure / endTemperature)
      const stopped = run.massFlow[last] === 0
      return {
        run,
        duration,
        initialPressure: initial,
        ambientPressure: ambient,
        chokePressure,
        chokeLimit,
        areaRatio,
        gamma,
        chokedFor: crossingTime(run, chokePressure),
        massReleased,
        flowStopsAt: stopped ? (run.time[last] as number) : null,
        pressureUnit,
        process: form.process,
      }
    },
  )
}

/** What {@link useBlowdownCalculator} gives the component: the fieldsets, the form to bind and the live results. */
export type BlowdownCalculator = Calculator<typeof BLOWDOWN_FIELDS, BlowdownResult>

/**
 * The blow-down calculator's form, starting from `defaults` (keys listed in
 * BlowdownCalculator.vue), and its results, recomputed a moment after each edit.
 */
export function useBlowdownCalculator(defaults: CalculatorDefaults | undefined): BlowdownCalculator {
  return useCalculator(BLOWDOWN_FIELDS, defaults, compute)
}

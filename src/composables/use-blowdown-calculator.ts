/**
 * The receiver blow-down calculator's inputs and physics (BlowdownCalculator.vue renders them): the
 * form with its starting values, the conversion of what was typed to SI, the formula library's
 * tankBlowdown with its refusals turned into plain words at the input concerned, how long the
 * throat stays choked (by the outlet's own choke limit: a converging–diverging nozzle stays choked
 * to a much higher back pressure than a plain orifice) and the mass released.
 */
import { reactive } from 'vue'
import { BLOWDOWN_PROCESSES, areaFromDiameter, nozzlePressureRatios, tankBlowdown } from '@shared/physics'
import type { Blowdown, BlowdownProcess } from '@shared/physics'
import { toSI } from '@shared/units'
import type { UnitSymbol } from '@shared/units'
import {
  absolutePressure,
  defaultChoice,
  defaultNumber,
  forField,
  formatPressure,
  readNumber,
  unitLabel,
  useLiveCalculation,
  withArgumentFields,
} from './use-calculator'
import type { LiveCalculation } from './use-calculator'
import { PRESSURE_SENSES } from '@shared/units'

/** A calculator's `defaults` prop: starting values by key, as a lab module's YAML gives them. */
type CalculatorDefaults = Partial<Record<string, number | string>>

/** The units each input offers. */
export const PRESSURE_UNITS = ['kPa', 'bar', 'psi', 'MPa'] as const satisfies readonly UnitSymbol[]
export const TEMPERATURE_UNITS = ['K', 'degC'] as const satisfies readonly UnitSymbol[]
export const LENGTH_UNITS = ['mm', 'in'] as const satisfies readonly UnitSymbol[]
export const VOLUME_UNITS = ['L', 'm3'] as const satisfies readonly UnitSymbol[]
/** Integration steps over the run: fine enough for the chart and the choked time, quick to compute. */
const STEPS = 1000

/** An optional numeric starting value: the text given (as {@link defaultNumber} reads it), or '' (left empty). */
function optionalDefault(d: CalculatorDefaults | undefined, key: string): string {
  const given = d?.[key]
  const usable =
    (typeof given === 'number' && Number.isFinite(given)) || (typeof given === 'string' && given.trim() !== '')
  return usable ? defaultNumber(d, key, 0) : ''
}

/** The inputs as typed (text) with their units and choices, starting from `d` or the built-in values. */
function blowdownForm(d: CalculatorDefaults | undefined) {
  return reactive({
    volume: defaultNumber(d, 'volume', 50),
    volumeUnit: defaultChoice<UnitSymbol>(d, 'volumeUnit', VOLUME_UNITS, 'L'),
    initialPressure: defaultNumber(d, 'initialPressure', 8),
    initialPressureUnit: defaultChoice<UnitSymbol>(d, 'initialPressureUnit', PRESSURE_UNITS, 'bar'),
    initialPressureSense: defaultChoice(d, 'initialPressureSense', PRESSURE_SENSES, 'gauge'),
    ambientPressure: defaultNumber(d, 'ambientPressure', 101.325),
    ambientPressureUnit: defaultChoice<UnitSymbol>(d, 'ambientPressureUnit', PRESSURE_UNITS, 'kPa'),
    initialTemperature: defaultNumber(d, 'initialTemperature', 20),
    initialTemperatureUnit: defaultChoice<UnitSymbol>(d, 'initialTemperatureUnit', TEMPERATURE_UNITS, 'degC'),
    throatDiameter: defaultNumber(d, 'throatDiameter', 4),
    throatDiameterUnit: defaultChoice<UnitSymbol>(d, 'throatDiameterUnit', LENGTH_UNITS, 'mm'),
    // Empty: a plain orifice (or converging nozzle) with no diverging part.
    exitDiameter: optionalDefault(d, 'exitDiameter'),
    exitDiameterUnit: defaultChoice<UnitSymbol>(d, 'exitDiameterUnit', LENGTH_UNITS, 'mm'),
    dischargeCoefficient: defaultNumber(d, 'dischargeCoefficient', 0.98),
    process: defaultChoice<BlowdownProcess>(d, 'process', BLOWDOWN_PROCESSES, 'adiabatic'),
    duration: defaultNumber(d, 'duration', 60),
    gamma: defaultNumber(d, 'gamma', 1.4),
    gasConstant: defaultNumber(d, 'gasConstant', 287.05),
  })
}

type BlowdownForm = ReturnType<typeof blowdownForm>

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
  const ambientNegative = {
    field: 'ambientPressure',
    message: () => 'The ambient pressure cannot be negative: it is an absolute pressure (about 101 kPa at sea level).',
  }
  const initialTyped = readNumber('initialPressure', form.initialPressure, 'initial pressure')
  const initial = withArgumentFields(
    {
      ambient: ambientNegative,
      gauge: {
        field: 'initialPressure',
        message: () =>
          `A gauge reading cannot be below −${formatPressure(ambient, pressureUnit)} (the ambient pressure): that would be less than a perfect vacuum.`,
      },
    },
    () => absolutePressure(initialTyped, pressureUnit, form.initialPressureSense, ambient),
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
          ? ambientNegative
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

/** What {@link useBlowdownCalculator} gives the component: the form to bind and the live results. */
export interface BlowdownCalculator extends LiveCalculation<BlowdownResult> {
  form: BlowdownForm
}

/**
 * The blow-down calculator's form, starting from `defaults` (keys listed in
 * BlowdownCalculator.vue), and its results, recomputed a moment after each edit.
 */
export function useBlowdownCalculator(defaults: CalculatorDefaults | undefined): BlowdownCalculator {
  const form = blowdownForm(defaults)
  return {
    form,
    ...useLiveCalculation(
      () => ({ ...form }),
      () => compute(form),
    ),
  }
}

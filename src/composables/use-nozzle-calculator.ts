/**
 * The converging–diverging nozzle calculator's inputs and physics (NozzleCalculator.vue renders
 * them): the form with its starting values, the conversion of what was typed to SI, the formula
 * library's nozzleFlow with its refusals turned into plain words at the input concerned, the
 * Mach-disk estimates of an under-expanded jet, where the flow separates in an over-expanded one,
 * and p/p0 and Mach number along a conical diverging section for the chart.
 */
import {
  IDEAL_EXPANSION_BAND,
  areaFromDiameter,
  isentropic,
  machDiskDistance,
  machDiskDistanceLewisCarlson,
  machFromAreaRatio,
  nozzleFlow,
} from '@shared/physics'
import type { NozzleFlow } from '@shared/physics'
import { fromSI, toSI } from '@shared/units'
import type { PressureSense, UnitSymbol } from '@shared/units'
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

/** Half-angle of the conical diverging section drawn in the chart. */
export const CONE_HALF_ANGLE_DEGREES = 15
/** Points along the diverging section in the chart. */
const PROFILE_POINTS = 80

const TAN_HALF_ANGLE = Math.tan((CONE_HALF_ANGLE_DEGREES * Math.PI) / 180)

/** Distance from the throat of the section of the given diameter in the chart's cone, in `unit`. */
function distanceFromThroat(diameter: number, throatDiameter: number, unit: UnitSymbol): number {
  return fromSI((diameter - throatDiameter) / (2 * TAN_HALF_ANGLE), unit)
}

/** The form's fieldsets and inputs, in order; NozzleCalculator.vue renders them from this list. */
export const NOZZLE_FIELDS = [
  {
    legend: 'Chamber',
    fields: [
      { key: 'chamberPressure', label: 'Chamber pressure', start: 6, units: PRESSURE_UNITS, unit: 'bar', sense: true },
      {
        key: 'chamberTemperature',
        label: 'Chamber temperature',
        start: 20,
        units: TEMPERATURE_UNITS,
        unit: 'degC',
      },
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
      { key: 'throatDiameter', label: 'Throat diameter', start: 4, units: LENGTH_UNITS, unit: 'mm' },
      { key: 'exitDiameter', label: 'Exit diameter', start: 8, units: LENGTH_UNITS, unit: 'mm' },
    ],
  },
  {
    legend: 'Gas',
    fields: [
      { key: 'gamma', label: 'Ratio of specific heats γ', start: 1.4, hint: 'Air: 1.4' },
      { key: 'gasConstant', label: 'Gas constant R', start: 287.05, unitText: 'J/(kg·K)', hint: 'Air: 287.05' },
    ],
  },
] as const satisfies readonly FieldGroup[]

/** One point of the flow along the diverging section; x and diameter in the exit diameter's unit. */
export interface ProfilePoint {
  x: number
  diameter: number
  mach: number
  pressureRatio: number
}

/** What the nozzle calculator shows, in SI except where a field says otherwise. */
export interface NozzleResult {
  flow: NozzleFlow
  chamberPressure: number
  ambientPressure: number
  gamma: number
  /** Units the person chose, for showing results in them. */
  pressureUnit: UnitSymbol
  pressureReading: PressureSense
  lengthUnit: UnitSymbol
  /**
   * Mach-disk distance, m, by Ashkenas & Sherman and by Lewis & Carlson, when the jet is
   * under-expanded and ambient > 0; null otherwise (the fits do not hold for an over-expanded or
   * ideally expanded jet, and the formula library refuses them).
   */
  machDisk: { ashkenasSherman: number; lewisCarlson: number } | null
  /** Distance of the separation point from the throat, in the exit diameter's unit, when the flow separates. */
  separationPosition: number | null
  /** Distance of the normal shock from the throat, in the exit diameter's unit, when it is in the nozzle. */
  shockPosition: number | null
  profile: ProfilePoint[]
}

/**
 * p/p0 and Mach number along a conical diverging section of the given half-angle, from the throat
 * to the exit, for the regime the flow is in: isentropic and supersonic when the exit is supersonic;
 * isentropic and subsonic (with the sonic area A* = Ae/(A/A*)(Me) below the throat) when the throat
 * is not choked; supersonic up to the normal shock and subsonic after it, at the lower stagnation
 * pressure p02 = p01·(p02/p01) and larger sonic area A*2 = At/(p02/p01), when there is one.
 */
function flowProfile(
  flow: NozzleFlow,
  throatDiameter: number,
  exitDiameter: number,
  gamma: number,
  lengthUnit: UnitSymbol,
): {
  profile: ProfilePoint[]
  shockPosition: number | null
} {
  const length = (exitDiameter - throatDiameter) / (2 * TAN_HALF_ANGLE)
  // A converging nozzle (exit = throat) has no diverging section to draw.
  if (!(length > 0)) return { profile: [], shockPosition: null }
  const at = (x: number): number => throatDiameter + 2 * x * TAN_HALF_ANGLE
  const point = (x: number, mach: number, pressureRatio: number): ProfilePoint => ({
    x: fromSI(x, lengthUnit),
    diameter: fromSI(at(x), lengthUnit),
    mach,
    pressureRatio,
  })
  // Local A/At; rounding may put it a hair below 1 at the throat.
  const areaRatioAt = (x: number): number => Math.max(1, (at(x) / throatDiameter) ** 2)
  const supersonic = (x: number): ProfilePoint => {
    const mach = machFromAreaRatio(areaRatioAt(x), gamma, 'supersonic')
    return point(x, mach, isentropic(mach, gamma).pressureRatio)
  }
  const xs = Array.from({ length: PROFILE_POINTS + 1 }, (_, i) => (length * i) / PROFILE_POINTS)

  if (flow.regime === 'subsonic') {
    // At/A* = (A/A*)(Me)/ε: the throat is wider than the (virtual) sonic section.
    const throatToSonic = isentropic(flow.exitMach, gamma).areaRatio / flow.areaRatio
    const profile = xs.map((x) => {
      const mach = machFromAreaRatio(Math.max(1, areaRatioAt(x) * throatToSonic), gamma, 'subsonic')
      return point(x, mach, isentropic(mach, gamma).pressureRatio)
    })
    return { profile, shockPosition: null }
  }
  if (flow.regime === 'shock-in-nozzle' && flow.shockArea !== null) {
    const spr = flow.stagnationPressureRatio
    const shockDiameter = throatDiameter * Math.sqrt(flow.shockArea / areaFromDiameter(throatDiameter))
    const xShock = Math.min(length, Math.max(0, (shockDiameter - throatDiameter) / (2 * TAN_HALF_ANGLE)))
    const behind = (x: number): ProfilePoint => {
      const mach = machFromAreaRatio(Math.max(1, areaRatioAt(x) * spr), gamma, 'subsonic')
      return point(x, mach, spr * isentropic(mach, gamma).pressureRatio)
    }
    const profile = [
      ...xs.filter((x) => x < xShock).map(supersonic),
      supersonic(xShock),
      behind(xShock),
      ...xs.filter((x) => x > xShock).map(behind),
    ]
    return { profile, shockPosition: fromSI(xShock, lengthUnit) }
  }
  return { profile: xs.map(supersonic), shockPosition: null }
}

type NozzleForm = CalculatorForm<InputsOf<typeof NOZZLE_FIELDS>>

function compute(form: NozzleForm): NozzleResult {
  const pressureUnit = form.chamberPressureUnit
  const lengthUnit = form.exitDiameterUnit

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

  const temperatureTyped = readNumber('chamberTemperature', form.chamberTemperature, 'chamber temperature')
  const temperatureMessage = 'The chamber temperature must be above absolute zero (0 K, −273.15 °C).'
  const temperature = forField('chamberTemperature', temperatureMessage, () =>
    toSI(temperatureTyped, form.chamberTemperatureUnit),
  )

  const throatTyped = readNumber('throatDiameter', form.throatDiameter, 'throat diameter')
  const throatDiameter = toSI(throatTyped, form.throatDiameterUnit)
  const throatArea = forField('throatDiameter', 'The throat diameter must be greater than 0.', () =>
    areaFromDiameter(throatDiameter),
  )
  const exitTyped = readNumber('exitDiameter', form.exitDiameter, 'exit diameter')
  const exitDiameter = toSI(exitTyped, form.exitDiameterUnit)
  const exitMessage = `The exit diameter must be at least the throat diameter (${throatTyped} ${unitLabel(form.throatDiameterUnit)}): the diverging section cannot be narrower than the throat.`
  const exitArea = forField(
    'exitDiameter',
    exitDiameter > 0 ? exitMessage : 'The exit diameter must be greater than 0.',
    () => areaFromDiameter(exitDiameter),
  )
  const gamma = readNumber('gamma', form.gamma, 'ratio of specific heats')
  const gasConstant = readNumber('gasConstant', form.gasConstant, 'gas constant')

  return withArgumentFields(
    {
      chamberPressure: { field: 'chamberPressure', message: () => 'The chamber pressure must be above 0 (absolute).' },
      chamberTemperature: { field: 'chamberTemperature', message: () => temperatureMessage },
      ambientPressure:
        ambient < 0
          ? AMBIENT_NEGATIVE
          : {
              field: 'chamberPressure',
              message: () =>
                `The chamber pressure (${formatPressure(chamber, pressureUnit)} absolute) must be above the ambient pressure (${formatPressure(ambient, pressureUnit)}): with no pressure drop, no gas flows.`,
            },
      throatArea: { field: 'throatDiameter', message: () => 'The throat diameter must be greater than 0.' },
      exitArea: { field: 'exitDiameter', message: () => exitMessage },
      gamma: { field: 'gamma', message: () => 'The ratio of specific heats γ must be greater than 1 (air: 1.4).' },
      gasConstant: {
        field: 'gasConstant',
        message: () => 'The gas constant must be greater than 0 (air: 287.05 J/(kg·K)).',
      },
    },
    () => {
      const flow = nozzleFlow({
        chamberPressure: chamber,
        chamberTemperature: temperature,
        ambientPressure: ambient,
        throatArea,
        exitArea,
        gamma,
        gasConstant,
      })
      // The same test the library applies to the exit pressure, so it never refuses what is shown.
      const underexpanded =
        flow.regime === 'underexpanded' && ambient > 0 && flow.exitPressure > ambient / (1 - IDEAL_EXPANSION_BAND)
      const machDisk = underexpanded
        ? {
            ashkenasSherman: machDiskDistance(exitDiameter, chamber, ambient, flow.exitPressure),
            lewisCarlson: machDiskDistanceLewisCarlson(exitDiameter, flow.exitMach, flow.exitPressure, ambient, gamma),
          }
        : null
      const separationPosition =
        flow.separationAreaRatio === null
          ? null
          : distanceFromThroat(Math.sqrt(flow.separationAreaRatio) * throatDiameter, throatDiameter, lengthUnit)
      const { profile, shockPosition } = flowProfile(flow, throatDiameter, exitDiameter, gamma, lengthUnit)
      return {
        flow,
        chamberPressure: chamber,
        ambientPressure: ambient,
        gamma,
        pressureUnit,
        pressureReading: form.chamberPressureReading,
        lengthUnit,
        machDisk,
        separationPosition,
        shockPosition,
        profile,
      }
    },
  )
}

/** What {@link useNozzleCalculator} gives the component: the fieldsets, the form to bind and the live results. */
export type NozzleCalculator = Calculator<typeof NOZZLE_FIELDS, NozzleResult>

/**
 * The nozzle calculator's form, starting from `defaults` (keys listed in NozzleCalculator.vue), and
 * its results, recomputed a moment after each edit.
 */
export function useNozzleCalculator(defaults: CalculatorDefaults | undefined): NozzleCalculator {
  return useCalculator(NOZZLE_FIELDS, defaults, compute)
}

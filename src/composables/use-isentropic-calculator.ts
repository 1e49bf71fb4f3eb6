/**
 * The isentropic-flow and normal-shock calculator's inputs and physics (IsentropicCalculator.vue
 * renders them): the quantity the person starts from (a Mach number, an area ratio on a branch, or
 * a pressure ratio) and γ, turned by the formula library into the Mach number, the isentropic
 * ratios and, at Mach 1 or above, the Prandtl–Meyer angle and the normal shock.
 */
import { reactive } from 'vue'
import {
  FLOW_BRANCHES,
  isentropic,
  machFromAreaRatio,
  machFromPressureRatio,
  normalShock,
  prandtlMeyer,
} from '@shared/physics'
import type { FlowBranch, IsentropicRatios, NormalShock } from '@shared/physics'
import { defaultChoice, defaultNumber, readNumber, useLiveCalculation, withArgumentFields } from './use-calculator'
import type { ArgumentFields, CalculatorDefaults, LiveCalculation } from './use-calculator'

export type StartFrom = 'mach' | 'areaRatio' | 'pressureRatio'
const START_FROM: readonly StartFrom[] = ['mach', 'areaRatio', 'pressureRatio']

/** The inputs as typed, starting from `d` (the `input` key picks the quantity to start from) or the built-in values. */
function isentropicForm(d: CalculatorDefaults | undefined) {
  return reactive({
    startFrom: defaultChoice(d, 'input', START_FROM, 'mach'),
    mach: defaultNumber(d, 'mach', 2),
    areaRatio: defaultNumber(d, 'areaRatio', 2),
    branch: defaultChoice<FlowBranch>(d, 'branch', FLOW_BRANCHES, 'supersonic'),
    pressureRatio: defaultNumber(d, 'pressureRatio', 0.5),
    gamma: defaultNumber(d, 'gamma', 1.4),
  })
}
type IsentropicForm = ReturnType<typeof isentropicForm>

export interface IsentropicResult {
  mach: number
  gamma: number
  ratios: IsentropicRatios
  /** Prandtl–Meyer angle, degrees, when M ≥ 1. */
  prandtlMeyerDegrees: number | null
  shock: NormalShock | null
}

const gammaArgument: ArgumentFields = {
  gamma: { field: 'gamma', message: () => 'The ratio of specific heats γ must be greater than 1 (air: 1.4).' },
}

function compute(form: IsentropicForm): IsentropicResult {
  const gamma = readNumber('gamma', form.gamma, 'ratio of specific heats')
  let mach: number
  if (form.startFrom === 'mach') {
    mach = readNumber('mach', form.mach, 'Mach number')
  } else if (form.startFrom === 'areaRatio') {
    const areaRatio = readNumber('areaRatio', form.areaRatio, 'area ratio')
    mach = withArgumentFields(
      {
        ...gammaArgument,
        areaRatio: {
          field: 'areaRatio',
          message: () =>
            'The area ratio A/A* must be at least 1: no section of the flow is smaller than the sonic throat.',
        },
      },
      () => machFromAreaRatio(areaRatio, gamma, form.branch),
    )
  } else {
    const pressureRatio = readNumber('pressureRatio', form.pressureRatio, 'pressure ratio')
    mach = withArgumentFields(
      {
        ...gammaArgument,
        pressureRatio: {
          field: 'pressureRatio',
          message: () =>
            'The pressure ratio p/p₀ must be greater than 0 and at most 1: the static pressure cannot exceed the stagnation pressure.',
        },
      },
      () => machFromPressureRatio(pressureRatio, gamma),
    )
  }
  return withArgumentFields(
    {
      ...gammaArgument,
      mach: { field: 'mach', message: () => 'The Mach number must be 0 or more.' },
    },
    () => {
      const ratios = isentropic(mach, gamma)
      const supersonic = mach >= 1
      return {
        mach,
        gamma,
        ratios,
        prandtlMeyerDegrees: supersonic ? (prandtlMeyer(mach, gamma) * 180) / Math.PI : null,
        shock: supersonic ? normalShock(mach, gamma) : null,
      }
    },
  )
}

/** What {@link useIsentropicCalculator} gives the component: the form to bind and the live results. */
export interface IsentropicCalculator extends LiveCalculation<IsentropicResult> {
  form: IsentropicForm
}

/**
 * The isentropic calculator's form, starting from `defaults` (keys listed in
 * IsentropicCalculator.vue), and its results, recomputed a moment after each edit.
 */
export function useIsentropicCalculator(defaults: CalculatorDefaults | undefined): IsentropicCalculator {
  const form = isentropicForm(defaults)
  return {
    form,
    ...useLiveCalculation(
      () => ({ ...form }),
      () => compute(form),
    ),
  }
}

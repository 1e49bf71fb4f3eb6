import { onBeforeUnmount, reactive, ref, shallowRef, watch } from 'vue'
import type { Ref, ShallowRef, WatchSource } from 'vue'
import { PRESSURE_SENSES, UNITS, fromSI, gaugeToAbsolute, toSI } from '@shared/units'
import type { PressureSense, UnitSymbol } from '@shared/units'
import { formatCompact, formatNumber, unitLabel } from '@shared/format'

// The shared number and unit wording, for the calculators and everything that imports it from here.
export { formatCompact, formatNumber, unitLabel }

/**
 * Helpers shared by the live calculators (src/components/calculators/): reading what a person
 * typed, turning the formula library's RangeErrors into a plain sentence at the input they concern,
 * and re-computing a short moment after the last keystroke.
 *
 * The formula library is the one place where the allowed ranges are checked. The calculators do
 * not re-check them; they run the library and, when it refuses, say in plain words which input is
 * out of range and why.
 */

/** A problem with one input of a calculator, shown next to that input. */
export class FieldError extends Error {
  constructor(
    /** The calculator's key for the input, e.g. 'exitDiameter'. */
    readonly field: string,
    message: string,
  ) {
    super(message)
    this.name = 'FieldError'
  }
}

// Decimal numbers with an optional exponent; no hex, no "Infinity", no thousands separators.
const NUMBER_PATTERN = /^[-+]?(?:\d+\.?\d*|\.\d+)(?:e[-+]?\d+)?$/i

/**
 * Reads a number a person typed. A lone decimal comma ("2,5") is read as a decimal point.
 *
 * @param field - the calculator's key for the input, for the error
 * @param text - what was typed
 * @param what - the input named in words, e.g. 'throat diameter'
 * @throws FieldError when the text is empty or not a finite decimal number
 */
export function readNumber(field: string, text: string | number, what: string): number {
  const typed = String(text).trim().replace(/\s+/g, '')
  if (typed === '') throw new FieldError(field, `Enter the ${what}.`)
  const normalised = /^[-+]?\d*,\d+$/.test(typed) ? typed.replace(',', '.') : typed
  const value = NUMBER_PATTERN.test(normalised) ? Number(normalised) : NaN
  if (!Number.isFinite(value)) {
    throw new FieldError(field, `Enter the ${what} as a number, for example 4 or 0.25.`)
  }
  return value
}

/** The argument a formula-library RangeError names ("exitArea must be …" → 'exitArea'), or null. */
export function libraryArgument(error: unknown): string | null {
  if (!(error instanceof RangeError)) return null
  const match = /^([A-Za-z][\w[\]]*) must\b/.exec(error.message)
  return match?.[1] ?? null
}

/** For each library argument name, the input it comes from and the plain sentence to show there. */
export type ArgumentFields = Record<string, { field: string; message: () => string }>

/**
 * Runs formula-library code and, when it throws a RangeError about an argument listed in
 * `argumentFields`, rethrows it as a FieldError at that input with the plain sentence. Other errors
 * pass through unchanged (the calculator then shows the library's own message).
 */
export function withArgumentFields<T>(argumentFields: ArgumentFields, run: () => T): T {
  try {
    return run()
  } catch (error) {
    const argument = libraryArgument(error)
    const entry = argument === null ? undefined : argumentFields[argument]
    if (entry) throw new FieldError(entry.field, entry.message())
    throw error
  }
}

/**
 * Runs formula-library code that concerns a single input (a unit conversion, a diameter to an
 * area) and rethrows any RangeError as a FieldError at that input.
 */
export function forField<T>(field: string, message: string, run: () => T): T {
  try {
    return run()
  } catch (error) {
    if (error instanceof RangeError) throw new FieldError(field, message)
    throw error
  }
}

/** The two senses, for the gauge/absolute pickers. */
export const PRESSURE_SENSE_OPTIONS: readonly { label: string; value: PressureSense }[] = PRESSURE_SENSES.map(
  (value) => ({ label: value, value }),
)

/**
 * An absolute pressure in Pa from a typed value, its unit and its reading, converted by the unit
 * table and, for a gauge reading, gaugeToAbsolute with the given ambient pressure.
 */
export function absolutePressure(value: number, unit: UnitSymbol, reading: PressureSense, ambient: number): number {
  const si = toSI(value, unit)
  return reading === 'gauge' ? gaugeToAbsolute(si, ambient) : si
}

/** Where a negative ambient pressure is shown, and what it says (it is an absolute pressure). */
export const AMBIENT_NEGATIVE = {
  field: 'ambientPressure',
  message: () => 'The ambient pressure cannot be negative: it is an absolute pressure (about 101 kPa at sea level).',
}

/**
 * {@link absolutePressure} for a pressure input `field` read as gauge or absolute: a reading the
 * library refuses is shown at that input (a gauge reading below −ambient) or at the ambient
 * pressure (a negative ambient), in plain words.
 */
export function absolutePressureAt(
  field: string,
  value: number,
  unit: UnitSymbol,
  reading: PressureSense,
  ambient: number,
): number {
  return withArgumentFields(
    {
      ambient: AMBIENT_NEGATIVE,
      gauge: {
        field,
        message: () =>
          `A gauge reading cannot be below −${formatPressure(ambient, unit)} (the ambient pressure): that would be less than a perfect vacuum.`,
      },
    },
    () => absolutePressure(value, unit, reading, ambient),
  )
}

/** Options of a unit picker: the symbols given, each with its written label and its name as a hint. */
export function unitOptions(units: readonly UnitSymbol[]): { label: string; value: UnitSymbol; name: string }[] {
  return units.map((u) => ({ label: unitLabel(u), value: u, name: UNITS[u].name }))
}

/** A pressure in Pa absolute written in the given unit, e.g. "701.33 kPa". */
export function formatPressure(pascal: number, unit: UnitSymbol, significant = 5): string {
  return `${formatNumber(fromSI(pascal, unit), significant)} ${unitLabel(unit)}`
}

/** What {@link useLiveCalculation} exposes to a calculator. */
export interface LiveCalculation<R> {
  /** The latest result, or null while an input is out of range. */
  result: ShallowRef<R | null>
  /** Plain-words problems by input key; at most one input is marked at a time. */
  fieldErrors: Ref<Record<string, string>>
  /** A problem not tied to one input (shown above the results), or ''. */
  formError: Ref<string>
  /** True between an edit and the re-computation it triggers (drives aria-busy on the results). */
  pending: Ref<boolean>
}

/**
 * Computes a calculator's results from its inputs now and again a short moment after each edit.
 *
 * `compute` throws a FieldError for a problem at one input (see {@link withArgumentFields}); any
 * other error is shown whole above the results, so nothing fails silently.
 *
 * @param source - the inputs to watch (deeply)
 * @param compute - turns the current inputs into results, or throws
 * @param delayMs - how long after the last edit to re-compute
 */
export function useLiveCalculation<R>(source: WatchSource, compute: () => R, delayMs = 200): LiveCalculation<R> {
  const result = shallowRef<R | null>(null)
  const fieldErrors = ref<Record<string, string>>({})
  const formError = ref('')
  const pending = ref(false)
  let timer: ReturnType<typeof setTimeout> | undefined

  function run(): void {
    timer = undefined
    try {
      result.value = compute()
      fieldErrors.value = {}
      formError.value = ''
    } catch (error) {
      result.value = null
      if (error instanceof FieldError) {
        fieldErrors.value = { [error.field]: error.message }
        formError.value = ''
      } else {
        fieldErrors.value = {}
        formError.value =
          error instanceof RangeError
            ? `The formula library cannot use these inputs: ${error.message}.`
            : `The calculation failed: ${error instanceof Error ? error.message : String(error)}.`
      }
    } finally {
      pending.value = false
    }
  }

  watch(
    source,
    () => {
      pending.value = true
      if (timer !== undefined) clearTimeout(timer)
      timer = setTimeout(run, delayMs)
    },
    { deep: true },
  )
  onBeforeUnmount(() => {
    if (timer !== undefined) clearTimeout(timer)
  })
  run()
  return { result, fieldErrors, formError, pending }
}

/**
 * Reads a calculator's `defaults` prop: a number (or a numeric string) for a numeric input, as the
 * text the input starts with; anything else keeps the built-in default.
 */
export function defaultNumber(
  defaults: Partial<Record<string, number | string>> | undefined,
  key: string,
  fallback: number,
): string {
  const given = defaults?.[key]
  if (typeof given === 'number' && Number.isFinite(given)) return String(given)
  if (typeof given === 'string' && given.trim() !== '') return given.trim()
  return String(fallback)
}

/** Reads a choice from a calculator's `defaults` prop, keeping the built-in default unless it is one of `allowed`. */
export function defaultChoice<T extends string>(
  defaults: Partial<Record<string, number | string>> | undefined,
  key: string,
  allowed: readonly T[],
  fallback: T,
): T {
  const given = defaults?.[key]
  return typeof given === 'string' && (allowed as readonly string[]).includes(given) ? (given as T) : fallback
}

/** A calculator's `defaults` prop: starting values by key, as a lab module's YAML gives them. */
export type CalculatorDefaults = Partial<Record<string, number | string>>

/**
 * One numeric input of a calculator. Its form keys are `key` (the typed text), `${key}Unit` when it
 * offers units, and `${key}Reading` when it has a gauge/absolute picker; the `defaults` prop uses
 * the same keys.
 */
export interface NumberField {
  readonly key: string
  /** The visible label, without the unit. */
  readonly label: string
  /** The built-in starting value; null for an optional input that starts empty. */
  readonly start: number | null
  /** Units offered in a picker, and the one it starts in (the first when not given). */
  readonly units?: readonly UnitSymbol[]
  readonly unit?: UnitSymbol
  /** A fixed unit written beside the box, when there is no choice. */
  readonly unitText?: string
  readonly hint?: string
  /** A pressure read gauge or absolute: a gauge/absolute picker beside it, starting at gauge. */
  readonly sense?: true
}

/** A choice between a few named options (e.g. the receiver's process), shown as buttons. */
export interface ChoiceField {
  readonly key: string
  readonly label: string
  readonly choices: readonly { readonly label: string; readonly value: string }[]
  readonly start: string
  /** A sentence under the buttons explaining the choice. */
  readonly hint?: string
}

export type CalculatorInput = NumberField | ChoiceField

/** A fieldset of a calculator's form: its legend and its inputs, in order. */
export interface FieldGroup {
  readonly legend: string
  readonly fields: readonly CalculatorInput[]
}

/** The inputs of a list of fieldsets. */
export type InputsOf<G extends readonly FieldGroup[]> = G[number]['fields'][number]

/** The form of a calculator with these inputs: typed text, chosen units, readings and choices by key. */
export type CalculatorForm<F extends CalculatorInput> = { [K in Extract<F, NumberField>['key']]: string } & {
  [K in Extract<F, { units: readonly UnitSymbol[] }>['key'] as `${K}Unit`]: UnitSymbol
} & { [K in Extract<F, { sense: true }>['key'] as `${K}Reading`]: PressureSense } & {
  [C in Extract<F, ChoiceField> as C['key']]: C['choices'][number]['value']
}

/** An optional numeric starting value: the text given (as {@link defaultNumber} reads it), or '' (left empty). */
function optionalDefault(d: CalculatorDefaults | undefined, key: string): string {
  const given = d?.[key]
  const usable =
    (typeof given === 'number' && Number.isFinite(given)) || (typeof given === 'string' && given.trim() !== '')
  return usable ? defaultNumber(d, key, 0) : ''
}

/** The form of a calculator, each input starting from `defaults` where given and usable, else its built-in value. */
export function calculatorForm<G extends readonly FieldGroup[]>(
  groups: G,
  defaults: CalculatorDefaults | undefined,
): CalculatorForm<InputsOf<G>> {
  const form: Record<string, string> = {}
  for (const f of groups.flatMap((g) => g.fields)) {
    if ('choices' in f) {
      form[f.key] = defaultChoice(
        defaults,
        f.key,
        f.choices.map((c) => c.value),
        f.start,
      )
      continue
    }
    form[f.key] = f.start === null ? optionalDefault(defaults, f.key) : defaultNumber(defaults, f.key, f.start)
    if (f.units?.length) form[`${f.key}Unit`] = defaultChoice(defaults, `${f.key}Unit`, f.units, f.unit ?? f.units[0]!)
    if (f.sense) form[`${f.key}Reading`] = defaultChoice(defaults, `${f.key}Reading`, PRESSURE_SENSES, 'gauge')
  }
  return reactive(form) as unknown as CalculatorForm<InputsOf<G>>
}

/** What a calculator composable gives its component: the fieldsets to render, the form to bind, the live results. */
export interface Calculator<G extends readonly FieldGroup[], R> extends LiveCalculation<R> {
  groups: G
  form: CalculatorForm<InputsOf<G>>
  /** Sets one form value by its key (the field list renders the inputs by key). */
  set: (key: string, value: string) => void
}

/**
 * A calculator from its fieldsets and its physics: the form built from the field list and
 * `defaults`, and the results recomputed a moment after each edit.
 */
export function useCalculator<const G extends readonly FieldGroup[], R>(
  groups: G,
  defaults: CalculatorDefaults | undefined,
  compute: (form: CalculatorForm<InputsOf<G>>) => R,
): Calculator<G, R> {
  const form = calculatorForm(groups, defaults)
  return {
    groups,
    form,
    set: (key, value) => {
      ;(form as Record<string, string>)[key] = value
    },
    ...useLiveCalculation(
      () => ({ ...form }),
      () => compute(form),
    ),
  }
}

/**
 * The hint under a pressure read as gauge: the absolute pressure it gives, once the result is in
 * the same unit as the box (so the two numbers can be compared at a glance).
 */
export function absoluteHint(
  reading: PressureSense,
  typedUnit: UnitSymbol,
  absolute: { value: number; unit: UnitSymbol } | null,
): string | undefined {
  if (!absolute || reading !== 'gauge' || absolute.unit !== typedUnit) return undefined
  return `Absolute: ${formatPressure(absolute.value, absolute.unit)}`
}

/**
 * Argument checks shared by the formula library.
 *
 * Every check throws a RangeError whose message names the argument, states the allowed range and
 * shows the value received, e.g. `gamma must be a finite number greater than 1 (got 1)`. The
 * functions may be called from JavaScript, from expressions typed by people or with values parsed
 * from uploaded files, so the checks also reject non-numbers instead of trusting the types.
 * These are not formulas, so their JSDoc has no equation or source.
 */

/**
 * Renders a received value for an error message: numbers as JavaScript prints them, others tagged
 * with their type.
 *
 * @param value - anything
 * @returns a short description
 * @example
 * describeValue(Number.NaN) // 'NaN'
 * describeValue('3')        // '"3" (a string)'
 */
export function describeValue(value: unknown): string {
  if (typeof value === 'number') return String(value)
  if (typeof value === 'string') return `"${value}" (a string)`
  if (value === null) return 'null'
  if (Array.isArray(value)) return `an array of length ${value.length}`
  return `${String(value)} (a ${typeof value})`
}

function isFiniteNumber(value: unknown): value is number {
  return typeof value === 'number' && Number.isFinite(value)
}

function fail(name: string, allowed: string, value: unknown): never {
  throw new RangeError(`${name} must be ${allowed} (got ${describeValue(value)})`)
}

/**
 * Requires a finite number (rejects NaN, ±Infinity and non-numbers).
 *
 * @param name - the argument's name, used in the message
 * @param value - the value to check
 * @returns the value
 * @example
 * requireFinite('thrust', Infinity) // throws RangeError: thrust must be a finite number (got Infinity)
 */
export function requireFinite(name: string, value: number): number {
  if (!isFiniteNumber(value)) fail(name, 'a finite number', value)
  return value
}

/**
 * Requires a finite number greater than 0.
 *
 * @param name - the argument's name
 * @param value - the value to check
 * @returns the value
 * @example
 * requirePositive('volume', 0) // throws RangeError: volume must be a finite number greater than 0 (got 0)
 */
export function requirePositive(name: string, value: number): number {
  if (!isFiniteNumber(value) || !(value > 0)) fail(name, 'a finite number greater than 0', value)
  return value
}

/**
 * Requires a finite number of at least 0.
 *
 * @param name - the argument's name
 * @param value - the value to check
 * @returns the value
 * @example
 * requireNonNegative('mach', -1) // throws RangeError: mach must be a finite number of at least 0 (got -1)
 */
export function requireNonNegative(name: string, value: number): number {
  if (!isFiniteNumber(value) || !(value >= 0)) fail(name, 'a finite number of at least 0', value)
  return value
}

/**
 * Requires a finite number of at least `bound`.
 *
 * @param name - the argument's name
 * @param value - the value to check
 * @param bound - the smallest allowed value
 * @param boundText - how the bound is named when it is not a plain constant, e.g. `throatArea (0.0001)`
 * @returns the value
 * @example
 * requireAtLeast('areaRatio', 0.5, 1) // throws RangeError: areaRatio must be a finite number of at least 1 (got 0.5)
 */
export function requireAtLeast(name: string, value: number, bound: number, boundText = String(bound)): number {
  if (!isFiniteNumber(value) || !(value >= bound)) fail(name, `a finite number of at least ${boundText}`, value)
  return value
}

/**
 * Requires a finite number strictly greater than `bound`.
 *
 * @param name - the argument's name
 * @param value - the value to check
 * @param bound - the value it must exceed
 * @param boundText - how the bound is named when it is not a plain constant
 * @returns the value
 * @example
 * requireGreaterThan('gamma', 1, 1) // throws RangeError: gamma must be a finite number greater than 1 (got 1)
 */
export function requireGreaterThan(name: string, value: number, bound: number, boundText = String(bound)): number {
  if (!isFiniteNumber(value) || !(value > bound)) fail(name, `a finite number greater than ${boundText}`, value)
  return value
}

/** One end of an interval for {@link requireInterval}; `open` excludes the end point. */
export interface IntervalEnd {
  value: number
  open: boolean
  /** How the bound is named in the message; defaults to the number. */
  text?: string
}

/**
 * Requires a finite number inside an interval whose ends may each be open or closed.
 *
 * @param name - the argument's name
 * @param value - the value to check
 * @param lower - lower end
 * @param upper - upper end
 * @returns the value
 * @example
 * requireInterval('pressureRatio', 0, { value: 0, open: true }, { value: 1, open: false })
 * // throws RangeError: pressureRatio must be a finite number greater than 0 and at most 1 (got 0)
 */
export function requireInterval(name: string, value: number, lower: IntervalEnd, upper: IntervalEnd): number {
  const lowerOk = lower.open ? value > lower.value : value >= lower.value
  const upperOk = upper.open ? value < upper.value : value <= upper.value
  if (!isFiniteNumber(value) || !lowerOk || !upperOk) {
    const lowText = lower.text ?? String(lower.value)
    const highText = upper.text ?? String(upper.value)
    const low = lower.open ? `greater than ${lowText}` : `of at least ${lowText}`
    const high = upper.open ? `less than ${highText}` : `at most ${highText}`
    fail(name, `a finite number ${low} and ${high}`, value)
  }
  return value
}

/**
 * Requires a ratio of specific heats: a finite number greater than 1.
 *
 * @param gamma - the value to check
 * @param name - the argument's name, 'gamma' unless given
 * @returns the value
 * @example
 * requireGamma(1) // throws RangeError: gamma must be a finite number greater than 1 (got 1)
 */
export function requireGamma(gamma: number, name = 'gamma'): number {
  return requireGreaterThan(name, gamma, 1)
}

/**
 * Requires one of a fixed set of strings.
 *
 * @param name - the argument's name
 * @param value - the value to check
 * @param options - the allowed strings
 * @returns the value, typed as one of the options
 * @example
 * requireOneOf('branch', 'up', ['weak', 'strong']) // throws RangeError: branch must be one of 'weak', 'strong' (got "up" (a string))
 */
export function requireOneOf<T extends string>(name: string, value: unknown, options: readonly T[]): T {
  if (typeof value !== 'string' || !(options as readonly string[]).includes(value)) {
    fail(name, `one of ${options.map((o) => `'${o}'`).join(', ')}`, value)
  }
  return value as T
}

/**
 * Requires an array of finite numbers with at least `minLength` entries; the message names the bad index.
 *
 * @param name - the argument's name
 * @param values - the array to check
 * @param minLength - the fewest samples allowed
 * @returns the array
 * @example
 * requireSamples('thrust', [1, Number.NaN], 2) // throws RangeError: thrust[1] must be a finite number (got NaN)
 */
export function requireSamples(name: string, values: readonly number[], minLength = 1): readonly number[] {
  requireSampleCount(name, values, minLength)
  // A plain loop: logs of 50 000 samples are checked several times per hand-in.
  for (let i = 0; i < values.length; i++) {
    const v = values[i]
    if (!isFiniteNumber(v)) fail(`${name}[${i}]`, 'a finite number', v)
  }
  return values
}

/**
 * The part of {@link requireSamples} that does not read the entries: an array of at least
 * `minLength` entries, with the same messages. For callers that know the entries are finite
 * numbers already (checked once when they were made).
 *
 * @param name - the argument's name
 * @param values - the array to check
 * @param minLength - the fewest samples allowed
 * @example
 * requireSampleCount('time', [0], 2) // throws RangeError: time must have at least 2 samples (got 1)
 */
export function requireSampleCount(name: string, values: readonly number[], minLength = 1): void {
  if (!Array.isArray(values)) fail(name, `an array of at least ${minLength} finite numbers`, values)
  if (values.length < minLength) {
    throw new RangeError(`${name} must have at least ${minLength} samples (got ${values.length})`)
  }
}

/**
 * Requires two sample arrays of equal length.
 *
 * @param nameA - the first argument's name
 * @param a - the first array
 * @param nameB - the second argument's name
 * @param b - the second array
 * @example
 * requireSameLength('time', [0, 1], 'thrust', [5]) // throws RangeError: time and thrust must have the same length (got 2 and 1)
 */
export function requireSameLength(nameA: string, a: readonly unknown[], nameB: string, b: readonly unknown[]): void {
  if (a.length !== b.length) {
    throw new RangeError(`${nameA} and ${nameB} must have the same length (got ${a.length} and ${b.length})`)
  }
}

/**
 * Requires a plain object of named inputs (for the functions that take one).
 *
 * @param name - the argument's name
 * @param value - the value to check
 * @example
 * requireObject('input', null) // throws RangeError: input must be an object of named inputs (got null)
 */
export function requireObject(name: string, value: unknown): void {
  if (typeof value !== 'object' || value === null || Array.isArray(value))
    fail(name, 'an object of named inputs', value)
}

/**
 * Module expressions: the expected value of a result and the condition of a review rule, written
 * in the mathjs expression language and run in a locked-down mathjs instance — never by `eval`.
 *
 * ## What an expression sees
 * - **Data, in SI with absolute pressures.** Every table column is an array of numbers under its
 *   column key, every measurement a number under its key. Values are converted from their declared
 *   unit to SI (Pa, N, m, m², m³, K, kg, s) and gauge pressures are made absolute by adding the
 *   submission's ambient pressure (the measurement with `role: ambient-pressure`) before any
 *   expression runs; see `scope.ts`. So `pc / pa` is a ratio of absolute pressures even when the
 *   students typed gauge kPa.
 * - **Expected-value expressions see only the data.** They must give a number in SI (N·s for an
 *   impulse, s for a specific impulse, 1 for a Mach number); the grading engine converts it to the
 *   result's declared unit.
 * - **Review rules see the data and the reported results** (each under its result key, converted
 *   to SI in the same way), and must give true (flag the submission) or false.
 * - **Functions:** the formula library (isentropic, machFromAreaRatio, machFromPressureRatio,
 *   criticalPressureRatio, normalShock, prandtlMeyer, nozzleFlow, nozzlePressureRatios,
 *   chokedMassFlow, idealThrust, machDiskDistance, machDiskDistanceLewisCarlson, fullyExpandedJet,
 *   shockCellSpacing, totalImpulse, specificImpulse,
 *   characteristicVelocity, thrustCoefficient, meanValue, peakValue, areaFromDiameter,
 *   reduceThrustRun, windowMean, windowIntegral, idealSpecificImpulse), the thermochemistry library
 *   (combustion, mixtureRatioFromEquivalenceRatio, equivalenceRatioFromMixtureRatio; shared/thermo),
 *   the constant
 *   G0, the helpers at, argmax, argmin, interp, select and regimeCode defined below, and the plain
 *   mathematics listed in `expression-names.ts` (sqrt, exp, log, min, max, mean, sum, …).
 *   Arithmetic on arrays is element-wise with the dotted operators (`F ./ pc`); comparisons of an
 *   array give an array of true/false (`pa ./ pc < 0.5`) for `select`.
 * - **Result objects:** `nozzleFlow({chamberPressure: …, …}).exitMach`, `isentropic(M, 1.4).areaRatio`,
 *   `normalShock(M, 1.4).mach2` and `nozzlePressureRatios(eps, 1.4).chokeLimit` read one field of
 *   the library's result, and `reduceThrustRun(t, thrust).totalImpulse` (or .zeroBefore, .zeroAfter,
 *   .start, .end, .burnTime, .peakThrust, .meanThrust) one field of the reduced run — tared, its
 *   window found, see shared/physics/thrust-run.ts; `reduceThrustRun(t, thrust, {threshold: 0.1})`
 *   sets the window's threshold. That is the only property access allowed. The means and integrals
 *   over the run window are `windowMean(t, x, start, end)` and `windowIntegral(t, x, start, end)`,
 *   e.g. `windowMean(t, p_chamber, reduceThrustRun(t, thrust).start, reduceThrustRun(t, thrust).end)`
 *   (the run is reduced once however often it is named).
 * - **Combustion:** `combustion({fuel: "propane", equivalenceRatio: phi, pressure: pc})` (and
 *   optionally `reactantTemperature: t_air`, else 298.15 K) gives the equilibrium products of the
 *   fuel burnt with air (O2 + 3.76 N2) at constant pressure: `.temperature` (K), `.molarMass`
 *   (kg/mol), `.gamma`, `.cp`, `.characteristicVelocity` (m/s), `.mixtureRatio` (air–fuel mass
 *   ratio) and `.moleFractions.CO2` (one species). The fuel is written as text in quotes: "methane",
 *   "propane" or "hydrogen". `mixtureRatioFromEquivalenceRatio("propane", phi)` and
 *   `equivalenceRatioFromMixtureRatio("propane", m_air / m_fuel)` convert between the two. The
 *   library keeps recent results keyed on the inputs, so a module that names the same mixture in
 *   several results works it out once.
 *
 * ## What is refused
 * Assignments, function definitions, several statements, ranges, indexing with brackets (use
 * `at(values, i)`), property access on anything else, unknown names, unit arithmetic, and the
 * mathjs functions that parse, compile or define (import, evaluate, parse, createUnit, …). Those
 * are also replaced in the mathjs instance by functions that throw, following
 * https://mathjs.org/docs/expressions/security.html — a second wall behind the allowlist.
 */
import { all, create } from 'mathjs'
import type { MathNode } from 'mathjs'
import {
  G0,
  NOZZLE_REGIMES,
  areaFromDiameter,
  characteristicVelocity,
  chokedMassFlow,
  criticalPressureRatio,
  idealSpecificImpulse,
  idealThrust,
  isentropic,
  fullyExpandedJet,
  machDiskDistance,
  machDiskDistanceLewisCarlson,
  machFromAreaRatio,
  machFromPressureRatio,
  meanValue,
  shockCellSpacing,
  normalShock,
  nozzleFlow,
  nozzlePressureRatios,
  peakValue,
  prandtlMeyer,
  specificImpulse,
  thrustCoefficient,
  totalImpulse,
  windowIntegral,
  windowMean,
} from '../physics'
import type { ThrustRun, ThrustRunOptions } from '../physics'
import { combustion, equivalenceRatioFromMixtureRatio, mixtureRatioFromEquivalenceRatio } from '../thermo'
import { runResult } from '../physics/thrust-run'
import { windowOfCheckedSamples } from '../physics/window'
import { knownFinite, knownIncreasing } from './checked-columns'
import { cachedThrustRun } from './run-cache'
import {
  CONSTANTS,
  DISABLED_FUNCTIONS,
  FUNCTIONS,
  OBJECT_ARGUMENTS,
  OPERATORS,
  OPTIONAL_OBJECT_ARGUMENTS,
  OPTION_ARGUMENTS,
  RESULT_FIELDS,
} from './expression-names'
import type { FieldTree } from './expression-names'
import { MAX_EXPRESSION_LENGTH, MAX_LIST_VALUES } from './schema'
import type { Assignment } from './schema'
import { buildExpressionScope, syntheticSubmission, ScopeError } from './scope'
import type { ExpressionScope, ExpressionValue } from './scope'
import { valueFromSI } from './quantities'
import { imageNames } from './image-spec'

/** An expression that cannot be parsed, is refused, or fails when evaluated. */
export class ExpressionError extends Error {
  constructor(
    message: string,
    /** 0-based character position of a parse error, when known. */
    readonly position?: number,
  ) {
    super(message)
    this.name = 'ExpressionError'
  }
}

// ---------------------------------------------------------------------------------------------
// Helpers that exist only in expressions. Indices count from 1, as everywhere in mathjs.

function requireNumbers(fn: string, name: string, values: unknown): readonly number[] {
  if (!Array.isArray(values)) throw new RangeError(`${fn}: ${name} must be a list of numbers (a table column)`)
  values.forEach((v, i) => {
    if (typeof v !== 'number' || !Number.isFinite(v)) {
      throw new RangeError(`${fn}: ${name}[${i + 1}] must be a finite number (got ${String(v)})`)
    }
  })
  return values as readonly number[]
}

/** at(values, i): the i-th sample, counting from 1. */
function at(values: unknown, index: unknown): number {
  const xs = requireNumbers('at', 'values', values)
  if (typeof index !== 'number' || !Number.isInteger(index) || index < 1 || index > xs.length) {
    throw new RangeError(`at: the index must be a whole number from 1 to ${xs.length} (got ${String(index)})`)
  }
  return xs[index - 1] as number
}

function argExtreme(fn: string, values: unknown, better: (a: number, b: number) => boolean): number {
  const xs = requireNumbers(fn, 'values', values)
  if (xs.length === 0) throw new RangeError(`${fn}: the list is empty`)
  let best = 0
  for (let i = 1; i < xs.length; i++) if (better(xs[i] as number, xs[best] as number)) best = i
  return best + 1
}

/** argmax(values): index (from 1) of the first largest sample. */
const argmax = (values: unknown) => argExtreme('argmax', values, (a, b) => a > b)
/** argmin(values): index (from 1) of the first smallest sample. */
const argmin = (values: unknown) => argExtreme('argmin', values, (a, b) => a < b)

/** interp(x, xs, ys): linear interpolation; xs strictly increasing, x within [xs₁, xsₙ]. */
function interp(x: unknown, xs: unknown, ys: unknown): number {
  if (typeof x !== 'number' || !Number.isFinite(x))
    throw new RangeError(`interp: x must be a finite number (got ${String(x)})`)
  const a = requireNumbers('interp', 'xs', xs)
  const b = requireNumbers('interp', 'ys', ys)
  if (a.length !== b.length || a.length < 2) {
    throw new RangeError(`interp: xs and ys must have the same length, at least 2 (got ${a.length} and ${b.length})`)
  }
  for (let i = 1; i < a.length; i++) {
    if (!((a[i] as number) > (a[i - 1] as number)))
      throw new RangeError(`interp: xs must increase (xs[${i}] ≥ xs[${i + 1}])`)
  }
  const first = a[0] as number
  const last = a[a.length - 1] as number
  if (x < first || x > last) throw new RangeError(`interp: x = ${x} is outside the table (${first} to ${last})`)
  let i = 1
  while ((a[i] as number) < x) i++
  const x0 = a[i - 1] as number
  const x1 = a[i] as number
  const y0 = b[i - 1] as number
  const y1 = b[i] as number
  return y0 + ((y1 - y0) * (x - x0)) / (x1 - x0)
}

/** select(values, flags): the samples whose flag is true, in order. */
function select(values: unknown, flags: unknown): number[] {
  const xs = requireNumbers('select', 'values', values)
  if (!Array.isArray(flags) || flags.length !== xs.length) {
    throw new RangeError(`select: flags must be a list of true/false as long as the values (${xs.length})`)
  }
  const out: number[] = []
  flags.forEach((f, i) => {
    if (typeof f !== 'boolean') throw new RangeError(`select: flags[${i + 1}] must be true or false (got ${String(f)})`)
    if (f) out.push(xs[i] as number)
  })
  return out
}

/**
 * reduceThrustRun(t, thrust[, {threshold}]): the library's reduction, computed once per run and
 * grading however many of its fields the module reads (see run-cache.ts).
 */
function reduceThrustRun(time: readonly number[], thrust: readonly number[], options?: ThrustRunOptions): ThrustRun {
  return runResult(cachedThrustRun(time, thrust, options))
}

/**
 * windowIntegral and windowMean as expressions call them: on columns the scope has checked
 * (checked-columns.ts) the library skips reading every sample again; anything else gets every
 * check. Same results and messages either way.
 */
function windowIntegralInScope(time: readonly number[], values: readonly number[], start: number, end: number): number {
  return knownIncreasing(time) && knownFinite(values)
    ? windowOfCheckedSamples.integral(time, values, start, end)
    : windowIntegral(time, values, start, end)
}
function windowMeanInScope(time: readonly number[], values: readonly number[], start: number, end: number): number {
  return knownIncreasing(time) && knownFinite(values)
    ? windowOfCheckedSamples.mean(time, values, start, end)
    : windowMean(time, values, start, end)
}

/** regimeCode(regime): 1 subsonic, 2 shock in nozzle, 3 over-expanded, 4 ideal, 5 under-expanded. */
function regimeCode(regime: unknown): number {
  const i = (NOZZLE_REGIMES as readonly unknown[]).indexOf(regime)
  if (i < 0)
    throw new RangeError(`regimeCode: unknown regime ${String(regime)}; expected one of ${NOZZLE_REGIMES.join(', ')}`)
  return i + 1
}

// ---------------------------------------------------------------------------------------------
// The locked-down mathjs instance.

// The type declarations mark `all` optional; it is always present in the package.
if (!all) throw new Error('mathjs: the "all" factory map is missing')
const math = create(all, {
  // Arrays stay plain JavaScript arrays, so totalImpulse(t, F) receives number[].
  matrix: 'Array',
  // sqrt(-1) gives NaN (then reported) instead of a complex number.
  predictable: true,
})

// Our own references, taken before the public names are disabled below.
const parseExpression = math.parse

const scopeFunctions = {
  isentropic,
  machFromAreaRatio,
  machFromPressureRatio,
  criticalPressureRatio,
  normalShock,
  prandtlMeyer,
  nozzleFlow,
  nozzlePressureRatios,
  chokedMassFlow,
  idealThrust,
  machDiskDistance,
  machDiskDistanceLewisCarlson,
  fullyExpandedJet,
  shockCellSpacing,
  totalImpulse,
  specificImpulse,
  characteristicVelocity,
  thrustCoefficient,
  meanValue,
  peakValue,
  areaFromDiameter,
  reduceThrustRun,
  windowMean: windowMeanInScope,
  windowIntegral: windowIntegralInScope,
  idealSpecificImpulse,
  combustion,
  mixtureRatioFromEquivalenceRatio,
  equivalenceRatioFromMixtureRatio,
  at,
  argmax,
  argmin,
  interp,
  select,
  regimeCode,
  G0,
}
// None of these may replace a mathjs function. Some are names of valueless units ("at" is the
// technical atmosphere), which mathjs's import refuses without `override`; a call at(…) resolves to
// the function all the same, and a bare unit name is refused by the allowlist.
for (const name of Object.keys(scopeFunctions)) {
  if (name in math) throw new Error(`mathjs already has "${name}"; rename the expression helper`)
}
math.import(scopeFunctions, { override: true })

// Element-wise arithmetic and comparisons on plain number arrays (a logged column against a
// column or a number) take a direct loop instead of mathjs's generic matrix machinery, which
// costs about 0.3 µs per element; on a 50 000-sample log that dominated the grading step.
// Anything else (nested arrays, units, unequal lengths, which give mathjs's own error) goes
// to the original function unchanged. Other mathjs functions (sum, max…) are rebuilt on these,
// so two plain numbers take the same direct path.
type Elementwise = (a: number, b: number) => number | boolean
const FAST_ELEMENTWISE: Record<string, Elementwise> = {
  add: (a, b) => a + b,
  subtract: (a, b) => a - b,
  multiply: (a, b) => a * b,
  divide: (a, b) => a / b,
  dotMultiply: (a, b) => a * b,
  dotDivide: (a, b) => a / b,
  // mathjs compares numbers with a tolerance: a < b only when they are not nearly equal
  // (mathjs's nearlyEqual with its configured relTol/absTol), reproduced exactly here.
  smaller: (a, b) => a < b && !nearlyEqual(a, b),
  larger: (a, b) => a > b && !nearlyEqual(a, b),
  smallerEq: (a, b) => a <= b || nearlyEqual(a, b),
  largerEq: (a, b) => a >= b || nearlyEqual(a, b),
}
// This instance's configuration never changes after creation.
const { relTol, absTol } = math.config({}) as unknown as { relTol: number; absTol: number }
function nearlyEqual(a: number, b: number): boolean {
  if (Number.isNaN(a) || Number.isNaN(b)) return false
  if (!Number.isFinite(a) || !Number.isFinite(b)) return a === b
  if (a === b) return true
  return Math.abs(a - b) <= Math.max(relTol * Math.max(Math.abs(a), Math.abs(b)), absTol)
}
/** op over two equal-length arrays, element by element (a plain loop: map with a closure costs more on 50 000 samples). */
function eachPair(a: readonly number[], b: readonly number[], op: Elementwise): (number | boolean)[] {
  const out = new Array<number | boolean>(a.length)
  for (let i = 0; i < a.length; i++) out[i] = op(a[i] as number, b[i] as number)
  return out
}
/** op of every element with a number, on the left (`left`) or on the right. */
function eachWith(a: readonly number[], x: number, op: Elementwise, left: boolean): (number | boolean)[] {
  const out = new Array<number | boolean>(a.length)
  if (left) for (let i = 0; i < a.length; i++) out[i] = op(x, a[i] as number)
  else for (let i = 0; i < a.length; i++) out[i] = op(a[i] as number, x)
  return out
}
const isNumberArray = (x: unknown): x is number[] => {
  if (knownFinite(x)) return true
  if (!Array.isArray(x)) return false
  for (const v of x) if (typeof v !== 'number') return false
  return true
}
{
  type Fn = (...args: unknown[]) => unknown
  const typed = (math as unknown as { typed: (name: string, signatures: Record<string, Fn>) => unknown }).typed
  const replacements: Record<string, unknown> = {}
  for (const [name, op] of Object.entries(FAST_ELEMENTWISE)) {
    const original = (math as unknown as Record<string, Fn>)[name]!
    // multiply/divide of two arrays are matrix products in mathjs: keep those as they are.
    const arrays: Fn | null =
      name === 'multiply' || name === 'divide'
        ? null
        : (a: unknown, b: unknown) =>
            isNumberArray(a) && isNumberArray(b) && a.length === b.length ? eachPair(a, b, op) : original(a, b)
    replacements[name] = typed(name, {
      'number, number': (a: unknown, b: unknown) => op(a as number, b as number),
      ...(arrays ? { 'Array, Array': arrays } : {}),
      'Array, number': (a: unknown, b: unknown) =>
        isNumberArray(a) ? eachWith(a, b as number, op, false) : original(a, b),
      'number, Array': (a: unknown, b: unknown) =>
        isNumberArray(b) ? eachWith(b, a as number, op, true) : original(a, b),
      'any, any': (a: unknown, b: unknown) => original(a, b),
      // add(a, b, c, …) and multiply(a, b, c, …) keep taking any number of arguments.
      ...(name === 'add' || name === 'multiply'
        ? { 'any, any, ...any': (a: unknown, b: unknown, rest: unknown) => original(a, b, ...(rest as unknown[])) }
        : {}),
    })
  }
  math.import(replacements, { override: true })
}

// max(column) and min(column) of one plain number array take a direct loop too: mathjs walks the
// array with its generic deep-forEach (about 1 ms per 50 000 samples), and a module reads
// max(p_chamber) several times. The loop keeps mathjs's rule exactly: a later value replaces the
// one held only when it is larger (smaller) and not nearly equal to it. Anything else — several
// arguments, a dimension, an empty list, NaN or ±Infinity — goes to mathjs unchanged.
{
  type Fn = (...args: unknown[]) => unknown
  const typed = (math as unknown as { typed: (name: string, signatures: Record<string, Fn>) => unknown }).typed
  // sign +1 finds the largest, −1 the smallest (comparing sign·value). A later value replaces the
  // held one only when it is beyond it by more than mathjs's nearlyEqual tolerance.
  const extreme = (name: 'max' | 'min', sign: 1 | -1) => {
    const original = (math as unknown as Record<string, Fn>)[name]!
    return typed(name, {
      Array: (a: unknown) => {
        const xs = a as unknown[]
        const first = xs[0]
        if (typeof first !== 'number' || !Number.isFinite(first)) return original(xs)
        let held = first
        for (let i = 1; i < xs.length; i++) {
          const v = xs[i]
          if (typeof v !== 'number' || !Number.isFinite(v)) return original(xs)
          const beyond = sign * (v - held)
          if (beyond > 0 && beyond > absTol && beyond > relTol * Math.max(Math.abs(v), Math.abs(held))) held = v
        }
        return held
      },
      '...any': (args: unknown) => original(...(args as unknown[])),
    })
  }
  math.import({ max: extreme('max', 1), min: extreme('min', -1) }, { override: true })
}

// https://mathjs.org/docs/expressions/security.html: replace every function that parses, compiles
// or defines things with one that throws, so even an expression that got past the allowlist could
// not reach them.
math.import(
  Object.fromEntries(
    DISABLED_FUNCTIONS.map((name) => [
      name,
      () => {
        throw new ExpressionError(`${name} is disabled in module expressions`)
      },
    ]),
  ),
  { override: true },
)

/**
 * The locked-down mathjs instance, for tests and for callers that need its arithmetic. Its
 * `evaluate`, `parse`, `import`, … throw.
 */
export const expressionMath = math

// ---------------------------------------------------------------------------------------------
// Structural check: walks the parsed expression and refuses everything outside the allowlist.

interface Refusal {
  message: string
}

const FUNCTION_NAMES = Object.keys(FUNCTIONS)
const DISABLED = new Set(DISABLED_FUNCTIONS)
const CONSTANT_NAMES = new Set(CONSTANTS)
const OBJECT_FUNCTIONS = Object.keys(RESULT_FIELDS).join(', ')

function editDistance(a: string, b: string): number {
  const row = Array.from({ length: b.length + 1 }, (_, j) => j)
  for (let i = 1; i <= a.length; i++) {
    let diagonal = row[0] as number
    row[0] = i
    for (let j = 1; j <= b.length; j++) {
      const above = row[j] as number
      row[j] = Math.min(above + 1, (row[j - 1] as number) + 1, diagonal + (a[i - 1] === b[j - 1] ? 0 : 1))
      diagonal = above
    }
  }
  return row[b.length] as number
}

/** The closest known name, if one is close enough to be a likely typo. */
function closest(name: string, candidates: Iterable<string>): string | undefined {
  let best: string | undefined
  let bestDistance = Infinity
  const lower = name.toLowerCase()
  for (const c of candidates) {
    const d = c.toLowerCase() === lower ? 0 : editDistance(lower, c.toLowerCase())
    if (d < bestDistance) {
      best = c
      bestDistance = d
    }
  }
  return best !== undefined && bestDistance <= Math.max(1, Math.floor(name.length / 3)) ? best : undefined
}

function describeArity(name: string, min: number, max: number): string {
  if (min === max) return `${name} takes ${min} argument${min === 1 ? '' : 's'}`
  if (max === Infinity) return `${name} takes at least ${min} argument${min === 1 ? '' : 's'}`
  return `${name} takes ${min} to ${max} arguments`
}

/** Values written out in a list literal, nested lists' entries included. */
function listValues(node: MathNode): number {
  if (math.isParenthesisNode(node)) return listValues(node.content)
  if (!math.isArrayNode(node)) return 1
  let n = 0
  for (const item of node.items) n += listValues(item)
  return n
}

function tooManyListValues(values: number): string {
  return `a list written out in the expression has ${values} values; at most ${MAX_LIST_VALUES} are allowed in one list`
}

/**
 * The first size budget an expression breaks, in words, or null. Checked before anything runs
 * it: its length ({@link MAX_EXPRESSION_LENGTH}) and the values of any list written out in it
 * ({@link MAX_LIST_VALUES}). An expression that cannot be parsed breaks no budget here; its
 * validation says what is wrong with it.
 */
export function expressionBudgetProblem(expr: string): string | null {
  if (expr.length > MAX_EXPRESSION_LENGTH) {
    return `the expression has ${expr.length} characters; at most ${MAX_EXPRESSION_LENGTH} are allowed`
  }
  let node: MathNode
  try {
    node = parseExpression(expr)
  } catch {
    return null
  }
  // A list holds at least as many values as any list inside it, so the largest count is an outermost one's.
  let largest = 0
  node.traverse((n) => {
    if (math.isArrayNode(n)) largest = Math.max(largest, listValues(n))
  })
  return largest > MAX_LIST_VALUES ? tooManyListValues(largest) : null
}

class Checker {
  readonly refusals: Refusal[] = []
  /** Names read as values that are neither constants nor functions: they must come from the scope. */
  readonly freeNames = new Set<string>()
  /** Inside a written-out list, whose values the outermost list has already counted. */
  private inList = false

  /** `known` lists the scope's names, or is null when the scope is not known yet (checked at evaluation). */
  constructor(private readonly known: ReadonlySet<string> | null) {}

  private refuse(message: string): void {
    if (!this.refusals.some((r) => r.message === message)) this.refusals.push({ message })
  }

  private unknown(name: string): void {
    if (this.known === null) {
      this.freeNames.add(name)
      return
    }
    const hint = closest(name, [...this.known, ...FUNCTION_NAMES, ...CONSTANT_NAMES])
    const available = this.known.size > 0 ? ` Names available here: ${[...this.known].join(', ')}.` : ''
    this.refuse(`unknown name "${name}"${hint ? ` — did you mean ${hint}?` : '.'}${available}`)
  }

  check(node: MathNode): void {
    if (math.isConstantNode(node)) {
      const t = typeof node.value
      if (t !== 'number' && t !== 'string' && t !== 'boolean')
        this.refuse(`the value ${node.toString()} cannot be used`)
    } else if (math.isSymbolNode(node)) {
      this.symbol(node.name)
    } else if (math.isFunctionNode(node)) {
      this.call(node)
    } else if (math.isAccessorNode(node)) {
      this.accessor(node)
    } else if (math.isOperatorNode(node)) {
      if (!OPERATORS.has(node.fn)) this.refuse(`the operator "${node.op}" is not available in module expressions`)
      node.args.forEach((a) => this.check(a))
    } else if (math.isParenthesisNode(node)) {
      this.check(node.content)
    } else if (math.isConditionalNode(node)) {
      this.check(node.condition)
      this.check(node.trueExpr)
      this.check(node.falseExpr)
    } else if (math.isArrayNode(node)) {
      // The outermost list counts the values of all its nested lists (a matrix's entries).
      if (!this.inList) {
        const values = listValues(node)
        if (values > MAX_LIST_VALUES) this.refuse(tooManyListValues(values))
      }
      const outer = this.inList
      this.inList = true
      node.items.forEach((item) => this.check(item))
      this.inList = outer
    } else if (math.isRelationalNode(node)) {
      for (const c of node.conditionals) if (!OPERATORS.has(c)) this.refuse(`the comparison "${c}" is not available`)
      node.params.forEach((p) => this.check(p))
    } else if (math.isAssignmentNode(node)) {
      this.refuse('assignments with "=" are not allowed: an expression computes one value (to compare, write ==)')
    } else if (math.isFunctionAssignmentNode(node)) {
      this.refuse(`defining a function (${node.name}(…) = …) is not allowed in module expressions`)
    } else if (math.isBlockNode(node)) {
      this.refuse(
        'an expression is a single formula; several statements separated by ";" or line breaks are not allowed',
      )
    } else if (math.isRangeNode(node)) {
      this.refuse('ranges (a:b) are not supported in module expressions')
    } else if (math.isObjectNode(node)) {
      this.refuse(
        'an object {…} is allowed only as the input of nozzleFlow({…}) or combustion({…}) and as the options of reduceThrustRun(t, thrust, {threshold: …})',
      )
    } else {
      this.refuse(`"${node.toString()}" (${node.type}) is not supported in module expressions`)
    }
  }

  private symbol(name: string): void {
    if (CONSTANT_NAMES.has(name)) return
    if (this.known?.has(name)) return
    if (DISABLED.has(name)) this.refuse(`${name} is disabled in module expressions`)
    else if (Object.prototype.hasOwnProperty.call(FUNCTIONS, name))
      this.refuse(`${name} is a function: call it with its arguments, ${name}(…)`)
    else this.unknown(name)
  }

  private call(node: MathNode & { fn: MathNode; args: MathNode[] }): void {
    if (!math.isSymbolNode(node.fn)) {
      this.refuse(`only named functions can be called, not "${node.fn.toString()}"`)
      return
    }
    const name = node.fn.name
    if (DISABLED.has(name)) {
      this.refuse(`${name} is disabled in module expressions`)
      return
    }
    const arity = Object.prototype.hasOwnProperty.call(FUNCTIONS, name) ? FUNCTIONS[name] : undefined
    if (!arity) {
      if (this.known?.has(name)) {
        this.refuse(`"${name}" is data, not a function; to pick one sample write at(${name}, i)`)
      } else {
        const hint = closest(name, FUNCTION_NAMES)
        this.refuse(`unknown function "${name}"${hint ? ` — did you mean ${hint}?` : ''}`)
      }
      return
    }
    const n = node.args.length
    if (n < arity.min || n > arity.max)
      this.refuse(`${describeArity(name, arity.min, arity.max)}, but ${n} ${n === 1 ? 'is' : 'are'} given`)
    const keys = OBJECT_ARGUMENTS[name]
    if (keys) {
      const input = node.args[0]
      if (input && math.isObjectNode(input)) {
        const given = Object.keys(input.properties)
        const optional = OPTIONAL_OBJECT_ARGUMENTS[name] ?? []
        const missing = keys.filter((k) => !given.includes(k))
        const extra = given.filter((k) => !keys.includes(k) && !optional.includes(k))
        if (missing.length > 0) this.refuse(`${name}({…}) needs ${missing.join(', ')}`)
        if (extra.length > 0)
          this.refuse(
            `${name}({…}) has no input named ${extra.join(', ')}; its inputs are ${[...keys, ...optional].join(', ')}`,
          )
        for (const value of Object.values(input.properties)) this.check(value)
      } else if (input) {
        this.refuse(`${name} takes one object of named inputs: ${name}({${keys.map((k) => `${k}: …`).join(', ')}})`)
      }
      node.args.slice(1).forEach((a) => this.check(a))
      return
    }
    const options = OPTION_ARGUMENTS[name]
    node.args.forEach((a, i) => {
      if (options && i === options.index && math.isObjectNode(a)) {
        const extra = Object.keys(a.properties).filter((k) => !options.keys.includes(k))
        if (extra.length > 0)
          this.refuse(
            `${name}(…, {…}) has no option named ${extra.join(', ')}; its options are ${options.keys.join(', ')}`,
          )
        for (const value of Object.values(a.properties)) this.check(value)
      } else {
        this.check(a)
      }
    })
  }

  private accessor(node: MathNode): void {
    const fields: string[] = []
    let base: MathNode = node
    while (math.isAccessorNode(base)) {
      const index = base.index
      const dimension = index.dimensions[0]
      if (!index.dotNotation || index.dimensions.length !== 1 || !dimension || !math.isConstantNode(dimension)) {
        this.refuse(
          `indexing with brackets ("${node.toString()}") is not supported; pick a sample with at(values, i), counting from 1`,
        )
        return
      }
      fields.unshift(String(dimension.value))
      base = base.object
    }
    const name = math.isFunctionNode(base) && math.isSymbolNode(base.fn) ? base.fn.name : undefined
    const tree =
      name !== undefined && Object.prototype.hasOwnProperty.call(RESULT_FIELDS, name) ? RESULT_FIELDS[name] : undefined
    if (!tree) {
      this.refuse(`"${node.toString()}": a field can only be read from the result of ${OBJECT_FUNCTIONS}`)
      return
    }
    let level: FieldTree | true = tree
    for (const field of fields) {
      if (level === true || !Object.prototype.hasOwnProperty.call(level, field)) {
        const options = level === true ? '' : `; its fields are ${Object.keys(level).join(', ')}`
        this.refuse(`"${node.toString()}": there is no field "${field}"${options}`)
        return
      }
      level = level[field] as FieldTree | true
    }
    if (level !== true)
      this.refuse(`"${node.toString()}" is a group of values; read one of ${Object.keys(level).join(', ')}`)
    this.check(base)
  }
}

function parseOrThrow(expr: string): MathNode {
  if (expr.length > MAX_EXPRESSION_LENGTH) {
    throw new ExpressionError(`the expression is longer than ${MAX_EXPRESSION_LENGTH} characters`)
  }
  if (expr.trim() === '') throw new ExpressionError('the expression is empty')
  try {
    return parseExpression(expr)
  } catch (error) {
    // mathjs counts characters from 1 in `char`; ExpressionError.position counts from 0.
    const char = (error as { char?: unknown }).char
    const message = (error as Error).message.replace(/\s*\(char \d+\)$/, '')
    if (typeof char !== 'number') throw new ExpressionError(`cannot read the expression: ${message}`)
    throw new ExpressionError(`cannot read the expression at character ${char}: ${message}`, char - 1)
  }
}

// ---------------------------------------------------------------------------------------------
// Evaluation, with compiled expressions cached (the server grades many submissions of one spec).

interface Compiled {
  run: (scope: Map<string, unknown>) => unknown
  freeNames: readonly string[]
  /** The checked tree, for callers that evaluate its parts one by one (checkedExpressionTree). */
  node: MathNode
}

const CACHE_LIMIT = 500
const cache = new Map<string, Compiled | ExpressionError>()

function compiled(expr: string): Compiled {
  const hit = cache.get(expr)
  if (hit !== undefined) {
    // Refresh its place so the least recently used entry is the one dropped.
    cache.delete(expr)
    cache.set(expr, hit)
    if (hit instanceof ExpressionError) throw hit
    return hit
  }
  let entry: Compiled | ExpressionError
  try {
    const node = parseOrThrow(expr)
    const checker = new Checker(null)
    checker.check(node)
    if (checker.refusals.length > 0) throw new ExpressionError(checker.refusals.map((r) => r.message).join('; '))
    const code = node.compile()
    entry = { run: (scope) => code.evaluate(scope), freeNames: [...checker.freeNames], node }
  } catch (error) {
    entry = error instanceof ExpressionError ? error : new ExpressionError((error as Error).message)
  }
  cache.set(expr, entry)
  if (cache.size > CACHE_LIMIT) cache.delete(cache.keys().next().value as string)
  if (entry instanceof ExpressionError) throw entry
  return entry
}

/**
 * The parsed tree of an expression that passed the checks {@link evaluateExpression} applies, for
 * code that evaluates its parts separately with the same instance ({@link expressionMath}): the
 * uncertainty propagation reuses the parts a perturbed input does not reach. The tree is shared:
 * transform copies of it (`map`), never change it.
 *
 * @throws ExpressionError when the expression cannot be parsed or is refused
 */
export function checkedExpressionTree(expr: string): MathNode {
  return compiled(expr).node
}

function describeResult(value: unknown): string {
  if (Array.isArray(value))
    return `a list of ${value.length} values instead of one; reduce it with max(), mean(), at() or similar`
  if (typeof value === 'string') return `the text "${value}" instead of a number`
  if (value === null || value === undefined) return 'no value'
  if (typeof value === 'object') return 'a group of values instead of one; read one of its fields with .name'
  return `${String(value)} (a ${typeof value})`
}

/**
 * Evaluates an expression over a scope of SI values.
 *
 * @param expr - the expression text
 * @param scope - names → numbers (measurements, results) or arrays of numbers (table columns)
 * @returns a finite number, or a boolean (for review rules)
 * @throws ExpressionError when the expression is refused, names something not in the scope, or
 *   its evaluation fails or gives anything but a finite number or a boolean
 */
export function evaluateExpression(expr: string, scope: ExpressionScope): number | boolean {
  const code = compiled(expr)
  const missing = code.freeNames.filter((n) => !Object.prototype.hasOwnProperty.call(scope, n))
  if (missing.length > 0) {
    throw new ExpressionError(
      `unknown name${missing.length === 1 ? '' : 's'} ${missing.map((n) => `"${n}"`).join(', ')}`,
    )
  }
  const values = new Map<string, unknown>()
  for (const name of code.freeNames) values.set(name, scope[name])
  let value: unknown
  try {
    value = code.run(values)
  } catch (error) {
    if (error instanceof ExpressionError) throw error
    throw new ExpressionError(`evaluation failed: ${(error as Error).message}`)
  }
  if (typeof value === 'boolean') return value
  if (typeof value === 'number') {
    if (Number.isFinite(value)) return value
    throw new ExpressionError(`the expression gives ${String(value)}, not a finite number`)
  }
  throw new ExpressionError(`the expression gives ${describeResult(value)}`)
}

// ---------------------------------------------------------------------------------------------
// Validation at save time.

/** A name an expression may use, with a sample value for the trial evaluation. */
export interface ScopeName {
  name: string
  /** A table column (array) or a single value. */
  shape: 'array' | 'scalar'
  /** Trial value in SI; when left out, 0, 1, 2, … for arrays and 1 for scalars. */
  sample?: ExpressionValue
}

export interface ExpressionContext {
  names: readonly ScopeName[]
  /** What the expression must give: a number (expected value) or true/false (review rule). */
  produces: 'number' | 'boolean'
}

/** A problem with an expression; `position` (0-based) is given for parse errors. */
export interface ExpressionIssue {
  message: string
  position?: number
}

function sampleOf(name: ScopeName): ExpressionValue {
  if (name.sample !== undefined) return name.sample
  return name.shape === 'array' ? Array.from({ length: 21 }, (_, i) => i) : 1
}

/**
 * Checks an expression against the names in scope: it parses; it uses only known names, allowed
 * functions with the right number of arguments and allowed operators; it reads fields only from
 * the library's result objects; it assigns and defines nothing. Then it runs the expression once on
 * the context's sample values and reports a failure or a result of the wrong kind.
 *
 * @returns the problems found; empty when the expression is fine
 */
export function validateExpression(expr: string, context: ExpressionContext): ExpressionIssue[] {
  let node: MathNode
  try {
    node = parseOrThrow(expr)
  } catch (error) {
    const e = error as ExpressionError
    return [e.position === undefined ? { message: e.message } : { message: e.message, position: e.position }]
  }
  const checker = new Checker(new Set(context.names.map((n) => n.name)))
  checker.check(node)
  if (checker.refusals.length > 0) return checker.refusals.map((r) => ({ message: r.message }))

  const scope: Record<string, ExpressionValue> = {}
  for (const n of context.names) scope[n.name] = sampleOf(n)
  let value: number | boolean
  try {
    value = evaluateExpression(expr, scope)
  } catch (error) {
    return [{ message: `a trial run with made-up data failed: ${(error as Error).message}` }]
  }
  if (context.produces === 'boolean' && typeof value !== 'boolean') {
    return [
      { message: `a review rule must give true or false, but this gives the number ${value}; compare with <, >, == …` },
    ]
  }
  if (context.produces === 'number' && typeof value !== 'number') {
    return [{ message: 'an expected value must be a number, but this gives true/false' }]
  }
  return []
}

/** Contexts for an assignment: what expected-value expressions see, and what review rules see. */
export interface AssignmentContexts {
  expected: ExpressionContext
  review: ExpressionContext
}

/**
 * The expression contexts of an assignment, with sample values from {@link syntheticSubmission}
 * converted exactly as a real submission would be. Review rules also see the results, whose sample
 * values are the expected values computed from the same made-up data (1 where that fails).
 */
export function assignmentContexts(assignment: Assignment): AssignmentContexts {
  const data = syntheticSubmission(assignment)
  let dataScope: Record<string, ExpressionValue>
  try {
    dataScope = buildExpressionScope(assignment, data)
  } catch (error) {
    if (!(error instanceof ScopeError)) throw error
    dataScope = {}
  }
  const dataNames: ScopeName[] = [
    ...assignment.tables.flatMap((t) => t.columns.map((c) => ({ name: c.key, shape: 'array' as const }))),
    ...assignment.measurements.map((m) => ({ name: m.key, shape: 'scalar' as const })),
    ...assignment.images.flatMap((img) =>
      Object.values(imageNames(img.key)).map((name) => ({ name, shape: 'scalar' as const })),
    ),
  ].map((n) => (dataScope[n.name] === undefined ? n : { ...n, sample: dataScope[n.name] as ExpressionValue }))

  const results: Record<string, number> = {}
  for (const r of assignment.results) {
    let reported = 1
    try {
      const si = evaluateExpression(r.expected, dataScope)
      if (typeof si === 'number') reported = valueFromSI(si, r.unit)
    } catch {
      // The expected expression's own validation reports this; the rule still gets a sample.
    }
    results[r.key] = reported
  }
  let reviewScope: Record<string, ExpressionValue> = {}
  try {
    reviewScope = buildExpressionScope(assignment, { ...data, results }, { withResults: true })
  } catch (error) {
    if (!(error instanceof ScopeError)) throw error
  }
  const resultNames: ScopeName[] = assignment.results.map((r) =>
    reviewScope[r.key] === undefined
      ? { name: r.key, shape: 'scalar' }
      : { name: r.key, shape: 'scalar', sample: reviewScope[r.key] as ExpressionValue },
  )
  return {
    expected: { names: dataNames, produces: 'number' },
    review: { names: [...dataNames, ...resultNames], produces: 'boolean' },
  }
}

/** An expression problem located in the front matter. */
export interface LocatedExpressionIssue extends ExpressionIssue {
  path: (string | number)[]
}

/**
 * Rows of each made-up table in the save-time trial run, whatever the table's minRows: enough for
 * every helper (at, interp, select) and for a run window, and small, because the trial checks that
 * an expression runs and gives the right kind of value, not how it scales. (With the tables at
 * minRows: 2000, a save of many results spent seconds multiplying made-up columns.)
 */
const TRIAL_ROWS = 41

/** The assignment with each table's minRows lowered to {@link TRIAL_ROWS} for the made-up data. */
function trialSized(assignment: Assignment): Assignment {
  if (!assignment.tables.some((t) => t.minRows > TRIAL_ROWS)) return assignment
  return {
    ...assignment,
    tables: assignment.tables.map((t) => (t.minRows > TRIAL_ROWS ? { ...t, minRows: TRIAL_ROWS } : t)),
  }
}

/**
 * Validates every expected-value expression and review rule of an assignment: first its size
 * budgets ({@link expressionBudgetProblem}; such an expression is not run at all), then the checks
 * of {@link validateExpression} with a trial run on {@link TRIAL_ROWS}-row tables. An expression may
 * count on the rows minRows promises (`at(thrust, 100)` with minRows: 200), so one that fails on
 * the small tables is tried once more on tables of minRows rows before it is refused.
 *
 * @returns problems with their front-matter path, e.g. ['assignment', 'results', 2, 'expected']
 */
export function validateAssignmentExpressions(assignment: Assignment): LocatedExpressionIssue[] {
  const issues: LocatedExpressionIssue[] = []
  const trial = trialSized(assignment)
  const small = assignmentContexts(trial)
  let full: AssignmentContexts | undefined
  const check = (expr: string, pick: (c: AssignmentContexts) => ExpressionContext): ExpressionIssue[] => {
    const found = validateExpression(expr, pick(small))
    if (found.length === 0 || trial === assignment) return found
    full ??= assignmentContexts(assignment)
    return validateExpression(expr, pick(full))
  }
  const validate = (
    owner: string,
    expr: string,
    path: (string | number)[],
    pick: (c: AssignmentContexts) => ExpressionContext,
  ) => {
    const over = expressionBudgetProblem(expr)
    if (over !== null) {
      issues.push({ message: `${owner}: ${over}`, path })
      return
    }
    for (const issue of check(expr, pick)) issues.push({ ...issue, path })
  }
  assignment.results.forEach((r, i) =>
    validate(`result "${r.key}"`, r.expected, ['assignment', 'results', i, 'expected'], (c) => c.expected),
  )
  assignment.results.forEach((r, i) => {
    if (!r.regime) return
    validate(
      `result "${r.key}" (regime pressure ratio)`,
      r.regime.pressureRatio,
      ['assignment', 'results', i, 'regime', 'pressureRatio'],
      (c) => c.expected,
    )
    validate(
      `result "${r.key}" (regime area ratio)`,
      r.regime.areaRatio,
      ['assignment', 'results', i, 'regime', 'areaRatio'],
      (c) => c.expected,
    )
  })
  assignment.reviewRules.forEach((rule, i) =>
    validate(`review rule "${rule.key}"`, rule.when, ['assignment', 'reviewRules', i, 'when'], (c) => c.review),
  )
  return issues
}

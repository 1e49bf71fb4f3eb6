/**
 * The vocabulary of module expressions: which functions, operators and constants an expression may
 * use, how many arguments each function takes, and which fields of the formula library's result
 * objects may be read.
 *
 * This file has no dependencies (no mathjs), so the front-matter schema can refuse keys that would
 * shadow a function without pulling the expression engine into every bundle that validates a form.
 * `expressions.ts` enforces these lists; `schema.ts` uses {@link RESERVED_NAMES}.
 */
import type {
  FullyExpandedJet,
  IsentropicRatios,
  NormalShock,
  NozzleFlow,
  NozzleInput,
  NozzlePressureRatios,
  ThrustRun,
  ThrustRunOptions,
} from '../physics'
import type { combustion } from '../thermo'

/** The thermochemistry library's result and input (shared/thermo), by the function's own types. */
type Combustion = ReturnType<typeof combustion>
type CombustionInput = Parameters<typeof combustion>[0]

/** Smallest and largest argument count; `max` is Infinity for variadic functions. */
export interface Arity {
  min: number
  max: number
}

const exactly = (n: number): Arity => ({ min: n, max: n })
const between = (min: number, max: number): Arity => ({ min, max })
const atLeast = (min: number): Arity => ({ min, max: Infinity })

/** Functions of the formula library (shared/physics), with their argument counts. */
export const LIBRARY_FUNCTIONS: Readonly<Record<string, Arity>> = {
  isentropic: exactly(2),
  machFromAreaRatio: exactly(3),
  machFromPressureRatio: exactly(2),
  criticalPressureRatio: exactly(1),
  normalShock: exactly(2),
  prandtlMeyer: exactly(2),
  nozzleFlow: exactly(1),
  nozzlePressureRatios: exactly(2),
  chokedMassFlow: exactly(5),
  idealThrust: exactly(5),
  machDiskDistance: exactly(3),
  machDiskDistanceLewisCarlson: exactly(5),
  fullyExpandedJet: exactly(4),
  shockCellSpacing: exactly(2),
  totalImpulse: exactly(2),
  specificImpulse: exactly(2),
  characteristicVelocity: exactly(3),
  thrustCoefficient: exactly(3),
  meanValue: between(1, 2),
  peakValue: exactly(1),
  areaFromDiameter: exactly(1),
  reduceThrustRun: between(2, 3),
  windowMean: exactly(4),
  windowIntegral: exactly(4),
  idealSpecificImpulse: exactly(5),
  // The thermochemistry library (shared/thermo): equilibrium products of a fuel burnt with air.
  combustion: exactly(1),
  mixtureRatioFromEquivalenceRatio: exactly(2),
  equivalenceRatioFromMixtureRatio: exactly(2),
}

/**
 * Helpers that exist only in module expressions (see `expressions.ts` for their definitions).
 * Indices count from 1, as everywhere in mathjs.
 */
export const EXTRA_FUNCTIONS: Readonly<Record<string, Arity>> = {
  /** at(values, i): the i-th sample (1-based). */
  at: exactly(2),
  /** argmax(values): 1-based index of the first largest sample. */
  argmax: exactly(1),
  /** argmin(values): 1-based index of the first smallest sample. */
  argmin: exactly(1),
  /** interp(x, xs, ys): linear interpolation in a table with increasing xs. */
  interp: exactly(3),
  /** select(values, flags): the samples whose flag is true, in order. */
  select: exactly(2),
  /** regimeCode(regime): 1 subsonic … 5 under-expanded, in the order of NOZZLE_REGIMES. */
  regimeCode: exactly(1),
}

/** The mathjs functions an expression may call. Everything else in mathjs is out of reach. */
export const MATH_FUNCTIONS: Readonly<Record<string, Arity>> = {
  abs: exactly(1),
  sqrt: exactly(1),
  cbrt: exactly(1),
  exp: exactly(1),
  expm1: exactly(1),
  log: between(1, 2),
  log10: exactly(1),
  log2: exactly(1),
  log1p: exactly(1),
  pow: exactly(2),
  sin: exactly(1),
  cos: exactly(1),
  tan: exactly(1),
  asin: exactly(1),
  acos: exactly(1),
  atan: exactly(1),
  atan2: exactly(2),
  hypot: atLeast(1),
  min: atLeast(1),
  max: atLeast(1),
  mean: atLeast(1),
  median: atLeast(1),
  sum: atLeast(1),
  std: exactly(1),
  round: between(1, 2),
  floor: exactly(1),
  ceil: exactly(1),
  sign: exactly(1),
}

/** Every callable name, with its arity. */
export const FUNCTIONS: Readonly<Record<string, Arity>> = {
  ...LIBRARY_FUNCTIONS,
  ...EXTRA_FUNCTIONS,
  ...MATH_FUNCTIONS,
}

/** Named constants (symbols, not calls). `true` and `false` are literals and need no entry. */
export const CONSTANTS: readonly string[] = ['pi', 'e', 'G0']

/**
 * mathjs operator functions an expression may use (`+ - * / ^ .* ./ .^ %`, unary ±, comparisons,
 * `and or not xor`). Refused: unit conversion (`to`, `in`), bitwise operators, factorial and
 * transpose, which have no place in a lab's formulas.
 */
export const OPERATORS: ReadonlySet<string> = new Set([
  'add',
  'subtract',
  'multiply',
  'divide',
  'dotMultiply',
  'dotDivide',
  'pow',
  'dotPow',
  'mod',
  'unaryMinus',
  'unaryPlus',
  'equal',
  'unequal',
  'smaller',
  'larger',
  'smallerEq',
  'largerEq',
  'and',
  'or',
  'not',
  'xor',
])

/**
 * mathjs functions that can parse, compile or define things. They are replaced in the expression
 * engine by functions that throw (https://mathjs.org/docs/expressions/security.html), and an
 * expression that names one is refused before it runs.
 */
export const DISABLED_FUNCTIONS: readonly string[] = [
  'import',
  'createUnit',
  'reviver',
  'evaluate',
  'parse',
  'simplify',
  'simplifyConstant',
  'simplifyCore',
  'derivative',
  'resolve',
  'compile',
  'chain',
  'rationalize',
  'leafCount',
  'symbolicEqual',
  'parser',
]

/** A readable field of a result object: a value (`true`) or a nested object with its own fields. */
export type FieldTree = { readonly [field: string]: true | FieldTree }

const PRESSURE_RATIO_FIELDS = {
  chokeLimit: true,
  shockAtExit: true,
  design: true,
} as const satisfies Record<keyof NozzlePressureRatios, true>

/**
 * Which library functions return objects, and which of their fields an expression may read with
 * `.field`. The `satisfies` clauses make the compiler list every field of the library's types, so a
 * field added to the formula library shows up here as a type error until it is listed.
 */
export const RESULT_FIELDS: Readonly<Record<string, FieldTree>> = {
  isentropic: {
    pressureRatio: true,
    temperatureRatio: true,
    densityRatio: true,
    areaRatio: true,
  } satisfies Record<keyof IsentropicRatios, true>,
  normalShock: {
    mach2: true,
    pressureRatio: true,
    temperatureRatio: true,
    densityRatio: true,
    stagnationPressureRatio: true,
  } satisfies Record<keyof NormalShock, true>,
  nozzlePressureRatios: PRESSURE_RATIO_FIELDS,
  nozzleFlow: {
    regime: true,
    massFlow: true,
    exitMach: true,
    exitPressure: true,
    exitVelocity: true,
    thrust: true,
    thrustCoefficient: true,
    characteristicVelocity: true,
    specificImpulse: true,
    areaRatio: true,
    exitTemperature: true,
    exitDensity: true,
    throatChoked: true,
    shockArea: true,
    shockMach: true,
    stagnationPressureRatio: true,
    pressureRatios: PRESSURE_RATIO_FIELDS,
    separated: true,
    separationAreaRatio: true,
    separatedThrust: true,
  } satisfies Record<keyof NozzleFlow, true | FieldTree>,
  reduceThrustRun: {
    zeroBefore: true,
    zeroAfter: true,
    start: true,
    end: true,
    burnTime: true,
    totalImpulse: true,
    peakThrust: true,
    meanThrust: true,
  } satisfies Record<keyof ThrustRun, true>,
  fullyExpandedJet: { mach: true, diameter: true } satisfies Record<keyof FullyExpandedJet, true>,
  combustion: {
    temperature: true,
    molarMass: true,
    gamma: true,
    cp: true,
    characteristicVelocity: true,
    mixtureRatio: true,
    // The equilibrium products' mole fractions, one species each: `.moleFractions.CO2`.
    moleFractions: {
      N2: true,
      O2: true,
      CO2: true,
      H2O: true,
      CO: true,
      H2: true,
      OH: true,
      H: true,
      O: true,
      NO: true,
      N: true,
    } satisfies Record<keyof Combustion['moleFractions'], true>,
  } satisfies Record<keyof Combustion, true | FieldTree>,
}

/** Library functions that take one object of named inputs, with the names it must contain. */
export const OBJECT_ARGUMENTS: Readonly<Record<string, readonly string[]>> = {
  nozzleFlow: Object.keys({
    chamberPressure: true,
    chamberTemperature: true,
    ambientPressure: true,
    throatArea: true,
    exitArea: true,
    gamma: true,
    gasConstant: true,
  } satisfies Record<keyof NozzleInput, true>),
  combustion: Object.keys({
    fuel: true,
    equivalenceRatio: true,
    pressure: true,
  } satisfies Record<Exclude<keyof CombustionInput, 'reactantTemperature'>, true>),
}

/**
 * Inputs of an {@link OBJECT_ARGUMENTS} function that may be left out (the library has a default):
 * `combustion({fuel: "propane", equivalenceRatio: 0.8, pressure: 5e5, reactantTemperature: t_air})`,
 * without the last one from 298.15 K.
 */
export const OPTIONAL_OBJECT_ARGUMENTS: Readonly<Record<string, readonly string[]>> = {
  combustion: Object.keys({ reactantTemperature: true } satisfies Record<
    Extract<keyof CombustionInput, 'reactantTemperature'>,
    true
  >),
}

/**
 * Library functions whose trailing argument may be an object of options, by argument position
 * (0-based), with the option names it may contain (all optional):
 * `reduceThrustRun(t, thrust, {threshold: 0.1})`.
 */
export const OPTION_ARGUMENTS: Readonly<Record<string, { index: number; keys: readonly string[] }>> = {
  reduceThrustRun: { index: 2, keys: Object.keys({ threshold: true } satisfies Record<keyof ThrustRunOptions, true>) },
}

/** Words the mathjs parser treats as operators or literals; they cannot be used as names. */
const PARSER_KEYWORDS = ['and', 'or', 'not', 'xor', 'mod', 'to', 'in', 'end', 'true', 'false', 'null', 'undefined']

/**
 * Names a table column, measurement or result key may not take, because in an expression it would
 * hide a function or constant or could not be parsed as a name.
 */
export const RESERVED_NAMES: ReadonlySet<string> = new Set([
  ...Object.keys(FUNCTIONS),
  ...CONSTANTS,
  ...DISABLED_FUNCTIONS,
  ...PARSER_KEYWORDS,
])

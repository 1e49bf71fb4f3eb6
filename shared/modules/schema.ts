/**
 * The front matter of a lab module: the single source of its type.
 *
 * A module is Markdown with YAML front matter. The front matter names the module, its due date and
 * submission policy and, optionally, an assignment: the data a submission carries (tables with
 * named, unit-bearing columns and scalar measurements), the results a student reports (each with an
 * expected-value expression over the submission's own data, a tolerance and points) and review
 * rules (expressions that flag a submission for staff, with a reason).
 *
 * Messages are written to be read by an instructor editing YAML: they say what is wrong in plain
 * words; `front-matter.ts` adds the module name, the path and the line.
 */
import { z } from 'zod'
import { DIMENSIONLESS, RESULT_ONLY_UNITS, dataUnitKind, isDataUnit, isPressureUnit, isResultUnit } from './quantities'
import { ImageSpecSchema, MAX_IMAGES, imageNames } from './image-spec'
import { KeySchema, LabelSchema, TableKeySchema } from './spec-names'
import { singleLineName } from '../schemas/names'
import { checkStandFrontMatter, standFrontMatter } from './stand-schema'
import { PRESSURE_SENSES, UNITS, type PressureSense } from '../units'

/**
 * Size budgets of an assignment, checked when a module is saved: each bounds the work one save
 * (every expression is parsed, checked and run once on made-up data) and one grading can cost.
 */
/** Longest expression accepted; a lab formula is a line or two, and the limit bounds parsing work. */
export const MAX_EXPRESSION_LENGTH = 2000
/**
 * Most values in one list written out in an expression (`[1, 2, 3]`, or all the entries of a
 * matrix `[[1], [2]]`). A short table of coefficients fits; a list of hundreds, multiplied with a
 * logged column, makes a matrix of hundreds of rows per sample.
 */
export const MAX_LIST_VALUES = 64
/** Most results one assignment grades. */
export const MAX_RESULTS = 40
/** Most review rules one assignment has. */
export const MAX_REVIEW_RULES = 40

const LOCAL_DATE_TIME = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2})(?::(\d{2}))?$/

/** Whether a string is a real local date and time written like 2027-02-09T17:00 (seconds optional). */
export function isLocalDateTime(text: string): boolean {
  const m = LOCAL_DATE_TIME.exec(text)
  if (!m) return false
  const [year, month, day, hour, minute, second] = m.slice(1).map((x) => Number(x ?? 0)) as [
    number,
    number,
    number,
    number,
    number,
    number,
  ]
  if (month < 1 || month > 12 || hour > 23 || minute > 59 || second > 59) return false
  // Day 0 of the next month is the last day of this one.
  const daysInMonth = new Date(Date.UTC(year, month, 0)).getUTCDate()
  return day >= 1 && day <= daysInMonth
}

/** A local date-time made comparable as text: seconds always present. */
function comparableLocal(text: string): string {
  return text.length === 16 ? `${text}:00` : text
}

/** Whether a string is an IANA time-zone name the platform knows (e.g. America/Denver). */
export function isTimeZone(name: string): boolean {
  try {
    new Intl.DateTimeFormat('en-US', { timeZone: name })
    return true
  } catch {
    return false
  }
}

const LocalDateTimeSchema = z
  .string()
  .refine(isLocalDateTime, 'write a local date and time like 2027-02-09T17:00 (24-hour clock, no time zone)')

const TimeZoneSchema = z.string().refine(isTimeZone, 'write an IANA time-zone name such as America/Denver')

export const DueSchema = z.strictObject({
  /** Local wall-clock time in `timeZone`. */
  at: LocalDateTimeSchema,
  /** IANA zone; when left out, the course's time zone is used. */
  timeZone: TimeZoneSchema.optional(),
})

export const LateSchema = z.strictObject({
  /** Last local time a late submission is accepted; left out means no limit. */
  acceptUntil: LocalDateTimeSchema.optional(),
  /** Fraction of the points taken off per day late, 0–1 (0.1 = 10 % a day). */
  penaltyPerDay: z
    .number()
    .min(0, 'the penalty per day is a fraction from 0 to 1 (0.1 = 10 % a day)')
    .max(1, 'the penalty per day is a fraction from 0 to 1 (0.1 = 10 % a day)'),
})

const PressureSenseSchema = z.enum(PRESSURE_SENSES)

const dataUnitMessage = `use a unit symbol of the unit table (${Object.keys(UNITS).join(', ')}) or ${DIMENSIONLESS} for a dimensionless number`
const DataUnitSchema = z.string().refine(isDataUnit, dataUnitMessage)
const ResultUnitSchema = z
  .string()
  .refine(isResultUnit, `${dataUnitMessage}; results may also use ${Object.keys(RESULT_ONLY_UNITS).join(', ')}`)

/** A pressure unit needs to say gauge or absolute; any other unit must not. */
function checkPressureSense(value: { unit: string; pressure?: PressureSense | undefined }, ctx: z.RefinementCtx): void {
  if (isPressureUnit(value.unit) && value.pressure === undefined) {
    ctx.addIssue({
      code: 'custom',
      path: ['pressure'],
      message: `a pressure in ${value.unit} must say whether it is read as gauge or absolute: add "pressure: gauge" or "pressure: absolute"`,
    })
  }
  if (!isPressureUnit(value.unit) && value.pressure !== undefined && isDataUnit(value.unit)) {
    ctx.addIssue({
      code: 'custom',
      path: ['pressure'],
      message: `"pressure" applies only to pressure units, and ${value.unit} is not one; remove it`,
    })
  }
}

/**
 * The standard uncertainty of a measurement or a column (one standard deviation, JCGM 100:2008, the
 * GUM, §2.3.1): `absolute` in the field's own unit, `relative` a fraction of the reading as read (a
 * gauge pressure's gauge value). A column takes each as one component shared by all its samples
 * (an offset added to every sample, a gain multiplying every sample); a measurement with both
 * takes them in quadrature. See shared/grading/uncertainty.ts.
 */
export const UncertaintySchema = z
  .strictObject({
    absolute: z.number().min(0, 'an absolute uncertainty cannot be negative').optional(),
    relative: z
      .number()
      .min(0, 'a relative uncertainty is a fraction from 0 to 1 (0.01 = 1 %)')
      .max(1, 'a relative uncertainty is a fraction from 0 to 1 (0.01 = 1 %); write 0.01 for 1 %')
      .optional(),
  })
  .refine((u) => u.absolute !== undefined || u.relative !== undefined, {
    message: 'give a relative uncertainty, an absolute one, or both (for example uncertainty: { absolute: 0.05 })',
  })

/** A relative uncertainty of a Celsius or Fahrenheit reading would depend on where the scale's zero is. */
function checkUncertainty(
  value: { unit: string; uncertainty?: { relative?: number | undefined } | undefined },
  ctx: z.RefinementCtx,
): void {
  if (value.uncertainty?.relative === undefined || dataUnitKind(value.unit) !== 'temperature' || value.unit === 'K')
    return
  ctx.addIssue({
    code: 'custom',
    path: ['uncertainty', 'relative'],
    message: `a relative uncertainty of a temperature in ${value.unit} depends on the zero of the scale; give an absolute one in ${value.unit}`,
  })
}

/**
 * What a column is to the grading engine's built-in data checks (thrust above the ideal, gauge or
 * absolute confusion, chamber above receiver, sample gaps). Expressions never see roles: they name
 * columns by key. `time` is the sample time of its table; the others are at most one per assignment.
 */
export const COLUMN_ROLES = ['time', 'thrust', 'chamber-pressure', 'receiver-pressure'] as const
export type ColumnRole = (typeof COLUMN_ROLES)[number]

/**
 * What a measurement is to the grading engine: the barometric pressure that makes gauge readings
 * absolute, and the nozzle and receiver dimensions the built-in checks need. At most one of each
 * per assignment.
 */
export const MEASUREMENT_ROLES = ['ambient-pressure', 'throat-diameter', 'exit-diameter', 'receiver-volume'] as const
export type MeasurementRole = (typeof MEASUREMENT_ROLES)[number]

/** The kind of quantity each role needs, and how to say it in a message. */
const ROLE_KINDS: Readonly<Record<ColumnRole | MeasurementRole, { kind: string; words: string }>> = {
  time: { kind: 'time', words: 'the time column must be in s or ms' },
  thrust: { kind: 'force', words: 'the thrust column must be in a force unit (N, kN, kgf, lbf)' },
  'chamber-pressure': { kind: 'pressure', words: 'the chamber pressure must be in a pressure unit' },
  'receiver-pressure': { kind: 'pressure', words: 'the receiver pressure must be in a pressure unit' },
  'ambient-pressure': { kind: 'pressure', words: 'the ambient pressure must be in a pressure unit' },
  'throat-diameter': { kind: 'length', words: 'the throat diameter must be in a length unit (m, mm, cm, in)' },
  'exit-diameter': { kind: 'length', words: 'the exit diameter must be in a length unit (m, mm, cm, in)' },
  'receiver-volume': { kind: 'volume', words: 'the receiver volume must be in a volume unit (m3, L, gal)' },
}

function checkRoleUnit(
  value: { unit: string; role?: ColumnRole | MeasurementRole | undefined },
  ctx: z.RefinementCtx,
): void {
  if (value.role === undefined) return
  const need = ROLE_KINDS[value.role]
  if (isDataUnit(value.unit) && dataUnitKind(value.unit) !== need.kind) {
    ctx.addIssue({ code: 'custom', path: ['unit'], message: `${need.words}, not ${value.unit}` })
  }
}

export const ColumnSchema = z
  .strictObject({
    key: KeySchema,
    label: LabelSchema,
    unit: DataUnitSchema,
    /** Standard uncertainty of the logged values; see {@link UncertaintySchema}. */
    uncertainty: UncertaintySchema.optional(),
    pressure: PressureSenseSchema.optional(),
    /** What the column is to the built-in data checks; see {@link COLUMN_ROLES}. */
    role: z.enum(COLUMN_ROLES, { message: `a column role is one of ${COLUMN_ROLES.join(', ')}` }).optional(),
    /**
     * A gauge pressure whose transducer zero is taken like the load cell's: the column's median
     * over the thrust run's quiet samples before and after the run is removed along the run's tare
     * line (`tareAlongRun` in shared/physics), before any expression sees it. For a column that
     * reads ambient before and after the run (a chamber behind a closed valve), never for a
     * receiver charged before it. Applies when the hand-in reads the column gauge, and only to a
     * zero of at most 10 % of the ambient pressure (`MAX_TARE_ZERO` in scope.ts): a column reading
     * more at rest is another mistake, left for the review rules and data checks to see.
     */
    tare: z.boolean().optional(),
    /**
     * The instrument's full scale (its span), in the column's unit, e.g. 1000 for a 0–1000 kPa
     * transducer. The chamber-above-receiver check allows each pressure transducer's error,
     * `fullScaleError` × full scale, instead of guessing it from the largest reading.
     */
    fullScale: z
      .number()
      .positive('the full scale is the span of the instrument, greater than 0, in the column unit')
      .optional(),
    /** The instrument's error as a fraction of its full scale, 0–0.2; left out, 0.01 (±1 % of full scale). */
    fullScaleError: z
      .number()
      .min(0, 'the full-scale error is a fraction from 0 to 0.2 (0.01 = ±1 % of full scale)')
      .max(0.2, 'the full-scale error is a fraction from 0 to 0.2 (0.01 = ±1 % of full scale)')
      .optional(),
  })
  .superRefine((column, ctx) => {
    checkUncertainty(column, ctx)
    checkPressureSense(column, ctx)
    checkRoleUnit(column, ctx)
    if (column.tare === true && column.pressure !== 'gauge') {
      ctx.addIssue({
        code: 'custom',
        path: ['tare'],
        message:
          'tare: true takes the zero of a gauge pressure transducer, so it needs a pressure column with "pressure: gauge"',
      })
    }
    if (column.fullScaleError !== undefined && column.fullScale === undefined) {
      ctx.addIssue({
        code: 'custom',
        path: ['fullScaleError'],
        message: 'a full-scale error needs the full scale too: add "fullScale"',
      })
    }
  })

export const TableSchema = z
  .strictObject({
    // The table's own key is not a name in expressions (its columns are), so it may be any key.
    key: TableKeySchema,
    label: LabelSchema,
    /** Fewest data rows a submission's table must have. */
    minRows: z.number().int('must be a whole number').min(2, 'a table needs at least 2 rows').default(10),
    columns: z.array(ColumnSchema).min(1, 'a table needs at least one column'),
  })
  .superRefine((table, ctx) => {
    const timeColumns = table.columns.flatMap((c, i) => (c.role === 'time' ? [i] : []))
    for (const i of timeColumns.slice(1)) {
      ctx.addIssue({
        code: 'custom',
        path: ['columns', i, 'role'],
        message: 'a table has at most one column with role: time',
      })
    }
    // A tared column takes its zero and window from the thrust run logged beside it.
    const hasRun = timeColumns.length > 0 && table.columns.some((c) => c.role === 'thrust')
    table.columns.forEach((c, i) => {
      if (c.tare === true && !hasRun) {
        ctx.addIssue({
          code: 'custom',
          path: ['columns', i, 'tare'],
          message:
            'tare: true takes the zero and the window of the thrust run, so the table needs a column with role: thrust and one with role: time',
        })
      }
    })
  })

export const MeasurementSchema = z
  .strictObject({
    key: KeySchema,
    label: LabelSchema,
    unit: DataUnitSchema,
    /** Standard uncertainty of the value; see {@link UncertaintySchema}. */
    uncertainty: UncertaintySchema.optional(),
    /** Smallest plausible value, in `unit`; a submission outside [min, max] is refused at the form. */
    min: z.number().optional(),
    /** Largest plausible value, in `unit`. */
    max: z.number().optional(),
    pressure: PressureSenseSchema.optional(),
    /**
     * What the measurement is to the grading engine; see {@link MEASUREMENT_ROLES}. The
     * `ambient-pressure` one is the barometric pressure of the test: gauge readings of the
     * submission are made absolute with it before any expression sees them.
     */
    role: z
      .enum(MEASUREMENT_ROLES, { message: `a measurement role is one of ${MEASUREMENT_ROLES.join(', ')}` })
      .optional(),
  })
  .superRefine((m, ctx) => {
    checkUncertainty(m, ctx)
    checkPressureSense(m, ctx)
    if (m.role !== 'ambient-pressure') checkRoleUnit(m, ctx)
    if (m.min !== undefined && m.max !== undefined && m.min > m.max) {
      ctx.addIssue({ code: 'custom', path: ['max'], message: `max (${m.max}) is below min (${m.min})` })
    }
    if (m.role === 'ambient-pressure' && !(isPressureUnit(m.unit) && m.pressure === 'absolute')) {
      ctx.addIssue({
        code: 'custom',
        path: ['role'],
        message:
          'the ambient pressure must be an absolute pressure (a barometer reading): give a pressure unit and "pressure: absolute"',
      })
    }
  })

// The length limit is checked with the key of the result or rule (checkExpressionLength), not here.
const ExpressionTextSchema = z.string().trim().min(1, 'the expression is empty')

/** A refusal of an over-long expression that names whose expression it is and the limit. */
function checkExpressionLength(owner: string, expr: string, ctx: z.RefinementCtx, path: string): void {
  if (expr.length <= MAX_EXPRESSION_LENGTH) return
  ctx.addIssue({
    code: 'custom',
    path: [path],
    message: `${owner}: the expression has ${expr.length} characters; at most ${MAX_EXPRESSION_LENGTH} are allowed`,
  })
}

export const ToleranceSchema = z
  .strictObject({
    /** Fraction of |expected| (0.05 = 5 %). */
    relative: z
      .number()
      .min(0, 'a relative tolerance is a fraction from 0 to 1 (0.05 = 5 %)')
      .max(1, 'a relative tolerance is a fraction from 0 to 1 (0.05 = 5 %); write 0.05 for 5 %')
      .optional(),
    /** In the result's unit. */
    absolute: z.number().min(0, 'an absolute tolerance cannot be negative').optional(),
    /**
     * Coverage factor k: the tolerance is also k × the combined standard uncertainty of the
     * expected value, propagated from the declared uncertainties; the relative and absolute
     * tolerances stay as its floor: pass when |reported − expected| ≤ max(floor, k·u_c).
     */
    coverage: z
      .number()
      .min(1, 'a coverage factor is from 1 to 5 (2 covers about 95 %)')
      .max(5, 'a coverage factor is from 1 to 5 (2 covers about 95 %)')
      .optional(),
  })
  .refine((t) => t.relative !== undefined || t.absolute !== undefined, {
    error: (issue) =>
      (issue.input as { coverage?: unknown } | undefined)?.coverage === undefined
        ? 'give a relative tolerance, an absolute tolerance, or both'
        : 'a coverage tolerance needs a relative or absolute tolerance as its floor, for example { relative: 0.01, coverage: 2 }',
  })

export const PartialCreditSchema = z.strictObject({
  /** Multiple of the tolerance within which partial credit is given (2 = within twice the tolerance). */
  within: z.number().gt(1, 'a multiple of the tolerance, greater than 1 (2 = within twice the tolerance)'),
  /** Fraction of the points given there, 0–1. */
  fraction: z.number().min(0, 'a fraction of the points, from 0 to 1').max(1, 'a fraction of the points, from 0 to 1'),
})

/** Margin of the regime check when a module sets none: 2 % of pa/p0 either side of a boundary. */
export const DEFAULT_REGIME_MARGIN = 0.02

/**
 * Declares a result to be a nozzle's expansion regime, reported as a code (1 subsonic, 2 shock in
 * the nozzle, 3 over-expanded, 4 ideal, 5 under-expanded; `regimeCode(…)` gives it). The hand-in
 * form then offers the regimes by name, and the check also accepts the neighbouring code when
 * pa/p0 lies within `margin` of the boundary between the two regimes (the boundaries follow from
 * the area ratio and γ: nozzlePressureRatios). The two expressions are evaluated over the
 * submission's data like `expected`.
 */
export const RegimeSpecSchema = z.strictObject({
  /** pa/p0 at the moment the regime is asked about, e.g. `p_ambient / max(p_chamber)`. */
  pressureRatio: ExpressionTextSchema,
  /** The nozzle's exit-to-throat area ratio, e.g. `(d_exit / d_throat)^2`. */
  areaRatio: ExpressionTextSchema,
  /** Ratio of specific heats the boundaries are worked out with. */
  gamma: z.number().gt(1, 'gamma must be greater than 1 (air: 1.4)').default(1.4),
  /** Relative margin around each boundary, 0–0.2 (0.02 = 2 %); 0 asks for the exact code. */
  margin: z
    .number()
    .min(0, 'the regime margin is a fraction from 0 to 0.2 (0.02 = 2 %)')
    .max(0.2, 'the regime margin is a fraction from 0 to 0.2 (0.02 = 2 %)')
    .default(DEFAULT_REGIME_MARGIN),
})

/** A result's fields before its expressions are checked (zod cannot make a refined schema partial). */
const ResultSpecFields = z.strictObject({
  key: KeySchema,
  label: LabelSchema,
  unit: ResultUnitSchema,
  /** Expected value in SI over the submission's data (see expressions.ts for the scope). */
  expected: ExpressionTextSchema,
  tolerance: ToleranceSchema,
  points: z.number().positive('points must be greater than 0'),
  partial: PartialCreditSchema.optional(),
  /** This result is an expansion-regime code; see {@link RegimeSpecSchema}. */
  regime: RegimeSpecSchema.optional(),
})

export const ResultSpecSchema = ResultSpecFields.superRefine((r, ctx) => {
  checkExpressionLength(`result "${r.key}"`, r.expected, ctx, 'expected')
  if (r.regime) {
    checkExpressionLength(`result "${r.key}" (regime pressure ratio)`, r.regime.pressureRatio, ctx, 'regime')
    checkExpressionLength(`result "${r.key}" (regime area ratio)`, r.regime.areaRatio, ctx, 'regime')
    if (r.unit !== DIMENSIONLESS)
      ctx.addIssue({
        code: 'custom',
        path: ['unit'],
        message: `a regime code is a pure number: use unit '${DIMENSIONLESS}'`,
      })
  }
})

export const ReviewRuleSchema = z
  .strictObject({
    key: KeySchema,
    /** Boolean expression over the data and the reported results; true flags the submission. */
    when: ExpressionTextSchema,
    /** What staff read in the review queue. */
    reason: z
      .string()
      .trim()
      .min(1, 'say in words why the rule flags a submission')
      .max(500, 'a reason has at most 500 characters'),
  })
  .superRefine((r, ctx) => checkExpressionLength(`review rule "${r.key}"`, r.when, ctx, 'when'))

/** "… (the 41st is "isp_2")": the first entry over a count limit, by its key. */
function firstOver(input: unknown, limit: number): string {
  const entry: unknown = Array.isArray(input) ? input[limit] : undefined
  const key =
    typeof entry === 'object' && entry !== null && 'key' in entry ? (entry as { key: unknown }).key : undefined
  return typeof key === 'string' ? `; the first over the limit is "${key}"` : ''
}

export const AssignmentSchema = z
  .strictObject({
    tables: z.array(TableSchema).default([]),
    measurements: z.array(MeasurementSchema).default([]),
    /** Photographs of the jet with marks (see image-spec.ts). */
    images: z
      .array(ImageSpecSchema)
      .max(MAX_IMAGES, `an assignment asks for at most ${MAX_IMAGES} photographs`)
      .default([]),
    results: z
      .array(ResultSpecSchema)
      .max(MAX_RESULTS, {
        error: (issue) =>
          `an assignment grades at most ${MAX_RESULTS} results; this one has ${Array.isArray(issue.input) ? issue.input.length : 'more'}${firstOver(issue.input, MAX_RESULTS)}`,
      })
      .default([]),
    reviewRules: z
      .array(ReviewRuleSchema)
      .max(MAX_REVIEW_RULES, {
        error: (issue) =>
          `an assignment has at most ${MAX_REVIEW_RULES} review rules; this one has ${Array.isArray(issue.input) ? issue.input.length : 'more'}${firstOver(issue.input, MAX_REVIEW_RULES)}`,
      })
      .default([]),
  })
  .superRefine((a, ctx) => {
    // Table keys, column keys, measurement keys and result keys share one namespace: the expressions'.
    const seen = new Map<string, string>()
    const claim = (key: string, path: (string | number)[]) => {
      const where = path
        .map((p) => (typeof p === 'number' ? `[${p}]` : `.${p}`))
        .join('')
        .slice(1)
      const first = seen.get(key)
      if (first !== undefined) {
        ctx.addIssue({
          code: 'custom',
          path: [...path, 'key'],
          message: `the key "${key}" is already used at assignment.${first}; keys of tables, columns, measurements and results must all differ`,
        })
      } else {
        seen.set(key, where)
      }
    }
    a.tables.forEach((t, i) => {
      claim(t.key, ['tables', i])
      t.columns.forEach((c, j) => claim(c.key, ['tables', i, 'columns', j]))
    })
    a.measurements.forEach((m, i) => claim(m.key, ['measurements', i]))
    a.results.forEach((r, i) => claim(r.key, ['results', i]))
    a.images.forEach((img, i) => {
      claim(img.key, ['images', i])
      for (const name of Object.values(imageNames(img.key))) {
        if (seen.has(name)) {
          ctx.addIssue({
            code: 'custom',
            path: ['images', i, 'key'],
            message: `the photograph "${img.key}" gives the expressions the name ${name}, which is already used at assignment.${seen.get(name)}; choose another key`,
          })
        }
      }
      const refer = (field: 'scaleFrom' | 'takenAt', kind: 'length' | 'time') => {
        const ref = img[field]
        if (ref === undefined) return
        const m = a.measurements.find((x) => x.key === ref)
        if (!m || dataUnitKind(m.unit) !== kind) {
          ctx.addIssue({
            code: 'custom',
            path: ['images', i, field],
            message: `${field} names a measurement with a ${kind} unit; "${ref}" is ${m ? `in ${m.unit}` : 'not a measurement of this assignment'}`,
          })
        }
      }
      refer('scaleFrom', 'length')
      refer('takenAt', 'time')
      for (const field of ['cellSpacing', 'machDisk'] as const) {
        const ref = img.theory?.[field]
        if (ref === undefined) continue
        const r = a.results.find((x) => x.key === ref)
        if (!r || dataUnitKind(r.unit) !== 'length') {
          ctx.addIssue({
            code: 'custom',
            path: ['images', i, 'theory', field],
            message: `theory.${field} names a result with a length unit; "${ref}" is ${r ? `in ${r.unit}` : 'not a result of this assignment'}`,
          })
        }
      }
    })

    const ruleKeys = new Set<string>()
    a.reviewRules.forEach((r, i) => {
      if (ruleKeys.has(r.key)) {
        ctx.addIssue({
          code: 'custom',
          path: ['reviewRules', i, 'key'],
          message: `another review rule already has the key "${r.key}"`,
        })
      }
      ruleKeys.add(r.key)
    })

    // Each role names one thing the built-in checks read, so it may be given once per assignment
    // (except `time`, once per table: TableSchema checks that).
    const roleHolder = new Map<string, string>()
    const claimRole = (role: string, path: (string | number)[], key: string) => {
      const where = `${path
        .map((p) => (typeof p === 'number' ? `[${p}]` : `.${p}`))
        .join('')
        .slice(1)} (${key})`
      const first = roleHolder.get(role)
      if (first !== undefined) {
        ctx.addIssue({
          code: 'custom',
          path: [...path, 'role'],
          message: `only one ${path[0] === 'tables' ? 'column' : 'measurement'} can have role: ${role}; assignment.${first} already has it`,
        })
      } else {
        roleHolder.set(role, where)
      }
    }
    a.tables.forEach((t, i) =>
      t.columns.forEach((c, j) => {
        if (c.role !== undefined && c.role !== 'time') claimRole(c.role, ['tables', i, 'columns', j], c.key)
      }),
    )
    a.measurements.forEach((m, i) => {
      if (m.role !== undefined) claimRole(m.role, ['measurements', i], m.key)
    })
    // Thrust and the two pressures are compared sample by sample, against the sample times: they
    // must share one table, and that table needs its time column.
    const logRoles = a.tables.flatMap((t, i) =>
      t.columns.flatMap((c, j) =>
        c.role !== undefined && c.role !== 'time' ? [{ table: i, column: j, role: c.role }] : [],
      ),
    )
    const logTable = logRoles[0]?.table
    for (const r of logRoles) {
      if (r.table !== logTable) {
        ctx.addIssue({
          code: 'custom',
          path: ['tables', r.table, 'columns', r.column, 'role'],
          message: `the columns with roles thrust, chamber-pressure and receiver-pressure must be in one table; role: ${logRoles[0]?.role} is in assignment.tables[${logTable}]`,
        })
      }
    }
    const loggingTable = logTable === undefined ? undefined : a.tables[logTable]
    if (loggingTable && !loggingTable.columns.some((c) => c.role === 'time') && logRoles[0]) {
      ctx.addIssue({
        code: 'custom',
        path: ['tables', logRoles[0].table, 'columns', logRoles[0].column, 'role'],
        message: `a column with role: ${logRoles[0].role} needs a column with role: time in the same table, so its samples have times`,
      })
    }

    const declared =
      a.measurements.some((m) => m.uncertainty) || a.tables.some((t) => t.columns.some((c) => c.uncertainty))
    a.results.forEach((r, i) => {
      if (r.tolerance.coverage === undefined || declared) return
      ctx.addIssue({
        code: 'custom',
        path: ['results', i, 'tolerance', 'coverage'],
        message: `result "${r.key}" has a coverage tolerance, but no measurement or column declares an uncertainty; add "uncertainty:" to the ones it uses`,
      })
    })

    const ambient = a.measurements.flatMap((m, i) => (m.role === 'ambient-pressure' ? [i] : []))
    const gauge =
      a.tables.some((t) => t.columns.some((c) => c.pressure === 'gauge')) ||
      a.measurements.some((m) => m.pressure === 'gauge')
    if (gauge && ambient.length === 0) {
      ctx.addIssue({
        code: 'custom',
        path: ['measurements'],
        message:
          'gauge pressures are made absolute with the ambient pressure, so the assignment needs a measurement with "role: ambient-pressure" (an absolute barometer reading)',
      })
    }
  })

/** A module's title: one line of text (also the rule for the title a broken module is listed under). */
export const ModuleTitleSchema = singleLineName({
  field: 'title',
  max: 200,
  messages: { tooShort: 'the title must not be empty', tooLong: 'a title has at most 200 characters' },
})

/**
 * When students see their results: at once, after the due date, or once staff make the marks final
 * (`when-final`). `after-release` is the older name of `when-final`, still read so that modules
 * written with it keep loading.
 */
export const RESULTS_VISIBILITY = ['immediately', 'after-due', 'when-final'] as const
const OLD_RESULTS_NAMES = { 'after-release': 'when-final' } as const

/** A stored or written results setting in today's words (front matter saved before the rename). */
export function resultsVisibility(v: string | undefined): (typeof RESULTS_VISIBILITY)[number] {
  const now = v !== undefined && v in OLD_RESULTS_NAMES ? OLD_RESULTS_NAMES[v as keyof typeof OLD_RESULTS_NAMES] : v
  return (RESULTS_VISIBILITY as readonly string[]).includes(now ?? '')
    ? (now as (typeof RESULTS_VISIBILITY)[number])
    : 'immediately'
}

export const FrontMatterSchema = z
  .strictObject({
    title: ModuleTitleSchema,
    summary: z.string().trim().max(1000, 'a summary has at most 1000 characters').optional(),
    due: DueSchema.optional(),
    attempts: z
      .number()
      .int('must be a whole number')
      .positive('must be at least 1')
      .max(100, 'must be at most 100')
      .default(3),
    late: LateSchema.optional(),
    /** When students see their graded results. */
    results: z
      .enum([...RESULTS_VISIBILITY, ...(Object.keys(OLD_RESULTS_NAMES) as (keyof typeof OLD_RESULTS_NAMES)[])], {
        error: `must be one of ${RESULTS_VISIBILITY.join(', ')}`,
      })
      .default('immediately')
      .transform(resultsVisibility),
    /** Whether a student sees the expected value next to their own. */
    showExpected: z.boolean().default(false),
    /** One member submits for the whole lab group. */
    groupSubmission: z.boolean().default(false),
    assignment: AssignmentSchema.optional(),
    ...standFrontMatter,
  })
  .superRefine((fm, ctx) => {
    checkStandFrontMatter(fm, ctx)
    if (fm.late && !fm.due) {
      ctx.addIssue({
        code: 'custom',
        path: ['late'],
        message: 'late submissions need a due date: add "due" or remove "late"',
      })
    }
    if (fm.late?.acceptUntil && fm.due && comparableLocal(fm.late.acceptUntil) <= comparableLocal(fm.due.at)) {
      ctx.addIssue({
        code: 'custom',
        path: ['late', 'acceptUntil'],
        message: `acceptUntil (${fm.late.acceptUntil}) must be after the due date (${fm.due.at})`,
      })
    }
    if (fm.results === 'after-due' && !fm.due) {
      ctx.addIssue({ code: 'custom', path: ['results'], message: 'results shown "after-due" need a due date' })
    }
  })

export type ModuleFrontMatter = z.output<typeof FrontMatterSchema>
export type Assignment = z.output<typeof AssignmentSchema>
export type TableSpec = z.output<typeof TableSchema>
export type ColumnSpec = z.output<typeof ColumnSchema>
export type MeasurementSpec = z.output<typeof MeasurementSchema>
export type ResultSpec = z.output<typeof ResultSpecSchema>
export type ReviewRule = z.output<typeof ReviewRuleSchema>
export type Tolerance = z.output<typeof ToleranceSchema>
export type RegimeSpec = z.output<typeof RegimeSpecSchema>
export type Uncertainty = z.output<typeof UncertaintySchema>
export type ResultsVisibility = (typeof RESULTS_VISIBILITY)[number]

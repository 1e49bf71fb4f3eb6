/**
 * What an expression sees: a submission's data turned into SI, with gauge pressures made absolute.
 *
 * Conventions (the same for the server's grading and the editor's trial runs):
 * - every table column becomes an array of numbers under its column key, every measurement a
 *   number under its key; review rules also see each reported result under its key;
 * - values are converted from their declared unit to SI (Pa, N, m, m², m³, K, kg, s; results in
 *   N·s, kg/s, m/s, rad as declared in `quantities.ts`);
 * - pressures are absolute: a column or measurement declared `pressure: gauge` gets the submission's
 *   ambient pressure (the measurement with `role: ambient-pressure`, itself absolute) added to every
 *   value. A reported result in a pressure unit is taken as absolute;
 * - a gauge pressure column with `tare: true` also has its transducer zero removed, with the zero
 *   and window of the thrust run logged beside it (see {@link buildExpressionScope}).
 */
import { gaugeToAbsolute, type PressureSense } from '../units'
import { signalZeros, tareWithRun } from '../physics/thrust-run'
import { markFinite } from './checked-columns'
import { cachedThrustRun } from './run-cache'
import { DIMENSIONLESS, dataUnitKind, valueFromSI, valueToSI } from './quantities'
import type { Assignment, ColumnSpec, MeasurementSpec, TableSpec } from './schema'
import { imageNames } from './image-spec'

/** Values an expression can see by name. */
export type ExpressionValue = number | boolean | readonly number[]
export type ExpressionScope = Readonly<Record<string, ExpressionValue>>

/**
 * A submission's data as typed or uploaded: each value in the unit its spec declares, or, when
 * {@link buildExpressionScope} is called with `units: 'si'`, in SI (Pa, N, m, m³, K, s; results in
 * the SI unit of their kind), pressures in the sense they were read (gauge stays gauge).
 */
export interface SubmissionData {
  /** Table key → column key → samples. */
  tables: Readonly<Record<string, Readonly<Record<string, readonly number[]>>>>
  /** Measurement key → value. */
  measurements: Readonly<Record<string, number>>
  /** Result key → reported value (only review rules see these). */
  results?: Readonly<Record<string, number>>
  /**
   * How the submission says each pressure column or measurement was read, by key, when it differs
   * from the spec's `pressure:` (a student may log absolute where the spec suggests gauge). Keys
   * left out follow the spec. The ambient pressure is always absolute.
   */
  pressures?: Readonly<Record<string, PressureSense>>
  /**
   * What the marks on each photograph measure (image key → values), always in SI (m): the mean
   * shock-cell spacing, the Mach-disk distance (NaN when not marked) and the number of cell ends.
   */
  images?: Readonly<Record<string, ImageMeasures>>
}

/** The measured values of one photograph that expressions see (see image-spec.ts for their names). */
export interface ImageMeasures {
  cellSpacing: number
  machDisk: number
  cellCount: number
}

/** Options of {@link buildExpressionScope}. */
export interface ScopeOptions {
  /**
   * Add the reported results (review rules see them; expected-value expressions must not).
   */
  withResults?: boolean
  /**
   * The unit of the values in `data`: 'declared' (the spec's unit of each column, measurement and
   * result; the default) or 'si' (already SI, as `parseLog` and the grading engine hold them).
   */
  units?: 'declared' | 'si'
  /**
   * Remove the transducer zero of the gauge pressure columns marked `tare: true` (default true).
   * The grading engine's data checks look at the columns as logged, with `tare: false`.
   */
  tare?: boolean
}

/** A submission whose data cannot be turned into a scope; the message says which value and why. */
export class ScopeError extends Error {
  constructor(message: string) {
    super(message)
    this.name = 'ScopeError'
  }
}

const STANDARD_AMBIENT = 101325

function convert(value: number, unit: string, gauge: boolean, ambient: number | undefined, what: string): number {
  if (typeof value !== 'number' || !Number.isFinite(value))
    throw new ScopeError(`${what} is not a finite number (got ${String(value)})`)
  let si: number
  try {
    si = valueToSI(value, unit)
    if (gauge) {
      if (ambient === undefined)
        throw new ScopeError(`${what} is a gauge pressure, but the submission has no ambient pressure`)
      si = gaugeToAbsolute(si, ambient)
    }
  } catch (error) {
    if (error instanceof ScopeError) throw error
    throw new ScopeError(`${what}: ${(error as Error).message}`)
  }
  return si
}

function ambientOf(assignment: Assignment, data: SubmissionData, si: boolean): number | undefined {
  const spec = assignment.measurements.find((m) => m.role === 'ambient-pressure')
  if (!spec) return undefined
  const value = data.measurements[spec.key]
  if (value === undefined) throw new ScopeError(`the ambient pressure "${spec.key}" is missing`)
  if (data.pressures?.[spec.key] === 'gauge') {
    throw new ScopeError(`the ambient pressure "${spec.key}" must be an absolute (barometric) reading, not gauge`)
  }
  return convert(value, si ? SI_PASS : spec.unit, false, undefined, `measurement "${spec.key}"`)
}

/** Stand-in unit for values already in SI: convert() then only checks and adds the ambient. */
const SI_PASS = DIMENSIONLESS

function isGauge(data: SubmissionData, key: string, declared: PressureSense | undefined): boolean {
  return (data.pressures?.[key] ?? declared) === 'gauge'
}

interface AbsoluteColumn {
  ambient: number
  column: readonly number[]
}
/**
 * Gauge samples → the absolute column last made from them. The grading step builds a scope of the
 * same hand-in twice (grading, then the chart), each making the same copies of the pressure
 * columns; the second reuses the first's after comparing every sample.
 */
const absoluteColumns = new WeakMap<readonly number[], AbsoluteColumn>()

/**
 * An SI column as the scope holds it: the same array when nothing changes (no copy of a 50 000-row
 * log), a new one with the ambient pressure added when it was read gauge.
 */
function siColumn(
  samples: readonly number[],
  gauge: boolean,
  ambient: number | undefined,
  what: string,
): readonly number[] {
  // The absolute column made from these samples last time, kept while it holds exactly samples +
  // ambient (compared here, sample by sample, so a changed sample or ambient makes a new one).
  const last = gauge ? absoluteColumns.get(samples) : undefined
  let same = last !== undefined && last.ambient === ambient && last.column.length === samples.length
  for (let i = 0; i < samples.length; i++) {
    const v = samples[i]
    if (typeof v !== 'number' || !Number.isFinite(v))
      throw new ScopeError(`${what}[row ${i + 1}] is not a finite number (got ${String(v)})`)
    if (same && (last as AbsoluteColumn).column[i] !== v + (ambient as number)) same = false
  }
  markFinite(samples)
  if (!gauge) return samples
  if (same) return (last as AbsoluteColumn).column
  if (ambient === undefined)
    throw new ScopeError(`${what} is a gauge pressure, but the submission has no ambient pressure`)
  const out = new Array<number>(samples.length)
  for (let i = 0; i < samples.length; i++) {
    const absolute = (samples[i] as number) + ambient
    if (absolute < 0)
      throw new ScopeError(
        `${what}[row ${i + 1}]: a gauge pressure of ${samples[i]} Pa is below vacuum at an ambient of ${ambient} Pa`,
      )
    out[i] = absolute
  }
  // Finite samples plus a finite ambient of some 10⁵ Pa stay finite.
  if (Number.isFinite(ambient)) markFinite(out)
  absoluteColumns.set(samples, { ambient, column: out })
  return out
}

/**
 * Largest transducer zero that `tare: true` takes, as a fraction of the ambient pressure: 10 %
 * (8–10 kPa on a campus), above the ±1 % of full scale of a teaching stand's transducers. A column
 * that reads more than that at rest is not off by a zero: it is another column (the receiver, swapped
 * in) or an absolute reading declared gauge, and taking its "zero" would hide the mistake from the
 * review rules. Such a column stays as logged. Common practice, no published source.
 */
export const MAX_TARE_ZERO = 0.1

/**
 * Tares a table's gauge pressure columns marked `tare: true` (and read gauge in this hand-in) with
 * the zero and window of the table's thrust run: each column's own median over the run's quiet
 * samples before and after it, removed along the run's tare line, so the column reads exactly the
 * ambient pressure at rest (`tareWithRun` in shared/physics/thrust-run.ts). A column whose zero
 * before or after the run is larger than {@link MAX_TARE_ZERO} × the ambient pressure stays as
 * logged. When the thrust shows no run to reduce, the columns stay as logged too: every expression
 * that reduces the run fails with the library's reason, and the grading engine flags it for staff.
 */
function tareColumns(
  table: TableSpec,
  scope: Record<string, ExpressionValue>,
  data: SubmissionData,
  ambient: number | undefined,
): void {
  const columns = table.columns.filter((c) => c.tare === true && isGauge(data, c.key, c.pressure))
  if (columns.length === 0 || ambient === undefined) return
  const time = scope[table.columns.find((c) => c.role === 'time')?.key ?? '']
  const thrust = scope[table.columns.find((c) => c.role === 'thrust')?.key ?? '']
  if (!Array.isArray(time) || !Array.isArray(thrust)) return
  let run: ReturnType<typeof cachedThrustRun>
  try {
    run = cachedThrustRun(time, thrust)
  } catch (error) {
    if (error instanceof RangeError) return
    throw error
  }
  for (const column of columns) {
    const values = scope[column.key] as readonly number[]
    // The column is absolute here (the ambient added); its gauge zeros are these less the ambient.
    const zeros = signalZeros(time, values, run)
    if (Math.max(Math.abs(zeros.before - ambient), Math.abs(zeros.after - ambient)) > MAX_TARE_ZERO * ambient) continue
    const tared = tareWithRun(time, values, run)
    let allFinite = true
    for (let i = 0; i < tared.length; i++) {
      const absolute = (tared[i] as number) + ambient
      if (absolute < 0)
        throw new ScopeError(
          `${column.key}[row ${i + 1}]: after its zero is taken, the gauge pressure ${tared[i]} Pa is below vacuum at an ambient of ${ambient} Pa`,
        )
      if (!Number.isFinite(absolute)) allFinite = false
      tared[i] = absolute
    }
    if (allFinite) markFinite(tared)
    scope[column.key] = tared
  }
}

/**
 * A scope built with `tare: false` (the columns as logged), with the `tare: true` columns tared:
 * the same as building it with `tare: true`, without converting the data twice. The grading engine
 * keeps both: expressions see the tared columns, the data checks the logged ones.
 *
 * @param assignment - the validated assignment spec
 * @param data - the submission's data (for the gauge/absolute choices)
 * @param logged - the scope built with `tare: false`
 * @returns `logged` itself when no column is tared, else a copy with the tared columns
 */
export function taredScope(
  assignment: Assignment,
  data: SubmissionData,
  logged: Record<string, ExpressionValue>,
): Record<string, ExpressionValue> {
  if (!assignment.tables.some((t) => t.columns.some((c) => c.tare === true))) return logged
  const ambientKey = assignment.measurements.find((m) => m.role === 'ambient-pressure')?.key
  const ambient = ambientKey === undefined ? undefined : logged[ambientKey]
  const scope: Record<string, ExpressionValue> = Object.assign(
    Object.create(null) as Record<string, ExpressionValue>,
    logged,
  )
  for (const table of assignment.tables)
    tareColumns(table, scope, data, typeof ambient === 'number' ? ambient : undefined)
  return scope
}

/**
 * The scope of an assignment's expressions for one submission.
 *
 * @param assignment - the validated assignment spec
 * @param data - the submission's values, in their declared units or in SI (see `options.units`)
 * @param options.withResults - add the reported results (review rules see them; expected-value
 *   expressions must not)
 * @param options.units - 'declared' (default) or 'si'
 * @param options.tare - take the zero of the `tare: true` columns (default true)
 * @throws ScopeError naming the missing or unusable value
 */
export function buildExpressionScope(
  assignment: Assignment,
  data: SubmissionData,
  options: ScopeOptions = {},
): Record<string, ExpressionValue> {
  const si = options.units === 'si'
  const scope: Record<string, ExpressionValue> = Object.create(null) as Record<string, ExpressionValue>
  const ambient = ambientOf(assignment, data, si)
  for (const table of assignment.tables) {
    const columns = data.tables[table.key]
    if (!columns) throw new ScopeError(`the table "${table.key}" is missing`)
    let length: number | undefined
    for (const column of table.columns) {
      const samples = columns[column.key]
      if (!Array.isArray(samples)) throw new ScopeError(`the column "${column.key}" of table "${table.key}" is missing`)
      if (length !== undefined && samples.length !== length) {
        throw new ScopeError(
          `the columns of table "${table.key}" have different lengths (${length} and ${samples.length})`,
        )
      }
      length = samples.length
      const gauge = isGauge(data, column.key, column.pressure)
      scope[column.key] = si
        ? siColumn(samples, gauge, ambient, column.key)
        : samples.map((v, i) => convert(v, column.unit, gauge, ambient, `${column.key}[row ${i + 1}]`))
    }
  }
  if (options.tare !== false) for (const table of assignment.tables) tareColumns(table, scope, data, ambient)
  for (const m of assignment.measurements) {
    const value = data.measurements[m.key]
    if (value === undefined) throw new ScopeError(`the measurement "${m.key}" is missing`)
    scope[m.key] = convert(
      value,
      si ? SI_PASS : m.unit,
      isGauge(data, m.key, m.pressure),
      ambient,
      `measurement "${m.key}"`,
    )
  }
  for (const img of assignment.images) {
    const measured = data.images?.[img.key]
    if (measured === undefined) throw new ScopeError(`the photograph "${img.key}" is missing`)
    const names = imageNames(img.key)
    scope[names.cellSpacing] = measured.cellSpacing
    scope[names.machDisk] = measured.machDisk
    scope[names.cellCount] = measured.cellCount
  }
  if (options.withResults) {
    for (const r of assignment.results) {
      const value = data.results?.[r.key]
      if (value === undefined) throw new ScopeError(`the reported result "${r.key}" is missing`)
      scope[r.key] = convert(value, si ? SI_PASS : r.unit, false, ambient, `result "${r.key}"`)
    }
  }
  return scope
}

/** Number of rows of synthetic tables (or the table's minRows, if larger, up to 2000). */
const SYNTHETIC_ROWS = 41

/** SI value of a quantity of each kind for synthetic data (pressures absolute). */
const TYPICAL_SI: Record<string, number> = {
  pressure: 3e5,
  force: 50,
  length: 0.01,
  area: 1e-4,
  volume: 0.05,
  temperature: 293.15,
  mass: 0.1,
  time: 1,
  dimensionless: 1,
}

/** Fraction of the synthetic rows logged at rest before the run, and again after it. */
const SYNTHETIC_REST = 0.15

function syntheticColumn(column: ColumnSpec, rows: number, pressureIndex: number, ambient: number): number[] {
  const kind = dataUnitKind(column.unit) ?? 'dimensionless'
  const out: number[] = []
  for (let i = 0; i < rows; i++) {
    const f = i / (rows - 1)
    // The run: the middle 70 % of the rows, u going from 0 to 1 across it.
    const running = f >= SYNTHETIC_REST && f <= 1 - SYNTHETIC_REST
    const u = (f - SYNTHETIC_REST) / (1 - 2 * SYNTHETIC_REST)
    let si: number
    if (column.role === 'time' || kind === 'time') si = i * 0.05
    // A blow-down: 6 bar falling to 2 bar absolute, each further pressure column 3 % below the last
    // (a chamber reads a little below the receiver that feeds it). A column whose zero is taken
    // reads the ambient pressure at rest and follows the blow-down during the run.
    else if (kind === 'pressure' && column.tare === true)
      si = running ? (6e5 - 4e5 * u) * 0.97 ** pressureIndex : ambient
    else if (kind === 'pressure') si = (6e5 - 4e5 * f) * 0.97 ** pressureIndex
    // A load cell with a 0.3 N zero: at rest, then 60 N falling to 15 N during the run.
    else if (kind === 'force') si = 0.3 + (running ? 60 - 45 * u : 0)
    else si = TYPICAL_SI[kind] ?? 1
    if (column.pressure === 'gauge') si -= ambient
    out.push(column.unit === DIMENSIONLESS ? si : valueFromSI(si, column.unit))
  }
  return out
}

function syntheticMeasurement(m: MeasurementSpec, ambient: number): number {
  if (m.min !== undefined && m.max !== undefined) return (m.min + m.max) / 2
  if (m.min !== undefined) return m.min > 0 ? m.min * 1.5 : m.min + 1
  if (m.max !== undefined) return m.max > 0 ? m.max / 2 : m.max - 1
  const kind = dataUnitKind(m.unit) ?? 'dimensionless'
  let si = m.role === 'ambient-pressure' ? STANDARD_AMBIENT : (TYPICAL_SI[kind] ?? 1)
  if (m.pressure === 'gauge') si -= ambient
  return valueFromSI(si, m.unit)
}

/**
 * Made-up but plausible data for an assignment, in the declared units, for trial runs of its
 * expressions: times 0, 0.05, 0.1 … s; pressures falling from 6 to 2 bar absolute (a `tare: true`
 * column at the ambient before and after the run); a run in the middle 70 % of the rows with the
 * thrust falling from 60 to 15 N, on a load-cell zero of 0.3 N; measurements in the middle of their min–max range (so a spec with ranges gets
 * sensible trial values, e.g. an exit diameter larger than the throat's), otherwise a typical value
 * of their kind. Results are left out; the caller fills them from the expected values.
 */
export function syntheticSubmission(assignment: Assignment): SubmissionData {
  const ambientSpec = assignment.measurements.find((m) => m.role === 'ambient-pressure')
  const measurements: Record<string, number> = {}
  let ambient = STANDARD_AMBIENT
  if (ambientSpec) {
    measurements[ambientSpec.key] = syntheticMeasurement(ambientSpec, STANDARD_AMBIENT)
    ambient = valueToSI(measurements[ambientSpec.key] as number, ambientSpec.unit)
  }
  for (const m of assignment.measurements) {
    if (m !== ambientSpec) measurements[m.key] = syntheticMeasurement(m, ambient)
  }
  const tables: Record<string, Record<string, number[]>> = {}
  let pressureIndex = 0
  for (const table of assignment.tables) {
    const rows = Math.min(Math.max(table.minRows, SYNTHETIC_ROWS), 2000)
    const columns: Record<string, number[]> = {}
    for (const column of table.columns) {
      const isPressure = dataUnitKind(column.unit) === 'pressure'
      columns[column.key] = syntheticColumn(column, rows, pressureIndex, ambient)
      if (isPressure) pressureIndex++
    }
    tables[table.key] = columns
  }
  // A photograph of a 1 cm jet: three cells of 12 mm and a Mach disk 9 mm from the exit.
  const images: Record<string, ImageMeasures> = {}
  for (const img of assignment.images) images[img.key] = { cellSpacing: 0.012, machDisk: 0.009, cellCount: 3 }
  return { tables, measurements, images }
}

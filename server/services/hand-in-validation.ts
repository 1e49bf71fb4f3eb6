import type { ModuleFrontMatter, TableSpec } from '../../shared/modules/schema'
import { parseLog, sniffBinary } from '../../shared/grading/csv'
import { clip, count } from '../../shared/grading/csv-limits'
import { regimeCodeProblem } from '../../shared/grading/regime'
import { DIMENSIONLESS, RESULT_ONLY_UNITS, dataUnitKind, valueFromSI } from '../../shared/modules/quantities'
import type { SubmissionFieldIssue, SubmissionPayload } from '../../shared/schemas/submissions'
import { isCompatibleUnit, toSpecSense, toSpecUnit } from '../../shared/typed-values'
import { SI_UNITS, UNITS, isUnitSymbol } from '../../shared/units'
import type { SubmissionInputs } from '../db/schema'
import { AppError } from '../errors'

/** A file part of a hand-in as the route received it. */
export interface UploadedTable {
  field: string
  filename: string
  contentType: string
  bytes: Buffer
}

/**
 * How a typed pressure was read: the student's gauge/absolute choice, else the spec's. The
 * barometric reading is absolute whatever was chosen. Undefined for quantities that are not pressures.
 */
export function readingSense(
  m: { role?: string | undefined; pressure?: 'gauge' | 'absolute' | undefined },
  typed: { pressure?: 'gauge' | 'absolute' | undefined },
): 'gauge' | 'absolute' | undefined {
  return m.role === 'ambient-pressure' ? 'absolute' : (typed.pressure ?? m.pressure)
}

const fmt = (x: number) =>
  Math.abs(x) >= 1e5 || (Math.abs(x) < 1e-3 && x !== 0) ? x.toExponential(3) : String(Number(x.toPrecision(6)))

/** At most this many problems go back with a refused hand-in; `more` counts the others. */
export const MAX_SHOWN_ISSUES = 20

/**
 * A typed value in SI by the unit table's own factor, without the table's checks (which throw
 * RangeError, a 500): the caller checks the result and names the field. The unit is known to be
 * compatible with the spec's, so it is a unit of the table, '1' or a result-only unit.
 */
function rawToSI(value: number, unit: string): number {
  if (unit === DIMENSIONLESS) return value
  if (isUnitSymbol(unit)) return UNITS[unit].toSI(value)
  const extra = RESULT_ONLY_UNITS[unit]
  return extra ? value * extra.factor : Number.NaN
}

/** What a negative value of each kind would be, where no lab reading can be negative. */
const NEVER_NEGATIVE: Readonly<Record<string, string>> = { mass: 'a mass', area: 'an area', volume: 'a volume' }
/** Lengths that are sizes (a length in general may be a position, and negative). */
const SIZE_ROLES: Readonly<Record<string, string>> = { 'throat-diameter': 'a diameter', 'exit-diameter': 'a diameter' }

/**
 * Why a typed value cannot be right whatever happened in the lab, or null: it is not a finite
 * number in SI, a temperature below absolute zero, or a negative mass, area, volume or diameter.
 * Pressures are checked by the caller, which knows the gauge/absolute sense and the ambient pressure.
 */
function impossible(label: string, value: number, unit: string, si: number, role: string | undefined): string | null {
  const typed = `${label}: ${String(value)} ${unit}`
  const kind = dataUnitKind(unit)
  if (!Number.isFinite(si)) {
    const to = kind === null || kind === 'dimensionless' ? 'SI' : SI_UNITS[kind]
    return `${typed} is too large: it is not a finite number once converted to ${to}; check the value and its unit.`
  }
  if (kind === 'temperature' && si < 0)
    return `${typed} is below absolute zero (0 K, -273.15 degC, -459.67 degF); no temperature can be.`
  const what = (kind ? NEVER_NEGATIVE[kind] : undefined) ?? (kind === 'length' && role ? SIZE_ROLES[role] : undefined)
  if (what && si < 0) return `${typed} is negative; ${what} cannot be negative.`
  return null
}

/** The message for a value that is finite in SI but not once converted to the spec's unit. */
function tooLargeIn(label: string, value: number, unit: string, specUnit: string): string {
  return `${label}: ${String(value)} ${unit} is too large: it is not a finite number once converted to ${specUnit}; check the value and its unit.`
}

/**
 * Checks every typed value and uploaded file against the module's spec and converts them to SI
 * (pressures in the sense they were read; `pressures` records where that differs from the spec).
 * Every problem names its field (and row and column for files).
 */
export function validateHandIn(fm: ModuleFrontMatter, payload: SubmissionPayload, uploads: UploadedTable[]) {
  const a = fm.assignment!
  const issues: SubmissionFieldIssue[] = []
  // File problems parseLog counted but did not list: every other problem is in `issues`.
  let unlisted = 0
  const measurements: Record<string, number> = {}
  const pressures: Record<string, 'gauge' | 'absolute'> = {}
  const inputs: SubmissionInputs = { measurements: {}, reported: {} }

  // The barometric reading, in Pa: a number when it was typed and can be right, 'bad' when it was
  // typed but is refused (its own problem says why, so the readings that need it say nothing more).
  const ambientSpec = a.measurements.find((m) => m.role === 'ambient-pressure')
  const ambientTyped = ambientSpec ? payload.measurements[ambientSpec.key] : undefined
  let ambientSI: number | 'bad' | undefined
  if (ambientSpec && ambientTyped) {
    const si = isCompatibleUnit(ambientTyped.unit, ambientSpec.unit)
      ? rawToSI(ambientTyped.value, ambientTyped.unit)
      : Number.NaN
    ambientSI = Number.isFinite(si) && si >= 0 ? si : 'bad'
  }

  for (const m of a.measurements) {
    const field = `measurements.${m.key}`
    const typed = payload.measurements[m.key]
    if (!typed) {
      issues.push({ field, message: `${m.label}: enter a value.` })
      continue
    }
    inputs.measurements[m.key] = typed
    if (!isCompatibleUnit(typed.unit, m.unit)) {
      issues.push({
        field,
        message: `${m.label}: ${clip(typed.unit, 40)} is not a unit of the right kind; use ${m.unit} or a unit like it.`,
      })
      continue
    }
    const si = rawToSI(typed.value, typed.unit)
    const wrong = impossible(m.label, typed.value, typed.unit, si, m.role)
    if (wrong) {
      issues.push({ field, message: wrong })
      continue
    }
    const sense = dataUnitKind(m.unit) === 'pressure' ? readingSense(m, typed) : undefined
    if (sense === 'absolute' && si < 0) {
      issues.push({
        field,
        message: `${m.label}: ${String(typed.value)} ${typed.unit} absolute is below 0; an absolute pressure cannot be below 0.`,
      })
      continue
    }
    if (sense === 'gauge' && typeof ambientSI === 'number' && si + ambientSI < 0) {
      const unit = UNITS[typed.unit as keyof typeof UNITS]
      issues.push({
        field,
        message: `${m.label}: ${String(typed.value)} ${typed.unit} gauge is ${fmt(unit.fromSI(si + ambientSI))} ${typed.unit} absolute with the ${ambientSpec?.label.toLowerCase() ?? 'ambient pressure'} of ${fmt(unit.fromSI(ambientSI))} ${typed.unit}; an absolute pressure cannot be below 0.`,
      })
      continue
    }
    measurements[m.key] = si
    if (m.pressure && sense && sense !== m.pressure) pressures[m.key] = sense
    // The plausible range is stated in the spec's unit and sense.
    let inSpec = valueFromSI(si, m.unit)
    if (!Number.isFinite(inSpec)) {
      issues.push({ field, message: tooLargeIn(m.label, typed.value, typed.unit, m.unit) })
      continue
    }
    if (m.pressure && sense && sense !== m.pressure) {
      if (ambientSI === 'bad') continue
      if (ambientSI === undefined) {
        issues.push({
          field,
          message: `${m.label}: give the ambient pressure so a ${sense} reading can be converted to ${m.pressure}.`,
        })
        continue
      }
      inSpec = toSpecSense(inSpec, sense, m.pressure, valueFromSI(ambientSI, m.unit))
    }
    if (m.min !== undefined && inSpec < m.min)
      issues.push({
        field,
        message: `${m.label}: ${fmt(inSpec)} ${m.unit} is below the plausible minimum of ${m.min} ${m.unit}.`,
      })
    else if (m.max !== undefined && inSpec > m.max)
      issues.push({
        field,
        message: `${m.label}: ${fmt(inSpec)} ${m.unit} is above the plausible maximum of ${m.max} ${m.unit}.`,
      })
  }

  const reported: Record<string, number> = {}
  for (const r of a.results) {
    const field = `reported.${r.key}`
    const typed = payload.reported[r.key]
    if (!typed) {
      issues.push({ field, message: `${r.label}: enter your result.` })
      continue
    }
    inputs.reported[r.key] = typed
    if (!isCompatibleUnit(typed.unit, r.unit)) {
      issues.push({
        field,
        message: `${r.label}: ${clip(typed.unit, 40)} is not a unit of the right kind; use ${r.unit}.`,
      })
      continue
    }
    const wrong = impossible(r.label, typed.value, typed.unit, rawToSI(typed.value, typed.unit), undefined)
    if (wrong) {
      issues.push({ field, message: wrong })
      continue
    }
    // Finite in SI can still overflow in the result's unit (g/s from kg/s); a result is never stored as NULL.
    const value = toSpecUnit(typed.value, typed.unit, r.unit)
    if (!Number.isFinite(value)) {
      issues.push({ field, message: tooLargeIn(r.label, typed.value, typed.unit, r.unit) })
      continue
    }
    const notARegime = r.regime ? regimeCodeProblem(r.label, value) : null
    if (notARegime) {
      issues.push({ field, message: notARegime })
      continue
    }
    reported[r.key] = value
  }

  const tables: Record<string, Record<string, number[]>> = {}
  const files: {
    table: TableSpec
    upload: UploadedTable
    mapping: SubmissionPayload['mappings'][string]
    columns: Record<string, number[]>
    rowCount: number
  }[] = []
  for (const t of a.tables) {
    const field = `table:${t.key}`
    const upload = uploads.find((u) => u.field === field)
    if (!upload) {
      issues.push({ field, message: `${t.label}: attach the log file (CSV).` })
      continue
    }
    if (upload.bytes.length === 0) {
      issues.push({ field, message: `${t.label}: ${clip(upload.filename, 100)} is empty.` })
      continue
    }
    const sniff = sniffBinary(new Uint8Array(upload.bytes.buffer, upload.bytes.byteOffset, upload.bytes.byteLength))
    if (sniff.binary) {
      issues.push({ field, message: `${t.label}: ${clip(upload.filename, 100)}: ${sniff.message}` })
      continue
    }
    const mapping = payload.mappings[t.key]
    if (!mapping) {
      issues.push({ field, message: `${t.label}: match the file's columns to the log's quantities.` })
      continue
    }
    const text = upload.bytes.toString('utf8').replace(/^\uFEFF/, '')
    const parsed = parseLog(text, t, mapping)
    if (!parsed.ok) {
      unlisted += parsed.totalErrors - parsed.errors.length
      for (const e of parsed.errors)
        issues.push({
          field,
          message: e.message,
          ...(e.row ? { row: e.row } : {}),
          ...(e.column ? { column: e.column } : {}),
        })
      continue
    }
    for (const c of t.columns) {
      const sense = parsed.pressures[c.key]
      if (c.pressure && sense && sense !== c.pressure) pressures[c.key] = sense
    }
    tables[t.key] = parsed.columns
    files.push({ table: t, upload, mapping, columns: parsed.columns, rowCount: parsed.rowCount })
  }
  return { issues, totalIssues: issues.length + unlisted, measurements, reported, tables, pressures, files, inputs }
}

/**
 * The 422 for a hand-in with problems, or null when there are none: the first
 * {@link MAX_SHOWN_ISSUES} problems, and `more`, how many others there are (each problem counted
 * once, whether it concerns a field, the whole file or one of its rows).
 */
export function handInRefusal(v: { issues: SubmissionFieldIssue[]; totalIssues: number }): AppError | null {
  const first = v.issues[0]
  if (!first) return null
  const shown = v.issues.slice(0, MAX_SHOWN_ISSUES)
  return new AppError(
    'invalid_submission',
    `${v.totalIssues === 1 ? 'One problem' : `${count(v.totalIssues)} problems`} to fix before this can be handed in: ${first.message}`,
    422,
    { issues: shown, more: v.totalIssues - shown.length },
  )
}

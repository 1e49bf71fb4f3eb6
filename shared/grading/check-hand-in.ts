/**
 * The rules of a hand-in, written once: the form runs them as the student types (on the log it
 * parsed in the browser) and the server runs them again on the bytes it received, so both say
 * the same thing in the same words. Every problem names its field (`measurements.<key>`,
 * `reported.<key>`, `table:<key>`) and, for a log, its row and column.
 *
 * Pure: no DOM, no Node APIs.
 */
import type { LogParseResult } from './csv'
import { sniffBinary } from './csv'
import { clip } from './csv-limits'
import { regimeCodeProblem } from './regime'
import type { MeasurementSpec, TableSpec } from '../modules/schema'
import { DIMENSIONLESS, RESULT_ONLY_UNITS, dataUnitKind, valueFromSI } from '../modules/quantities'
import { isCompatibleUnit, toSpecSense, toSpecUnit } from '../typed-values'
import { SI_UNITS, UNITS, isUnitSymbol } from '../units'

type Sense = 'gauge' | 'absolute'

/** What of a module's assignment the check reads (the student's view of it is enough). */
export interface HandInSpec {
  tables: readonly TableSpec[]
  measurements: readonly MeasurementSpec[]
  results: readonly { key: string; label: string; unit: string; regime?: object | undefined }[]
  /** Photographs; `takenAt` names the time measurement that says when, in the run log, each was taken. */
  images?: readonly { key: string; label: string; takenAt?: string | undefined }[]
}

/** A typed value. `text` is what the form's field holds, for the message when it is not a number. */
export interface TypedValue {
  value: number
  unit: string
  pressure?: Sense | undefined
  text?: string | undefined
}

/** The non-file part of a hand-in (the request's `payload`, or the form's fields). */
export interface HandInPayload {
  mappings: Record<string, Record<string, { header: string; unit: string; pressure?: Sense | undefined }>>
  /** A measurement left out (or left empty in the form) is missing. */
  measurements: Record<string, TypedValue>
  reported: Record<string, TypedValue>
}

/**
 * One table's log file. The browser knows a file that is still being read or could not be read;
 * once read, `head` holds its first bytes (8 KB is enough for the binary check) and `parse` gives
 * the log parsed with the hand-in's mapping for that table: called only for a file that passed the
 * checks before it, so a binary upload is never parsed.
 */
export type HandInLog =
  | { state: 'reading'; filename: string }
  | { state: 'unreadable'; filename: string; reason: string }
  | { state: 'read'; filename: string; size: number; head: Uint8Array; parse: () => LogParseResult }

/** A problem with one field of the hand-in (a log's problems carry its row and column). */
export interface HandInIssue {
  field: string
  message: string
  row?: number
  column?: string
}

export interface HandInCheck {
  /** Every problem found, in the order measurements, results, logs (a log lists its first few). */
  issues: HandInIssue[]
  /** All problems, counting those a log found but did not list. */
  totalIssues: number
  /** Measurements in SI, in the sense they were read (`pressures` says where that differs from the spec). */
  measurements: Record<string, number>
  /** Results in the unit the spec declares (the checks compare them there). */
  reported: Record<string, number>
  /** Each table's columns, SI, as the log parse gave them. */
  tables: Record<string, Record<string, number[]>>
  /** Pressure columns and measurements read in the other sense than the spec declares. */
  pressures: Record<string, Sense>
  /** The parsed logs, by table key, for the server to store. */
  logs: Record<string, Extract<LogParseResult, { ok: true }>>
}

/** The field name of a measurement, a result or a table's log. */
export const handInField = {
  measurement: (key: string) => `measurements.${key}`,
  result: (key: string) => `reported.${key}`,
  table: (key: string) => `table:${key}`,
}

/**
 * How a typed pressure was read: the student's gauge/absolute choice, else the spec's. The
 * barometric reading is absolute whatever was chosen. Undefined for quantities that are not pressures.
 */
export function readingSense(
  m: { role?: string | undefined; pressure?: Sense | undefined },
  typed: { pressure?: Sense | undefined },
): Sense | undefined {
  return m.role === 'ambient-pressure' ? 'absolute' : (typed.pressure ?? m.pressure)
}

const fmt = (x: number) =>
  Math.abs(x) >= 1e5 || (Math.abs(x) < 1e-3 && x !== 0) ? x.toExponential(3) : String(Number(x.toPrecision(6)))

/**
 * A typed value in SI by the unit table's own factor, without the table's checks (which throw):
 * the caller checks the result and names the field. The unit is known to be compatible with the
 * spec's, so it is a unit of the table, '1' or a result-only unit.
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

/** A value the form could not read as a number (the server's payload schema refuses these first). */
function notANumber(label: string, typed: TypedValue, example: string): string {
  const text = typed.text?.trim()
  return text
    ? `${label}: “${clip(text, 40)}” is not a number; write it with a point for decimals, like ${example}.`
    : `${label}: enter a number.`
}

/**
 * Why a table's log file cannot be read as a log at all, or null: none attached, still being read
 * (browser), unreadable, empty, or not text. The upload shows it; {@link checkHandIn} lists it.
 */
export function logFileProblem(label: string, log: HandInLog | undefined): string | null {
  if (!log) return `${label}: attach the log file (CSV).`
  const name = clip(log.filename, 100)
  if (log.state === 'reading') return `${label}: ${name} is still being read; wait a moment.`
  if (log.state === 'unreadable') return `${label}: ${name} could not be read (${log.reason}); choose it again.`
  if (log.size === 0) return `${label}: ${name} is empty.`
  const sniff = sniffBinary(log.head)
  return sniff.binary ? `${label}: ${name}: ${sniff.message}` : null
}

/**
 * Checks every typed value and log file of a hand-in against the module's spec and converts them
 * to SI (pressures in the sense they were read; `pressures` records where that differs from the
 * spec). A table without an entry in `files` has no file attached.
 */
export function checkHandIn(
  spec: HandInSpec,
  payload: HandInPayload,
  files: Readonly<Record<string, HandInLog | undefined>>,
): HandInCheck {
  const issues: HandInIssue[] = []
  // Log problems parseLog counted but did not list: every other problem is in `issues`.
  let unlisted = 0
  const measurements: Record<string, number> = {}
  const pressures: Record<string, Sense> = {}

  // The barometric reading, in Pa: a number when it was typed and can be right, 'bad' when it was
  // typed but is refused (its own problem says why, so the readings that need it say nothing more).
  const ambientSpec = spec.measurements.find((m) => m.role === 'ambient-pressure')
  const ambientTyped = ambientSpec ? payload.measurements[ambientSpec.key] : undefined
  let ambientSI: number | 'bad' | undefined
  if (ambientSpec && ambientTyped) {
    const si = isCompatibleUnit(ambientTyped.unit, ambientSpec.unit)
      ? rawToSI(ambientTyped.value, ambientTyped.unit)
      : Number.NaN
    ambientSI = Number.isFinite(si) && si >= 0 ? si : 'bad'
  }

  for (const m of spec.measurements) {
    const field = handInField.measurement(m.key)
    const typed = payload.measurements[m.key]
    if (!typed) {
      issues.push({ field, message: `${m.label}: enter a value.` })
      continue
    }
    if (Number.isNaN(typed.value)) {
      issues.push({ field, message: notANumber(m.label, typed, '84.2') })
      continue
    }
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
  for (const r of spec.results) {
    const field = handInField.result(r.key)
    const typed = payload.reported[r.key]
    if (!typed) {
      issues.push({ field, message: r.regime ? `${r.label}: choose the regime.` : `${r.label}: enter your result.` })
      continue
    }
    if (Number.isNaN(typed.value)) {
      issues.push({ field, message: notANumber(r.label, typed, '0.672') })
      continue
    }
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
  const logs: HandInCheck['logs'] = {}
  for (const t of spec.tables) {
    const field = handInField.table(t.key)
    const log = files[t.key]
    const problem = logFileProblem(t.label, log)
    if (problem !== null || log?.state !== 'read') {
      issues.push({ field, message: problem ?? `${t.label}: attach the log file (CSV).` })
      continue
    }
    if (!payload.mappings[t.key]) {
      issues.push({ field, message: `${t.label}: match the file's columns to the log's quantities.` })
      continue
    }
    const parsed = log.parse()
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
    logs[t.key] = parsed
  }
  for (const img of spec.images ?? []) {
    const problem = photoTimeProblem(img, spec, measurements, tables)
    if (problem) issues.push(problem)
  }
  return { issues, totalIssues: issues.length + unlisted, measurements, reported, tables, pressures, logs }
}

/**
 * The moment a photograph was taken must lie within the run log, whose pressures at that moment the
 * expected values read: a time outside it is a mistyped time (or a log of another run).
 */
function photoTimeProblem(
  img: { label: string; takenAt?: string | undefined },
  spec: HandInSpec,
  measurements: Readonly<Record<string, number>>,
  tables: Readonly<Record<string, Record<string, number[]>>>,
): HandInIssue | null {
  const m = img.takenAt === undefined ? undefined : spec.measurements.find((x) => x.key === img.takenAt)
  const at = m ? measurements[m.key] : undefined
  if (!m || at === undefined) return null
  for (const t of spec.tables) {
    const timeColumn = t.columns.find((c) => c.role === 'time')
    const times = timeColumn ? tables[t.key]?.[timeColumn.key] : undefined
    if (!times || times.length === 0) continue
    let lo = Infinity
    let hi = -Infinity
    for (const v of times) {
      if (v < lo) lo = v
      if (v > hi) hi = v
    }
    if (at >= lo && at <= hi) return null
    const unit = UNITS[m.unit as keyof typeof UNITS]
    const inUnit = (v: number) => fmt(unit ? unit.fromSI(v) : v)
    return {
      field: handInField.measurement(m.key),
      message: `${m.label}: ${inUnit(at)} ${m.unit} is outside ${t.label.toLowerCase()} (${inUnit(lo)} to ${inUnit(hi)} ${m.unit}); give the time of "${img.label}" in the log's own time.`,
    }
  }
  return null
}

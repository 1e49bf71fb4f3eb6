import type { ModuleFrontMatter, TableSpec } from '../../shared/modules/schema'
import { parseLog, sniffBinary } from '../../shared/grading/csv'
import { valueFromSI, valueToSI } from '../../shared/modules/quantities'
import type { SubmissionFieldIssue, SubmissionPayload } from '../../shared/schemas/submissions'
import { isCompatibleUnit, toSpecSense, toSpecUnit } from '../../shared/typed-values'
import type { SubmissionInputs } from '../db/schema'

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

const fmt = (x: number) => (Math.abs(x) >= 1e5 || (Math.abs(x) < 1e-3 && x !== 0) ? x.toExponential(3) : String(Number(x.toPrecision(6))))

/**
 * Checks every typed value and uploaded file against the module's spec and converts them to SI
 * (pressures in the sense they were read; `pressures` records where that differs from the spec).
 * Every problem names its field (and row and column for files).
 */
export function validateHandIn(fm: ModuleFrontMatter, payload: SubmissionPayload, uploads: UploadedTable[]) {
  const a = fm.assignment!
  const issues: SubmissionFieldIssue[] = []
  let totalFileErrors = 0
  const measurements: Record<string, number> = {}
  const pressures: Record<string, 'gauge' | 'absolute'> = {}
  const inputs: SubmissionInputs = { measurements: {}, reported: {} }

  const ambientSpec = a.measurements.find((m) => m.role === 'ambient-pressure')
  const ambientTyped = ambientSpec ? payload.measurements[ambientSpec.key] : undefined
  const ambientSI =
    ambientSpec && ambientTyped && isCompatibleUnit(ambientTyped.unit, ambientSpec.unit) ? valueToSI(ambientTyped.value, ambientTyped.unit) : undefined

  for (const m of a.measurements) {
    const field = `measurements.${m.key}`
    const typed = payload.measurements[m.key]
    if (!typed) {
      issues.push({ field, message: `${m.label}: enter a value.` })
      continue
    }
    inputs.measurements[m.key] = typed
    if (!isCompatibleUnit(typed.unit, m.unit)) {
      issues.push({ field, message: `${m.label}: ${typed.unit} is not a unit of the right kind; use ${m.unit} or a unit like it.` })
      continue
    }
    const si = valueToSI(typed.value, typed.unit)
    measurements[m.key] = si
    const sense = readingSense(m, typed)
    if (m.pressure && sense && sense !== m.pressure) pressures[m.key] = sense
    // The plausible range is stated in the spec's unit and sense.
    let inSpec = valueFromSI(si, m.unit)
    if (m.pressure && sense && sense !== m.pressure) {
      if (ambientSI === undefined) {
        issues.push({ field, message: `${m.label}: give the ambient pressure so a ${sense} reading can be converted to ${m.pressure}.` })
        continue
      }
      inSpec = toSpecSense(inSpec, sense, m.pressure, valueFromSI(ambientSI, m.unit))
    }
    if (m.min !== undefined && inSpec < m.min) issues.push({ field, message: `${m.label}: ${fmt(inSpec)} ${m.unit} is below the plausible minimum of ${m.min} ${m.unit}.` })
    else if (m.max !== undefined && inSpec > m.max) issues.push({ field, message: `${m.label}: ${fmt(inSpec)} ${m.unit} is above the plausible maximum of ${m.max} ${m.unit}.` })
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
      issues.push({ field, message: `${r.label}: ${typed.unit} is not a unit of the right kind; use ${r.unit}.` })
      continue
    }
    reported[r.key] = toSpecUnit(typed.value, typed.unit, r.unit)
  }

  const tables: Record<string, Record<string, number[]>> = {}
  const files: { table: TableSpec; upload: UploadedTable; mapping: SubmissionPayload['mappings'][string]; columns: Record<string, number[]>; rowCount: number }[] = []
  for (const t of a.tables) {
    const field = `table:${t.key}`
    const upload = uploads.find((u) => u.field === field)
    if (!upload) {
      issues.push({ field, message: `${t.label}: attach the log file (CSV).` })
      continue
    }
    if (upload.bytes.length === 0) {
      issues.push({ field, message: `${t.label}: ${upload.filename} is empty.` })
      continue
    }
    const sniff = sniffBinary(new Uint8Array(upload.bytes.buffer, upload.bytes.byteOffset, upload.bytes.byteLength))
    if (sniff.binary) {
      issues.push({ field, message: `${t.label}: ${upload.filename}: ${sniff.message}` })
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
      totalFileErrors += parsed.totalErrors
      for (const e of parsed.errors) issues.push({ field, message: e.message, ...(e.row ? { row: e.row } : {}), ...(e.column ? { column: e.column } : {}) })
      continue
    }
    for (const c of t.columns) {
      const sense = parsed.pressures[c.key]
      if (c.pressure && sense && sense !== c.pressure) pressures[c.key] = sense
    }
    tables[t.key] = parsed.columns
    files.push({ table: t, upload, mapping, columns: parsed.columns, rowCount: parsed.rowCount })
  }
  return { issues, totalFileErrors, measurements, reported, tables, pressures, files, inputs }
}


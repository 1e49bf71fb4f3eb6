/**
 * Reading a test-stand log (CSV text) against a table of an assignment: the file's headers are
 * mapped onto the table's columns with the unit the file uses, every cell is parsed as a decimal
 * number by our own rules, converted to SI, and checked (finite, time strictly increasing, enough
 * rows). Every problem names the row and the column, in words a student can act on.
 *
 * The same function runs in the browser (preview, mapping) and on the server (which never trusts
 * the browser's parse). Pure: no DOM, no Node APIs.
 *
 * Row numbers are the file's line numbers, as a spreadsheet shows them: the header is row 1, the
 * first value row is row 2, and blank lines count (a quoted cell that spans lines counts each line).
 *
 * Cells are data, never code: a cell such as "=1+2" or "@SUM(A1)" is kept as text and refused as
 * a spreadsheet formula; nothing here evaluates it.
 *
 * A log is bounded before papaparse reads it (lines, line length, columns, header names: see
 * `csv-limits.ts`), and every message stays short whatever the file holds: cells and names are
 * cut to 40 characters and lists to 10 items.
 */
import Papa from 'papaparse/papaparse.min.js'
import { DIMENSIONLESS, dataUnitKind, isDataUnit } from '../modules/quantities'
import type { ColumnSpec, TableSpec } from '../modules/schema'
import { SI_UNITS, UNITS, unitsOfKind } from '../units'
import type { PressureSense, UnitKind, UnitSymbol } from '../units'
import { checkHeader, checkLines, clip, listSome, quote, quoteCells, scanRows } from './csv-limits'
import { plainLayout, readPlainRows } from './csv-plain'
import { parseDecimal } from './decimal'
import { readHeader, readUnit } from './units-text'

export { LOG_LIMITS, MAX_LISTED_NAMES } from './csv-limits'
export { parseDecimal } from './decimal'

/** The file's column for one column of the spec, and the unit (and gauge/absolute sense) it is in. */
export interface ColumnMappingEntry {
  /** The file's header text. */
  header: string
  /** A unit of the same kind as the spec's column (the student's choice), or '1' for a pure number. */
  unit: string
  /** For pressure columns: how the file's values were read; left out, the spec's `pressure`. */
  pressure?: PressureSense
}

/** Spec column key → the file's column. */
export type ColumnMapping = Readonly<Record<string, ColumnMappingEntry>>

/** One problem with a log. */
export interface LogIssue {
  /** Line of the file, counted as a person counts rows in a spreadsheet (header = row 1). */
  row?: number
  /** The file's header of the column concerned. */
  column?: string
  message: string
}

export type LogParseResult =
  | {
      ok: true
      /**
       * Spec column key → values in SI (s, N, Pa, m, K, …), one per data row. Pressures are in Pa
       * in the sense given by `pressures` (gauge stays gauge): making them absolute needs the
       * submission's ambient pressure, which the grading scope adds.
       */
      columns: Record<string, number[]>
      /** For each pressure column: how its values were read. */
      pressures: Record<string, PressureSense>
      rowCount: number
      /** The file's headers, trimmed, in file order. */
      headers: string[]
    }
  | {
      ok: false
      /** The first {@link MAX_LISTED_ISSUES} problems, in file order (whole-file problems first). */
      errors: LogIssue[]
      /** How many problems there are in all. */
      totalErrors: number
      /** The file's headers, when the header row could be read (for the mapping form). */
      headers?: string[]
    }

/** At most this many problems are listed; `totalErrors` counts the rest. */
export const MAX_LISTED_ISSUES = 20

const SEMICOLON_AND_DECIMAL_COMMA =
  "This file uses ';' between values and ',' as the decimal mark; export it with ',' between values and '.' for decimals."
const SEMICOLON_ONLY = "This file uses ';' between values; export it with ',' between values and '.' for decimals."

class IssueList {
  readonly listed: LogIssue[] = []
  total = 0
  add(issue: LogIssue): void {
    this.total++
    if (this.listed.length < MAX_LISTED_ISSUES) this.listed.push(issue)
  }
}

function fail(issues: IssueList, headers?: string[]): LogParseResult {
  return headers === undefined
    ? { ok: false, errors: issues.listed, totalErrors: issues.total }
    : { ok: false, errors: issues.listed, totalErrors: issues.total, headers }
}

function failWith(message: string, headers?: string[]): LogParseResult {
  return failWithIssue({ message }, headers)
}

function failWithIssue(issue: LogIssue, headers?: string[]): LogParseResult {
  const issues = new IssueList()
  issues.add(issue)
  return fail(issues, headers)
}

/** Counts of candidate separators in one line, outside double quotes. */
function separatorCounts(line: string): { comma: number; semicolon: number; tab: number } {
  let comma = 0
  let semicolon = 0
  let tab = 0
  let quoted = false
  for (let i = 0; i < line.length; i++) {
    const c = line.charCodeAt(i)
    if (c === 34) quoted = !quoted
    else if (quoted) continue
    else if (c === 44) comma++
    else if (c === 59) semicolon++
    else if (c === 9) tab++
  }
  return { comma, semicolon, tab }
}

/** Why a cell is not a usable number, in words. */
function describeBadCell(cell: string): string {
  const t = cell.trim()
  if (t === '') return 'the cell is empty; every row needs a number in each column used'
  if (/^[+-]?nan$/i.test(t)) return `${quote(cell)} is not a number; remove the rows where the logger had no reading`
  if (/^[+-]?(inf|infinity|∞)$/i.test(t) || /^[+-]?(\d+\.?\d*|\.\d+)(e[+-]?\d+)?$/i.test(t)) {
    return `${quote(cell)} is not a finite number; remove the rows where the logger had no reading`
  }
  if (/^[+-]?\d*,\d+$/.test(t)) return `${quote(cell)} uses ',' as the decimal mark; write ${t.replace(',', '.')}`
  if (t.length > 1 && /^[=+\-@]/.test(t)) {
    return `${quote(cell)} is a spreadsheet formula, not a number (it is kept as text, never calculated); export the values, not the formulas`
  }
  if (/^[+-]?0[xob]/i.test(t)) return `${quote(cell)} is not a decimal number`
  return `${quote(cell)} is text, not a number`
}

function isBlankRow(row: readonly string[]): boolean {
  for (const cell of row) {
    // Fast path for the usual row, whose first cell starts with a visible character.
    if (cell.length > 0 && cell.charCodeAt(0) > 32) return false
    if (cell.trim() !== '') return false
  }
  return true
}

function kindWords(kind: UnitKind | 'dimensionless'): string {
  return kind === 'dimensionless' ? 'a pure number' : `a ${kind}`
}

function unitChoices(kind: UnitKind | 'dimensionless'): string {
  return kind === 'dimensionless' ? DIMENSIONLESS : unitsOfKind(kind).join(', ')
}

/** Value in a unit → SI, without the per-call checks of toSI (the caller checks finiteness and 0 K). */
function siConverter(unit: string): (value: number) => number {
  if (unit === DIMENSIONLESS) return (v) => v
  return UNITS[unit as UnitSymbol].toSI
}

interface MappedColumn {
  spec: ColumnSpec
  index: number
  header: string
  toSI: (value: number) => number
  /** The SI unit the values end up in, for messages. */
  siUnit: string
  temperature: boolean
}

/** The spec's columns found among the file's headers, each problem added to `issues`. */
function mapColumns(
  headers: readonly string[],
  table: TableSpec,
  mapping: ColumnMapping,
  issues: IssueList,
): { mapped: MappedColumn[]; pressures: Record<string, PressureSense> } {
  // Map the spec's columns onto the file's.
  const mapped: MappedColumn[] = []
  const pressures: Record<string, PressureSense> = {}
  for (const spec of table.columns) {
    const entry = mapping[spec.key]
    if (!entry) {
      issues.add({
        message: `No column of the file is chosen for ${spec.label} (${spec.key}): choose one in the column mapping.`,
      })
      continue
    }
    // The mapping comes from the form: its header may be anything, so it is cut in messages.
    const header = entry.header.trim()
    const positions = headers.flatMap((h, i) => (h === header ? [i] : []))
    if (positions.length === 0) {
      issues.add({
        column: clip(header),
        message: `The file has no column ${quote(header)} (chosen for ${spec.label}). Its columns are: ${listSome(headers.map(quote))}.`,
      })
      continue
    }
    if (positions.length > 1) {
      const where = positions.map((p) => String(p + 1))
      issues.add({
        column: header,
        message: `The file has ${positions.length} columns named ${quote(header)} (columns ${where.length === 2 ? where.join(' and ') : listSome(where)}); rename them so each name is used once.`,
      })
      continue
    }
    const kind = dataUnitKind(spec.unit) ?? 'dimensionless'
    if (!isDataUnit(entry.unit)) {
      issues.add({
        column: header,
        message: `Column ${quote(header)} (${spec.label}): ${quote(entry.unit)} is not a unit Isentrope knows; choose one of ${unitChoices(kind)}.`,
      })
      continue
    }
    const given = dataUnitKind(entry.unit) ?? 'dimensionless'
    if (given !== kind) {
      issues.add({
        column: header,
        message: `Column ${quote(header)} (${spec.label}): ${entry.unit} measures ${kindWords(given)}, but this column holds ${kindWords(kind)}; choose one of ${unitChoices(kind)}.`,
      })
      continue
    }
    if (kind === 'pressure') {
      const sense = entry.pressure ?? spec.pressure
      if (sense) pressures[spec.key] = sense
    }
    mapped.push({
      spec,
      index: positions[0] as number,
      header,
      toSI: siConverter(entry.unit),
      siUnit: kind === 'dimensionless' ? 'a pure number' : SI_UNITS[kind],
      temperature: kind === 'temperature',
    })
  }
  return { mapped, pressures }
}

/** A header row of nothing but numbers and empty names: the file has no header row. */
function headersAreNumbers(headers: readonly string[]): boolean {
  return headers.every((h) => h === '' || !Number.isNaN(parseDecimal(h)))
}

/**
 * The plain reader (`csv-plain.ts`) on a file without formula cells: the result the general reader
 * would give, or undefined when the file needs the general reader.
 */
function readPlain(
  text: string,
  delimiter: string,
  table: TableSpec,
  mapping: ColumnMapping,
): LogParseResult | undefined {
  const layout = plainLayout(text, delimiter)
  if (!layout) return undefined
  const headerRow = text.slice(layout.header.start, layout.header.end).split(delimiter)
  if (isBlankRow(headerRow)) return undefined
  const headers = headerRow.map((h) => h.trim())
  if (headersAreNumbers(headers)) return undefined
  const issues = new IssueList()
  const { mapped, pressures } = mapColumns(headers, table, mapping, issues)
  if (issues.total > 0) return undefined
  const read = readPlainRows(
    text,
    layout,
    delimiter,
    headers.length,
    mapped.map((m) => ({ key: m.spec.key, index: m.index, toSI: m.toSI, temperature: m.temperature })),
    mapped.findIndex((m) => m.spec.role === 'time'),
    table.minRows,
  )
  if (!read) return undefined
  return { ok: true, columns: read.columns, pressures, rowCount: read.rowCount, headers }
}

/**
 * Reads a test-stand log against a table of the assignment.
 *
 * @param text - the file's text (a UTF-8 byte-order mark is ignored)
 * @param table - the table of the assignment the log fills
 * @param mapping - for each column of the table, the file's header and the unit the file uses
 * @returns the columns in SI, or the problems found (at most 20 listed, all counted)
 * @example
 * parseLog('t,F [N]\n0,0\n0.01,1.5\n…', runTable, { t: { header: 't', unit: 's' }, thrust: { header: 'F [N]', unit: 'N' } })
 * // → { ok: true, columns: { t: [0, 0.01, …], thrust: [0, 1.5, …] }, pressures: {}, rowCount: …, headers: ['t', 'F [N]'] }
 */
export function parseLog(text: string, table: TableSpec, mapping: ColumnMapping): LogParseResult {
  return readLog(text, table, mapping, true)
}

/**
 * {@link parseLog} with the general reader alone, whatever the file: the reference the plain
 * reader is held to in the tests (same results on every file it takes).
 */
export function parseLogGeneral(text: string, table: TableSpec, mapping: ColumnMapping): LogParseResult {
  return readLog(text, table, mapping, false)
}

function readLog(text: string, table: TableSpec, mapping: ColumnMapping, plain: boolean): LogParseResult {
  if (text.charCodeAt(0) === 0xfeff) text = text.slice(1)
  if (text.trim() === '') return failWith('The file is empty: upload the CSV file the data logger wrote.')

  // The cheap checks first, on the raw text: line lengths and the number of lines, so that no
  // later step (papaparse above all) ever sees a line over 4 KB or more than 200 001 lines.
  const lines = checkLines(text)
  if (!lines.ok) return failWithIssue(lines.issue)
  const { header, newline } = lines.lines
  const headerLine = text.slice(header.start, header.end)

  // The separator is decided from the header line, before papaparse sees the file, so a
  // semicolon file gets one clear message instead of a column-not-found for every column.
  const counts = separatorCounts(headerLine)
  if (counts.semicolon > 0 && counts.semicolon >= counts.comma && counts.semicolon >= counts.tab) {
    const sample = text.slice(header.end, header.end + 4000)
    return failWith(/\d,\d/.test(sample) ? SEMICOLON_AND_DECIMAL_COMMA : SEMICOLON_ONLY)
  }
  const delimiter = counts.tab > counts.comma ? '\t' : ','

  const headerProblem = checkHeader(headerLine, header.row, delimiter)
  if (headerProblem) return failWithIssue(headerProblem)
  const afterHeader = text.indexOf(newline, header.end)
  const scan = scanRows(text, afterHeader < 0 ? text.length : afterHeader + 1, header.row + 1, delimiter, newline)
  if (scan.issue) return failWithIssue(scan.issue)
  // A formula with quote marks in it, written without quoting, would make papaparse read the rest
  // of the file as one cell; quoted, it is one cell, refused below as a formula at its own row.
  const readable = scan.formulaCells.length > 0 ? quoteCells(text, scan.formulaCells) : text
  // A file a logger wrote goes the plain way (see csv-plain.ts); anything it does not expect, the general way.
  if (plain && readable === text) {
    const read = readPlain(text, delimiter, table, mapping)
    if (read) return read
  }
  return readGeneral(text, readable, delimiter, newline, table, mapping)
}

/**
 * The general reader: papaparse, then every check with its message. Every file the plain reader
 * gives up on comes here.
 *
 * @param text - the file's text, without a byte-order mark, past the limit checks
 * @param readable - the same with its formula cells quoted (the text itself when it has none)
 */
function readGeneral(
  text: string,
  readable: string,
  delimiter: string,
  newline: '\n' | '\r',
  table: TableSpec,
  mapping: ColumnMapping,
): LogParseResult {
  // header: false and our own blank-line handling rather than papaparse's header: true with
  // skipEmptyLines: 'greedy' (same rows kept): it parses about three times faster on a
  // 50 000-row log, and row i of the result is then line i + 1 of the file, which the messages need.
  // https://www.papaparse.com/docs#config
  const parsed = Papa.parse(readable, {
    delimiter,
    header: false,
    skipEmptyLines: false,
    dynamicTyping: false,
    ...(newline === '\r' ? { newline } : {}),
  })
  const rows = parsed.data
  const lineOf = lineNumbers(text, rows)

  let headerIndex = 0
  while (headerIndex < rows.length && isBlankRow(rows[headerIndex] as string[])) headerIndex++
  const headerRow = rows[headerIndex]
  if (!headerRow) return failWith('The file is empty: upload the CSV file the data logger wrote.')
  const headers = headerRow.map((h) => h.trim())

  if (headersAreNumbers(headers)) {
    const names = listSome(table.columns.map((c) => c.key))
    return failWith(
      `Row ${lineOf(headerIndex)} holds numbers, not column names: the file has no header row. Add one as the first row, naming each column (for example ${names}).`,
    )
  }

  const issues = new IssueList()
  const { mapped, pressures } = mapColumns(headers, table, mapping, issues)
  if (issues.total > 0) return fail(issues, headers)

  // papaparse may report one bad quote twice (a stray quote and the cell it leaves open): once per row.
  const quoteRows = new Set<number | undefined>()
  for (const error of parsed.errors) {
    if (error.type === 'Quotes' && !quoteRows.has(error.row)) {
      quoteRows.add(error.row)
      const row = error.row === undefined ? undefined : lineOf(error.row)
      issues.add({
        ...(row === undefined ? {} : { row }),
        message: `${row === undefined ? 'A' : `Row ${row}: a`} quoted cell is not closed or has a stray quote mark (") in it; check the quote marks.`,
      })
    }
  }

  // The data rows: every non-blank row after the header.
  const dataRows: number[] = []
  for (let i = headerIndex + 1; i < rows.length; i++) if (!isBlankRow(rows[i] as string[])) dataRows.push(i)

  // A row of units right under the header ("s, N, kPa"), as some loggers write.
  let start = 0
  const firstData = dataRows[0] === undefined ? undefined : rows[dataRows[0]]
  if (firstData && dataRows[0] !== undefined && looksLikeUnitsRow(firstData, mapped)) {
    const units = listSome(mapped.map((m) => clip((firstData[m.index] ?? '').trim(), 40)))
    issues.add({
      row: lineOf(dataRows[0]),
      message: `Row ${lineOf(dataRows[0])} holds units (${units}), not numbers. Delete that row and upload again; the units are chosen in the column mapping.`,
    })
    start = 1
  }

  const rowCount = dataRows.length - start
  if (rowCount < table.minRows) {
    issues.add({
      message: `The log has ${rowCount} data row${rowCount === 1 ? '' : 's'}; ${table.label} needs at least ${table.minRows}.`,
    })
  }

  // Rows with more values than the header has names, in most of the file: decimal commas.
  const width = headers.length
  let wide = 0
  let example = -1
  for (let k = start; k < dataRows.length; k++) {
    if ((rows[dataRows[k] as number] as string[]).length > width) {
      wide++
      if (example < 0) example = dataRows[k] as number
    }
  }
  if (rowCount > 0 && wide * 2 > rowCount) {
    issues.add({
      message: `Most rows have more values than the header has names (row ${lineOf(example)}: ${(rows[example] as string[]).length} values, header: ${width}). This usually means the file uses ',' as the decimal mark; export it with ',' between values and '.' for decimals.`,
    })
    return fail(issues, headers)
  }

  const columns: Record<string, number[]> = {}
  // Sized once (no regrowth: less garbage on a 50 000-row log); on the good path every row fills
  // its slot, and on any problem the result is an error and they are dropped.
  const values = mapped.map((m) => {
    const column = new Array<number>(rowCount)
    columns[m.spec.key] = column
    return column
  })
  const timeColumn = mapped.findIndex((m) => m.spec.role === 'time')
  // The previous row's time in SI and its cell, NaN when that row gave none.
  let previousTime = Number.NaN
  let previousTimeCell = ''

  for (let k = start; k < dataRows.length; k++) {
    const r = dataRows[k] as number
    const n = k - start
    const row = rows[r] as string[]
    if (row.length !== width) {
      issues.add({
        row: lineOf(r),
        message: `Row ${lineOf(r)} has ${row.length} value${row.length === 1 ? '' : 's'}, but the header names ${width} columns.`,
      })
      previousTime = Number.NaN
      continue
    }
    let time = Number.NaN
    for (let j = 0; j < mapped.length; j++) {
      const m = mapped[j] as MappedColumn
      const cell = row[m.index] as string
      const v = parseDecimal(cell)
      if (Number.isNaN(v)) {
        issues.add({
          row: lineOf(r),
          column: m.header,
          message: `Row ${lineOf(r)}, column ${quote(m.header)}: ${describeBadCell(cell)}.`,
        })
        continue
      }
      const si = m.toSI(v)
      if (!Number.isFinite(si)) {
        issues.add({
          row: lineOf(r),
          column: m.header,
          message: `Row ${lineOf(r)}, column ${quote(m.header)}: ${quote(cell)} is too large: it is not a finite number once converted to ${m.siUnit}; check the value and the column's unit.`,
        })
        continue
      }
      if (m.temperature && si < 0) {
        issues.add({
          row: lineOf(r),
          column: m.header,
          message: `Row ${lineOf(r)}, column ${quote(m.header)}: ${quote(cell)} is below absolute zero.`,
        })
        continue
      }
      ;(values[j] as number[])[n] = si
      if (j === timeColumn) time = si
    }
    if (timeColumn >= 0) {
      // Compared only when both times were read; a bad cell has been reported already.
      if (!(time > previousTime) && !Number.isNaN(time) && !Number.isNaN(previousTime)) {
        const m = mapped[timeColumn] as MappedColumn
        issues.add({
          row: lineOf(r),
          column: m.header,
          message: `Row ${lineOf(r)}, column ${quote(m.header)}: the time ${quote(row[m.index] ?? '')} does not increase from the row before (${quote(previousTimeCell)}); times must strictly increase.`,
        })
      }
      previousTime = time
      previousTimeCell = row[(mapped[timeColumn] as MappedColumn).index] ?? ''
    }
  }
  if (issues.total > 0) return fail(issues, headers)
  return { ok: true, columns, pressures, rowCount, headers }
}

/**
 * Row index → line number (1-based). Without quote marks in the file each row is one line; with
 * them, a quoted cell may span lines, so the line breaks inside earlier rows' cells are counted
 * (only when a message needs a line number).
 */
function lineNumbers(text: string, rows: readonly (readonly string[])[]): (row: number) => number {
  if (!text.includes('"')) return (row) => row + 1
  let prefix: Int32Array | null = null
  return (row) => {
    if (prefix === null) {
      prefix = new Int32Array(rows.length + 1)
      for (let i = 0; i < rows.length; i++) {
        let breaks = 0
        for (const cell of rows[i] as string[]) {
          for (let c = 0; c < cell.length; c++) {
            const ch = cell.charCodeAt(c)
            if (ch === 10 || (ch === 13 && cell.charCodeAt(c + 1) !== 10)) breaks++
          }
        }
        prefix[i + 1] = (prefix[i] as number) + breaks
      }
    }
    return row + 1 + (prefix[Math.min(row, rows.length)] as number)
  }
}

function looksLikeUnitsRow(row: readonly string[], mapped: readonly MappedColumn[]): boolean {
  let units = 0
  for (const m of mapped) {
    const cell = (row[m.index] ?? '').trim()
    if (!Number.isNaN(parseDecimal(cell))) return false
    if (cell !== '' && readUnit(cell, dataUnitKind(m.spec.unit) ?? undefined)) units++
  }
  return units > 0
}

// ---------------------------------------------------------------------------------------------
// Suggesting a mapping from the file's headers.

/** Other names a logger or a student gives the columns of each role (compared without case and punctuation). */
const ROLE_NAMES: Readonly<Record<string, readonly string[]>> = {
  time: ['t', 'time', 'timestamp', 'elapsed', 'elapsedtime'],
  thrust: ['thrust', 'f', 'force', 'load', 'loadcell', 'fthrust'],
  'chamber-pressure': ['pc', 'p0', 'pchamber', 'chamber', 'chamberpressure', 'pch'],
  'receiver-pressure': ['pr', 'ptank', 'tank', 'tankpressure', 'receiver', 'preceiver', 'receiverpressure', 'prec'],
}

function normalise(name: string): string {
  return name.toLowerCase().replace(/[^a-z0-9]/g, '')
}

/**
 * A guess at the mapping of a file's headers onto a table's columns, for the mapping form to show
 * and the student to confirm. A header matches a column by its key or label (ignoring case, spaces
 * and punctuation) or by a usual name for the column's role (pc, p_tank, force, …); a unit in the
 * header ("thrust [N]", "pc (psi)", "p_chamber_kPa", "psig") becomes the mapping's unit when it is
 * of the right kind, otherwise the spec's unit is proposed. Each header is used once; columns with
 * no match are left out.
 *
 * @param headers - the file's headers
 * @param table - the table of the assignment
 * @returns spec column key → suggested entry, for the columns a header was found for
 * @example
 * suggestMapping(['time [s]', 'thrust [N]', 'pc (psig)'], run)
 * // → { t: { header: 'time [s]', unit: 's' }, thrust: { header: 'thrust [N]', unit: 'N' },
 * //     p_chamber: { header: 'pc (psig)', unit: 'psi', pressure: 'gauge' } }
 */
export function suggestMapping(headers: readonly string[], table: TableSpec): Record<string, ColumnMappingEntry> {
  const used = new Set<number>()
  const out: Record<string, ColumnMappingEntry> = {}
  for (const spec of table.columns) {
    const kind = dataUnitKind(spec.unit) ?? 'dimensionless'
    const names: [string, number][] = [
      [normalise(spec.key), 3],
      [normalise(spec.label), 2],
      ...(spec.role ? (ROLE_NAMES[spec.role] ?? []).map((n): [string, number] => [n, 1]) : []),
    ]
    let best: { index: number; score: number; unit?: string; pressure?: PressureSense } | undefined
    headers.forEach((header, index) => {
      if (used.has(index)) return
      const reading = readHeader(header, kind === 'dimensionless' ? undefined : kind)
      const candidates = [normalise(header), normalise(reading.name)]
      const score = Math.max(0, ...names.filter(([n]) => candidates.includes(n)).map(([, s]) => s))
      if (score > 0 && (!best || score > best.score)) {
        const unit = reading.unit && dataUnitKind(reading.unit.unit) === kind ? reading.unit : undefined
        best = {
          index,
          score,
          ...(unit ? { unit: unit.unit } : {}),
          ...(unit?.pressure ? { pressure: unit.pressure } : {}),
        }
      }
    })
    if (!best) continue
    used.add(best.index)
    const entry: ColumnMappingEntry = { header: (headers[best.index] as string).trim(), unit: best.unit ?? spec.unit }
    if (kind === 'pressure') {
      const sense = best.pressure ?? spec.pressure
      if (sense) entry.pressure = sense
    }
    out[spec.key] = entry
  }
  return out
}

// ---------------------------------------------------------------------------------------------
// Content sniffing.

/** What a file's first bytes say about it. */
export type ContentSniff = { binary: false } | { binary: true; kind: string; message: string }

const SIGNATURES: readonly { bytes: readonly number[]; kind: string; hint?: string }[] = [
  { bytes: [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a], kind: 'a PNG image' },
  { bytes: [0x25, 0x50, 0x44, 0x46, 0x2d], kind: 'a PDF document' },
  {
    bytes: [0x50, 0x4b, 0x03, 0x04],
    kind: 'a ZIP archive',
    hint: ' (an .xlsx workbook is one: open it and save the sheet as CSV)',
  },
  { bytes: [0x50, 0x4b, 0x05, 0x06], kind: 'a ZIP archive' },
  { bytes: [0x50, 0x4b, 0x07, 0x08], kind: 'a ZIP archive' },
  {
    bytes: [0xd0, 0xcf, 0x11, 0xe0, 0xa1, 0xb1, 0x1a, 0xe1],
    kind: 'an Office 97–2003 file',
    hint: ' (an .xls workbook: open it and save the sheet as CSV)',
  },
  { bytes: [0x1f, 0x8b], kind: 'a gzip archive' },
  { bytes: [0xff, 0xd8, 0xff], kind: 'a JPEG image' },
  { bytes: [0x47, 0x49, 0x46, 0x38], kind: 'a GIF image' },
]

/** How many leading bytes are searched for NUL bytes. */
const SNIFF_BYTES = 8192

/**
 * Whether bytes look like a non-text file rather than a CSV: a PNG, PDF, ZIP (also .xlsx), old
 * Office, gzip, JPEG or GIF signature, UTF-16 text (byte-order mark), or any NUL byte in the first
 * 8 KiB (text never has one).
 *
 * @param bytes - the upload's bytes (the first few KiB are enough)
 * @returns `{ binary: false }`, or what the file seems to be with a message for the student
 * @example
 * sniffBinary(new Uint8Array([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]))
 * // → { binary: true, kind: 'a PNG image', message: 'This file is a PNG image, not a CSV text file. …' }
 */
export function sniffBinary(bytes: Uint8Array): ContentSniff {
  const advice = ' Export the log from the data logger as CSV (comma-separated text) and upload that.'
  for (const s of SIGNATURES) {
    if (bytes.length >= s.bytes.length && s.bytes.every((b, i) => bytes[i] === b)) {
      return {
        binary: true,
        kind: s.kind,
        message: `This file is ${s.kind}${s.hint ?? ''}, not a CSV text file.${advice}`,
      }
    }
  }
  if (bytes.length >= 2 && ((bytes[0] === 0xff && bytes[1] === 0xfe) || (bytes[0] === 0xfe && bytes[1] === 0xff))) {
    return {
      binary: true,
      kind: 'UTF-16 text',
      message:
        'This file is UTF-16 text; save it as CSV in UTF-8 (the usual "CSV" or "CSV UTF-8" choice) and upload that.',
    }
  }
  const end = Math.min(bytes.length, SNIFF_BYTES)
  for (let i = 0; i < end; i++) {
    if (bytes[i] === 0)
      return { binary: true, kind: 'binary data', message: `This file holds binary data, not CSV text.${advice}` }
  }
  return { binary: false }
}

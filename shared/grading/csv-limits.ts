/**
 * The size limits of a test-stand log, checked on the raw text before papaparse reads it, and the
 * helpers that keep every message about a log short.
 *
 * Why before papaparse: papaparse turns every cell into a string in an array, so a hostile file
 * (one header name followed by megabytes of commas, megabytes of blank lines, very wide rows)
 * costs seconds and gigabytes before any check runs, and a message that lists the header's names
 * grows with the file. The checks here walk the text with `indexOf` (native, no allocation per
 * line) and stop at the first limit passed, so such a file costs about as much as reading it once.
 *
 * Pure: no DOM, no Node APIs (runs in the browser's preview and on the server).
 */
import Papa from 'papaparse/papaparse.min.js'

/** One problem with a log (see `csv.ts`). */
export interface LimitIssue {
  row?: number
  message: string
}

/**
 * The limits of a log. A logger at 1 kHz writes 200 000 rows in 200 s, longer than any blow-down
 * of the lab's receiver; four columns (time, thrust, two pressures) plus a few extra fit in 64;
 * a row of 64 numbers is well under 4 KB.
 */
export const LOG_LIMITS = {
  /** Rows under the header row (blank rows count, as a spreadsheet counts them). */
  maxRows: 200_000,
  /** Characters in one line of the file (about 4 KB of text). */
  maxLineChars: 4096,
  /** Values in the header row, or in any row. */
  maxColumns: 64,
  /** Characters in one column name of the header. */
  maxHeaderChars: 200,
} as const

/** A message lists at most this many names or rows, then says how many more there are. */
export const MAX_LISTED_NAMES = 10

/** A whole number with thousands separators, as the roster import writes them ("200,000"). */
export function count(n: number): string {
  return n.toLocaleString('en-US')
}

/** Text cut to `max` characters (with "…"), for anything a file or a form supplied. */
export function clip(text: string, max: number = LOG_LIMITS.maxHeaderChars): string {
  return text.length > max ? `${text.slice(0, max - 1)}…` : text
}

/** A cell or name in double quotes, trimmed and cut to 40 characters. */
export function quote(cell: string): string {
  const t = cell.trim()
  return `"${t.length > 40 ? `${t.slice(0, 37)}…` : t}"`
}

/**
 * Items joined with ", ", at most {@link MAX_LISTED_NAMES} of them, then "… and N more".
 *
 * @example
 * listSome(['"a"', '"b"'])                       // '"a", "b"'
 * listSome(Array.from({ length: 22 }, String))   // '0, 1, 2, 3, 4, 5, 6, 7, 8, 9 … and 12 more'
 */
export function listSome(items: readonly string[], max = MAX_LISTED_NAMES): string {
  if (items.length <= max) return items.join(', ')
  return `${items.slice(0, max).join(', ')} … and ${count(items.length - max)} more`
}

/** Where the header line is, and how the file ends its lines. */
export interface LogLines {
  /** '\r' for a file from an old Mac export, otherwise '\n' (a '\r' before it is part of the line end). */
  newline: '\n' | '\r'
  /** The first line that is not blank (see {@link checkLines}): offsets into the text and its row number (1-based). */
  header: { start: number; end: number; row: number }
}

/** The line separator: '\r' only when the file uses lone carriage returns, as papaparse decides. */
function lineEnding(text: string): '\n' | '\r' {
  const sample = text.length > 65_536 ? text.slice(0, 65_536) : text
  let cr = 0
  let crlf = 0
  for (let i = sample.indexOf('\r'); i >= 0; i = sample.indexOf('\r', i + 1)) {
    cr++
    if (sample.charCodeAt(i + 1) === 10) crlf++
  }
  return cr > 0 && crlf * 2 < cr ? '\r' : '\n'
}

/** A line of nothing but spaces, tabs and commas: a row of empty cells, as parseLog skips them. */
function isBlankLine(text: string, start: number, end: number): boolean {
  for (let i = start; i < end; i++) {
    const c = text.charCodeAt(i)
    if (c !== 32 && c !== 9 && c !== 13 && c !== 44) return false
  }
  return true
}

/**
 * The first pass over a log's text: the length of every line and the number of lines, stopping at
 * the first one over a limit. Row numbers are the file's lines (header = row 1 when it is first).
 * The header is the first line that is not blank (nothing but spaces, tabs and commas).
 *
 * @param text - the file's text, not blank
 * @returns the line ending and the header line, or the limit passed with its row
 */
export function checkLines(text: string): { ok: true; lines: LogLines } | { ok: false; issue: LimitIssue } {
  const newline = lineEnding(text)
  const sep = newline === '\r' ? '\r' : '\n'
  let header: LogLines['header'] | undefined
  let row = 0
  let blank = 0
  let start = 0
  while (start < text.length) {
    let end = text.indexOf(sep, start)
    if (end < 0) end = text.length
    row++
    const length = end - start - (sep === '\n' && text.charCodeAt(end - 1) === 13 ? 1 : 0)
    if (length > LOG_LIMITS.maxLineChars) {
      return {
        ok: false,
        issue: {
          row,
          message: `Row ${row} is ${count(length)} characters long; a line of a log may have at most ${count(LOG_LIMITS.maxLineChars)} characters. Check that this is the logger's CSV file, with one sample per line.`,
        },
      }
    }
    // Every line counts, blank ones and those inside a quoted cell too: they are rows of the file
    // as a spreadsheet numbers them, and each costs the reader as much as a row of values.
    if (row > LOG_LIMITS.maxRows + 1) {
      const mostlyBlank = blank * 2 > row
      return {
        ok: false,
        issue: {
          message:
            `The file has more than ${count(LOG_LIMITS.maxRows + 1)} rows${mostlyBlank ? ', most of them blank' : ''}; a log may have a header row and at most ${count(LOG_LIMITS.maxRows)} rows under it (blank rows count). ` +
            (mostlyBlank
              ? 'Delete the blank rows and upload it again.'
              : 'Hand in the part of the run the assignment asks for, or log at a lower sample rate.'),
        },
      }
    }
    if (isBlankLine(text, start, start + length)) blank++
    else header ??= { start, end: start + length, row }
    start = end + 1
  }
  // A blank text is refused before this pass; a header is always found.
  return { ok: true, lines: { newline, header: header ?? { start: 0, end: 0, row: 1 } } }
}

/**
 * The header row against the column limits: at most {@link LOG_LIMITS.maxColumns} names, each at
 * most {@link LOG_LIMITS.maxHeaderChars} characters. The line is at most 4 KB here.
 */
export function checkHeader(line: string, row: number, delimiter: string): LimitIssue | undefined {
  const names = Papa.parse(line, { delimiter, header: false }).data[0] ?? []
  if (names.length > LOG_LIMITS.maxColumns) {
    return {
      row,
      message: `Row ${row}, the header, names ${count(names.length)} columns; a log may have at most ${LOG_LIMITS.maxColumns}. Keep the columns the log needs (time, thrust, pressures) and delete the others.`,
    }
  }
  const long = names.flatMap((n, i) => (n.trim().length > LOG_LIMITS.maxHeaderChars ? [i] : []))
  const first = long[0]
  if (first !== undefined) {
    const name = (names[first] as string).trim()
    const others =
      long.length > 1
        ? ` (${long.length - 1} more column name${long.length === 2 ? ' is' : 's are'} too long as well)`
        : ''
    return {
      row,
      message: `Row ${row}, the header: the name of column ${first + 1}, ${quote(name)}, is ${count(name.length)} characters long; a column name may have at most ${LOG_LIMITS.maxHeaderChars}${others}. Give the column a short name.`,
    }
  }
  return undefined
}

/** A spreadsheet formula's first character: = + - @ (a number with a sign is told apart later). */
function startsFormula(c: number): boolean {
  return c === 61 || c === 43 || c === 45 || c === 64
}

/** Counts line breaks in text[from, to) for the given line separator. */
function breaksIn(text: string, from: number, to: number, sep: string): number {
  let n = 0
  for (let i = text.indexOf(sep, from); i >= 0 && i < to; i = text.indexOf(sep, i + 1)) n++
  return n
}

/**
 * The rows under the header against the column limit, and the formula cells that hold quote marks.
 *
 * A formula written into a CSV without quoting, such as `=HYPERLINK("http://…","click")`, has a
 * quote mark right after one of its commas; a CSV reader takes that as the start of a quoted cell
 * and reads the rest of the file into it. Such cells are returned (start and end offsets, the
 * formula's parentheses and strings kept together) so the caller can quote them before the file
 * is read, and each is then refused once, at its own row, as a formula.
 *
 * @param text - the file's text
 * @param from - offset of the line after the header line
 * @param firstRow - that line's row number
 * @param delimiter - ',' or '\t'
 * @param newline - the line separator {@link checkLines} found
 */
export function scanRows(
  text: string,
  from: number,
  firstRow: number,
  delimiter: string,
  newline: '\n' | '\r',
): { issue?: LimitIssue; formulaCells: [number, number][] } {
  const tooWide = (row: number, values: number): LimitIssue => ({
    row,
    message: `Row ${row} has ${count(values)} values; a log may have at most ${LOG_LIMITS.maxColumns} columns.`,
  })
  const formulaCells: [number, number][] = []
  const n = text.length

  // Without quote marks (a logger's usual output) a line is a row, and only a line of at least
  // maxColumns characters can hold more than maxColumns values.
  if (text.indexOf('"', from) < 0) {
    let row = firstRow
    for (let start = from; start < n; row++) {
      let end = text.indexOf(newline, start)
      if (end < 0) end = n
      if (end - start >= LOG_LIMITS.maxColumns) {
        let values = 1
        for (let i = text.indexOf(delimiter, start); i >= 0 && i < end; i = text.indexOf(delimiter, i + 1)) values++
        if (values > LOG_LIMITS.maxColumns) return { issue: tooWide(row, values), formulaCells }
      }
      start = end + 1
    }
    return { formulaCells }
  }

  // With quote marks: read cells as a CSV reader does, counting the lines inside quoted cells.
  const nl = newline.charCodeAt(0)
  const d = delimiter.charCodeAt(0)
  let line = firstRow
  let rowStart = line
  let values = 1
  let i = from
  while (i < n) {
    let s = i
    while (s < n && (text.charCodeAt(s) === 32 || text.charCodeAt(s) === 9)) s++
    const c = text.charCodeAt(s)
    if (c === 34 && s === i) {
      // A quoted cell: up to the quote mark that is not doubled.
      i++
      for (;;) {
        const q = text.indexOf('"', i)
        line += breaksIn(text, i, q < 0 ? n : q, newline)
        if (q < 0) {
          i = n
          break
        }
        i = q + 1
        if (text.charCodeAt(i) !== 34) break
        i++
      }
    } else if (startsFormula(c)) {
      let k = s + 1
      let depth = 0
      let inString = false
      let quoted = false
      for (; k < n; k++) {
        const ch = text.charCodeAt(k)
        if (ch === 10 || ch === 13) break
        if (inString) {
          if (ch === 34) inString = false
        } else if (ch === 34) {
          inString = true
          quoted = true
        } else if (ch === 40) depth++
        else if (ch === 41) depth--
        else if (ch === d && depth <= 0) break
      }
      if (quoted) formulaCells.push([i, k])
      i = k
    }
    // The rest of the cell, unquoted: up to the next separator or line end.
    while (i < n) {
      const ch = text.charCodeAt(i)
      if (ch === d || ch === nl) break
      i++
    }
    if (i >= n) break
    if (text.charCodeAt(i) === d) {
      values++
      i++
      continue
    }
    if (values > LOG_LIMITS.maxColumns) return { issue: tooWide(rowStart, values), formulaCells }
    values = 1
    line++
    rowStart = line
    i++
  }
  if (values > LOG_LIMITS.maxColumns) return { issue: tooWide(rowStart, values), formulaCells }
  return { formulaCells }
}

/**
 * The text with each of `cells` written as a quoted CSV cell (quote marks doubled), so a CSV reader
 * takes a formula such as `=HYPERLINK("a","b")` as one cell. No line breaks are added or removed,
 * so row numbers stay those of the file.
 */
export function quoteCells(text: string, cells: readonly [number, number][]): string {
  const parts: string[] = []
  let at = 0
  for (const [start, end] of cells) {
    parts.push(text.slice(at, start), '"', text.slice(start, end).replaceAll('"', '""'), '"')
    at = end
  }
  parts.push(text.slice(at))
  return parts.join('')
}

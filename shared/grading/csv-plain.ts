/**
 * The plain reader: a log as loggers write it (no quote marks, one kind of line ending, every row
 * with as many values as the header has names, a number in every column used, time strictly
 * increasing) read straight from the text into SI columns. No cell is cut out as a string and no
 * row becomes an array: on a 50 000-row log that is most of the reading time and garbage that
 * papaparse's rows of strings cost.
 *
 * It never reports a problem. At the first thing it does not expect (any quote mark, a lone '\r',
 * a cell that is not a number, a row of the wrong width, a time that does not increase, too few
 * rows ...) it gives up, and the general reader in `csv.ts` (papaparse, then every check with its
 * message) reads the file from the start. What it accepts it reads exactly as the general reader
 * does: papaparse splits a file without quote marks at its line ending and then at the separator,
 * and a row counts as blank when every cell trims to nothing; the same `parseDecimal` rules and
 * SI conversion give the same numbers (tests/unit/grading/csv-plain.test.ts holds the two readers
 * to the same results).
 *
 * Pure: no DOM, no Node APIs.
 */
import { parseDecimalFast, parseDecimalSlow } from './decimal'

/** One column of the table, found in the file. */
export interface PlainColumn {
  /** The spec column's key. */
  key: string
  /** Its position in the file's rows. */
  index: number
  /** Value in the file's unit → SI. */
  toSI: (value: number) => number
  /** Temperatures below 0 K are refused. */
  temperature: boolean
}

/** How a plain file is laid out: its line ending and its header line. */
export interface PlainLayout {
  newline: '\n' | '\r\n'
  /** The first line that is not blank: offsets into the text. */
  header: { start: number; end: number }
  /** Offset of the line after the header (past the end of the text when there is none). */
  next: number
}

/**
 * A line of nothing but separators, spaces and tabs (every cell trims to nothing). A line the
 * general reader takes as blank for another reason (a no-break space, say) is not blank here, is
 * read as a row, and its cells are not numbers: the plain reader gives up.
 */
function blankLine(text: string, start: number, end: number, separator: number): boolean {
  for (let i = start; i < end; i++) {
    const c = text.charCodeAt(i)
    if (c !== separator && c !== 32 && c !== 9) return false
  }
  return true
}

/**
 * Whether the plain reader can take the file, and where its header line is: no quote mark
 * anywhere, and line ends that are all '\n' or all '\r\n' (papaparse then guesses the same line
 * ending: a file without '\r' splits at '\n', and one where every '\r' starts a '\r\n' and every
 * '\n' ends one splits at '\r\n').
 *
 * @param text - the file's text, without a byte-order mark
 * @param delimiter - ',' or '\t'
 * @returns the layout, or undefined for the general reader
 */
export function plainLayout(text: string, delimiter: string): PlainLayout | undefined {
  if (text.indexOf('"') >= 0) return undefined
  let newline: '\n' | '\r\n' = '\n'
  if (text.indexOf('\r') >= 0) {
    let cr = 0
    for (let i = text.indexOf('\r'); i >= 0; i = text.indexOf('\r', i + 1)) {
      if (text.charCodeAt(i + 1) !== 10) return undefined
      cr++
    }
    let lf = 0
    for (let i = text.indexOf('\n'); i >= 0; i = text.indexOf('\n', i + 1)) lf++
    if (lf !== cr) return undefined
    newline = '\r\n'
  }
  const separator = delimiter.charCodeAt(0)
  for (let start = 0; start <= text.length;) {
    let end = text.indexOf(newline, start)
    if (end < 0) end = text.length
    if (!blankLine(text, start, end, separator)) return { newline, header: { start, end }, next: end + newline.length }
    start = end + newline.length
  }
  return undefined
}

/**
 * The rows under the header, read into SI columns.
 *
 * @param text - the file's text
 * @param layout - from {@link plainLayout}
 * @param delimiter - ',' or '\t'
 * @param width - the number of names in the header
 * @param columns - the table's columns as found in the file, in the table's order
 * @param timeColumn - the position in `columns` of the time column (its values must strictly increase), or -1
 * @param minRows - the table's fewest data rows
 * @returns spec column key → values in SI and the number of data rows, or undefined for the general reader
 */
export function readPlainRows(
  text: string,
  layout: PlainLayout,
  delimiter: string,
  width: number,
  columns: readonly PlainColumn[],
  timeColumn: number,
  minRows: number,
): { columns: Record<string, number[]>; rowCount: number } | undefined {
  const n = text.length
  const { newline } = layout
  const step = newline.length
  const separator = delimiter.charCodeAt(0)
  // Position in the file's row → position in `columns`, −1 for a column the table does not use.
  const slot = new Int32Array(width).fill(-1)
  for (let j = columns.length - 1; j >= 0; j--) slot[(columns[j] as PlainColumn).index] = j
  // Sized once for every line left (no regrowth, less garbage on a 50 000-row log), cut to the
  // rows read at the end; every row fills its slot in every column.
  let lines = 1
  for (let i = text.indexOf('\n', layout.next); i >= 0; i = text.indexOf('\n', i + 1)) lines++
  const values: number[][] = columns.map(() => new Array<number>(lines))
  let previousTime = Number.NaN
  let rows = 0

  for (let start = layout.next; start <= n;) {
    let end = text.indexOf(newline, start)
    if (end < 0) end = n
    const next = end + step
    if (blankLine(text, start, end, separator)) {
      start = next
      continue
    }
    let cellStart = start
    for (let c = 0; c < width; c++) {
      let cellEnd = end
      if (c < width - 1) {
        cellEnd = text.indexOf(delimiter, cellStart)
        if (cellEnd < 0 || cellEnd > end) return undefined // fewer values than names
      } else {
        const extra = text.indexOf(delimiter, cellStart)
        if (extra >= 0 && extra < end) return undefined // more values than names
      }
      const j = slot[c] as number
      if (j >= 0) {
        let v = parseDecimalFast(text, cellStart, cellEnd)
        if (v === undefined) {
          v = parseDecimalSlow(text.slice(cellStart, cellEnd))
          if (Number.isNaN(v)) return undefined
        }
        const column = columns[j] as PlainColumn
        const si = column.toSI(v)
        if (!Number.isFinite(si) || (column.temperature && si < 0)) return undefined
        if (j === timeColumn) {
          if (!(si > previousTime) && !Number.isNaN(previousTime)) return undefined
          previousTime = si
        }
        ;(values[j] as number[])[rows] = si
      }
      cellStart = cellEnd + 1
    }
    rows++
    start = next
  }
  if (rows < minRows) return undefined
  const out: Record<string, number[]> = {}
  columns.forEach((column, j) => {
    const v = values[j] as number[]
    v.length = rows
    out[column.key] = v
  })
  return { columns: out, rowCount: rows }
}

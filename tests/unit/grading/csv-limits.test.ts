import { describe, expect, it } from 'vitest'
import { LOG_LIMITS, parseLog } from '../../../shared/grading/csv'
import type { ColumnMapping, LogIssue, LogParseResult } from '../../../shared/grading/csv'
import { listSome } from '../../../shared/grading/csv-limits'
import { TableSchema } from '../../../shared/modules/schema'

const table = TableSchema.parse({
  key: 'run',
  label: 'Run log',
  minRows: 5,
  columns: [
    { key: 't', label: 'Time', unit: 's', role: 'time' },
    { key: 'thrust', label: 'Thrust', unit: 'N', role: 'thrust' },
    { key: 'p_chamber', label: 'Chamber pressure', unit: 'kPa', pressure: 'gauge', role: 'chamber-pressure' },
  ],
})

const mapping: ColumnMapping = {
  t: { header: 't', unit: 's' },
  thrust: { header: 'thrust', unit: 'N' },
  p_chamber: { header: 'p_chamber', unit: 'kPa' },
}

const HEADER = 't,thrust,p_chamber'
/** n good rows: t = 0, 0.001, … s, thrust = row index N, chamber = row index kPa. */
const rows = (n: number) => Array.from({ length: n }, (_, i) => `${i / 1000},${i},${i}`)
const MB19 = 19 * 1024 * 1024
/** Whatever a file holds, what comes back about it stays this short. */
const SHORT = 2048

function errors(result: LogParseResult): LogIssue[] {
  if (result.ok) throw new Error('expected the log to be refused')
  return result.errors
}

/** The one problem of a refused log, checking that what is said about it is short. */
function only(result: LogParseResult): LogIssue {
  const list = errors(result)
  expect(list, JSON.stringify(list).slice(0, 4000)).toHaveLength(1)
  expect(JSON.stringify(list).length).toBeLessThan(SHORT)
  return list[0] as LogIssue
}

describe('a log is refused early when it passes a limit, and the message names the limit', () => {
  it('a header of one name followed by 19 MB of commas: the line is too long', () => {
    const text = `t${','.repeat(MB19)}\n${rows(6).join('\n')}\n`
    const issue = only(parseLog(text, table, mapping))
    expect(issue.row).toBe(1)
    expect(issue.message).toBe(
      "Row 1 is 19,922,945 characters long; a line of a log may have at most 4,096 characters. Check that this is the logger's CSV file, with one sample per line.",
    )
  })

  it('19 MB of blank lines after the rows: too many rows, most of them blank', () => {
    const text = `${[HEADER, ...rows(6)].join('\n')}\n${'\n'.repeat(MB19)}`
    const issue = only(parseLog(text, table, mapping))
    expect(issue.row).toBeUndefined()
    expect(issue.message).toBe(
      'The file has more than 200,001 rows, most of them blank; a log may have a header row and at most 200,000 rows under it (blank rows count). Delete the blank rows and upload it again.',
    )
  })

  it('19 MB of blank lines before the header, with Windows line endings, the same', () => {
    const text = `${'\r\n'.repeat(MB19 / 2)}${[HEADER, ...rows(6)].join('\r\n')}`
    expect(only(parseLog(text, table, mapping)).message).toMatch(
      /^The file has more than 200,001 rows, most of them blank;/,
    )
  })

  it('19 MB of rows of empty cells (",,") count as blank rows too', () => {
    const text = `${[HEADER, ...rows(6)].join('\n')}\n${',,\n'.repeat(MB19 / 3)}`
    expect(only(parseLog(text, table, mapping)).message).toMatch(
      /^The file has more than 200,001 rows, most of them blank;/,
    )
  })

  it('a line of 5 KB', () => {
    const lines = ['note,t,thrust,p_chamber', ...rows(6).map((r) => `a,${r}`)]
    lines[4] = `${'x'.repeat(5000)},${rows(4)[3]}`
    const issue = only(parseLog(lines.join('\n'), table, mapping))
    expect(issue.row).toBe(5)
    expect(issue.message).toMatch(
      /^Row 5 is 5,010 characters long; a line of a log may have at most 4,096 characters\./,
    )
  })

  it('a line of exactly 4,096 characters is read', () => {
    const lines = ['note,t,thrust,p_chamber', ...rows(6).map((r) => `a,${r}`)]
    const rest = `,${rows(4)[3]}`
    lines[4] = `${'x'.repeat(LOG_LIMITS.maxLineChars - rest.length)}${rest}`
    expect(lines[4]).toHaveLength(4096)
    expect(parseLog(`${lines.join('\r\n')}\r\n`, table, mapping).ok).toBe(true)
  })

  it('200,001 rows under the header', () => {
    const issue = only(parseLog([HEADER, ...rows(200_001)].join('\n'), table, mapping))
    expect(issue.message).toBe(
      'The file has more than 200,001 rows; a log may have a header row and at most 200,000 rows under it (blank rows count). Hand in the part of the run the assignment asks for, or log at a lower sample rate.',
    )
  })

  it('200,000 rows under the header are read, with a line break at the end', () => {
    const result = parseLog(`${[HEADER, ...rows(200_000)].join('\n')}\n`, table, mapping)
    expect(result.ok ? result.rowCount : errors(result)).toBe(200_000)
  })

  it('a header of 65 columns', () => {
    const header = [HEADER, ...Array.from({ length: 62 }, (_, i) => `extra${i + 1}`)].join(',')
    const issue = only(parseLog([header, ...rows(6).map((r) => `${r}${',0'.repeat(62)}`)].join('\n'), table, mapping))
    expect(issue.row).toBe(1)
    expect(issue.message).toBe(
      'Row 1, the header, names 65 columns; a log may have at most 64. Keep the columns the log needs (time, thrust, pressures) and delete the others.',
    )
  })

  it('a header of 64 columns is read', () => {
    const header = [HEADER, ...Array.from({ length: 61 }, (_, i) => `extra${i + 1}`)].join(',')
    expect(parseLog([header, ...rows(6).map((r) => `${r}${',0'.repeat(61)}`)].join('\n'), table, mapping).ok).toBe(true)
  })

  it('a column name of 201 characters, after blank lines (the row is the line of the header)', () => {
    const name = 'n'.repeat(201)
    const issue = only(
      parseLog(['', '', `${HEADER},${name}`, ...rows(6).map((r) => `${r},0`)].join('\n'), table, mapping),
    )
    expect(issue.row).toBe(3)
    expect(issue.message).toBe(
      `Row 3, the header: the name of column 4, "${'n'.repeat(37)}…", is 201 characters long; a column name may have at most 200. Give the column a short name.`,
    )
  })

  it('a column name of 200 characters is read', () => {
    expect(
      parseLog([`${HEADER},${'n'.repeat(200)}`, ...rows(6).map((r) => `${r},0`)].join('\n'), table, mapping).ok,
    ).toBe(true)
  })

  it('a row of 65 values under a header of 3, with and without quote marks in the file', () => {
    const lines = [HEADER, ...rows(6)]
    lines[3] = `${rows(3)[2]}${',0'.repeat(62)}`
    const plain = only(parseLog(lines.join('\n'), table, mapping))
    expect(plain).toEqual({ row: 4, message: 'Row 4 has 65 values; a log may have at most 64 columns.' })
    // A quoted cell spanning two lines before it: the row is still the line it starts on.
    const quoted = ['note,t,thrust,p_chamber', ...rows(6).map((r) => `a,${r}`)]
    quoted[1] = `"two\nlines",${rows(1)[0]}`
    quoted[4] = `b,${rows(4)[3]}${',0'.repeat(61)}`
    expect(only(parseLog(quoted.join('\n'), table, mapping))).toEqual({
      row: 6,
      message: 'Row 6 has 65 values; a log may have at most 64 columns.',
    })
  })

  it('19 MB of commas in rows of 4 KB: the first wide row is named', () => {
    const wide = `0${','.repeat(4000)}`
    const text = `${[HEADER, ...rows(6)].join('\n')}\n${`${wide}\n`.repeat(Math.ceil(MB19 / 4002))}`
    expect(only(parseLog(text, table, mapping))).toEqual({
      row: 8,
      message: 'Row 8 has 4,001 values; a log may have at most 64 columns.',
    })
  })

  it('reads a file with lone carriage returns (an old Mac export) by its lines', () => {
    const lines = [HEADER, ...rows(6)]
    lines[4] = '0.003,x,3'
    const issue = only(parseLog(lines.join('\r'), table, mapping))
    expect(issue).toEqual({ row: 5, column: 'thrust', message: 'Row 5, column "thrust": "x" is text, not a number.' })
  })
})

describe('messages list at most 10 names and say how many more', () => {
  it('listSome keeps ten and counts the rest', () => {
    expect(listSome(['"a"', '"b"'])).toBe('"a", "b"')
    expect(listSome(Array.from({ length: 22 }, (_, i) => String(i)))).toBe('0, 1, 2, 3, 4, 5, 6, 7, 8, 9 … and 12 more')
  })

  it('a missing column, in a file of 64 columns with long names', () => {
    const names = Array.from({ length: 62 }, (_, i) => `c${i}_${'x'.repeat(50)}`)
    const issue = only(
      parseLog(
        [
          ['t', 'thrust', ...names].join(','),
          ...rows(6).map((r) => `${r.split(',').slice(0, 2).join(',')}${',0'.repeat(62)}`),
        ].join('\n'),
        table,
        mapping,
      ),
    )
    expect(issue.column).toBe('p_chamber')
    expect(issue.message).toBe(
      `The file has no column "p_chamber" (chosen for Chamber pressure). Its columns are: "t", "thrust", ${names
        .slice(0, 8)
        .map((n) => `"${n.slice(0, 37)}…"`)
        .join(', ')} … and 54 more.`,
    )
  })

  it('a column name used 12 times', () => {
    const header = ['t', ...Array.from({ length: 12 }, () => 'thrust'), 'p_chamber'].join(',')
    const issue = only(parseLog([header, ...rows(6).map((r) => `${r}${',0'.repeat(11)}`)].join('\n'), table, mapping))
    expect(issue.message).toBe(
      'The file has 12 columns named "thrust" (columns 2, 3, 4, 5, 6, 7, 8, 9, 10, 11 … and 2 more); rename them so each name is used once.',
    )
  })

  it('a header from the form of 1 MB is cut in the message and in the column it names', () => {
    const huge = 'h'.repeat(1024 * 1024)
    const issue = only(
      parseLog([HEADER, ...rows(6)].join('\n'), table, { ...mapping, thrust: { header: huge, unit: 'N' } }),
    )
    expect(issue.column).toHaveLength(200)
    expect(issue.message).toMatch(
      /^The file has no column "h{37}…" \(chosen for Thrust\)\. Its columns are: "t", "thrust", "p_chamber"\.$/,
    )
  })
})

describe('spreadsheet formulas are named as such, once, at their own row', () => {
  it('a formula with quote marks and a comma in it, written without quoting', () => {
    const lines = [HEADER, ...rows(20)]
    lines[11] = '0.01,=HYPERLINK("http://x.example/a","click"),10'
    // A later problem is still found at its own row: the formula did not swallow the rest of the file.
    lines[14] = '0.013,abc,13'
    const list = errors(parseLog(lines.join('\n'), table, mapping))
    expect(list).toEqual([
      {
        row: 12,
        column: 'thrust',
        message:
          'Row 12, column "thrust": "=HYPERLINK("http://x.example/a","click")" is a spreadsheet formula, not a number (it is kept as text, never calculated); export the values, not the formulas.',
      },
      { row: 15, column: 'thrust', message: 'Row 15, column "thrust": "abc" is text, not a number.' },
    ])
  })

  it('a formula with a space before it and quote marks, and one starting with @', () => {
    const lines = [HEADER, ...rows(8)]
    lines[3] = '0.002, =F("a","b"),2'
    lines[6] = '0.005,@SUM(A1),5'
    const list = errors(parseLog(lines.join('\n'), table, mapping))
    expect(list.map((e) => [e.row, e.column])).toEqual([
      [4, 'thrust'],
      [7, 'thrust'],
    ])
    expect(list[1]?.message).toBe(
      'Row 7, column "thrust": "@SUM(A1)" is a spreadsheet formula, not a number (it is kept as text, never calculated); export the values, not the formulas.',
    )
  })

  it('a formula with quote marks in a column the log does not use is ignored, and the rows after it are read', () => {
    const lines = ['note,t,thrust,p_chamber', ...rows(8).map((r) => `ok,${r}`)]
    lines[3] = '=HYPERLINK("http://x.example/a","click"),0.002,2,2'
    const result = parseLog(lines.join('\n'), table, mapping)
    expect(result.ok ? result.columns.thrust : errors(result)).toEqual([0, 1, 2, 3, 4, 5, 6, 7])
  })

  it('a stray quote mark is reported once for its row', () => {
    const lines = [HEADER, ...rows(8)]
    lines[5] = '0.004,"4"x,4'
    const list = errors(parseLog(lines.join('\n'), table, mapping))
    expect(list.filter((e) => /quote mark/.test(e.message))).toEqual([
      {
        row: 6,
        message: 'Row 6: a quoted cell is not closed or has a stray quote mark (") in it; check the quote marks.',
      },
    ])
  })
})

describe('values that are not finite once converted to SI', () => {
  it('1e308 kPa is named by row and column', () => {
    const lines = [HEADER, ...rows(6)]
    lines[3] = '0.002,2,1e308'
    const issue = only(parseLog(lines.join('\n'), table, mapping))
    expect(issue).toEqual({
      row: 4,
      column: 'p_chamber',
      message:
        'Row 4, column "p_chamber": "1e308" is too large: it is not a finite number once converted to Pa; check the value and the column\'s unit.',
    })
  })

  it('1e308 lbf of thrust too, while 1e300 lbf converts', () => {
    const lines = [HEADER, ...rows(6)]
    lines[3] = '0.002,1e308,2'
    const lbf = { ...mapping, thrust: { header: 'thrust', unit: 'lbf' } }
    expect(only(parseLog(lines.join('\n'), table, lbf)).message).toMatch(
      /^Row 4, column "thrust": "1e308" is too large: it is not a finite number once converted to N;/,
    )
    lines[3] = '0.002,1e300,2'
    expect(parseLog(lines.join('\n'), table, lbf).ok).toBe(true)
  })
})

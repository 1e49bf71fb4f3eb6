import { describe, expect, it } from 'vitest'
import { MAX_LISTED_ISSUES, parseDecimal, parseLog, sniffBinary, suggestMapping } from '../../../shared/grading/csv'
import type { ColumnMapping, LogIssue, LogParseResult } from '../../../shared/grading/csv'
import { TableSchema } from '../../../shared/modules/schema'
import { expectClose } from '../../helpers/expect-close'
import { PSI } from './fixtures'

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
/** Six good rows: t = 0 … 0.5 s, thrust = 10 × t, chamber = 100 × t kPa. */
const GOOD_ROWS = ['0.0,0,0', '0.1,1,10', '0.2,2,20', '0.3,3,30', '0.4,4,40', '0.5,5,50']

function csv(...lines: string[]): string {
  return lines.join('\n')
}

function errors(result: LogParseResult): LogIssue[] {
  if (result.ok) throw new Error('expected the log to be refused')
  return result.errors
}

function only(result: LogParseResult): LogIssue {
  const list = errors(result)
  expect(list, JSON.stringify(list)).toHaveLength(1)
  return list[0] as LogIssue
}

/** The good log with line `line` (1-based, header = 1) replaced. */
function withLine(line: number, text: string): string {
  const lines = [HEADER, ...GOOD_ROWS]
  lines[line - 1] = text
  return lines.join('\n')
}

describe('parseLog: a good log', () => {
  const result = parseLog(csv(HEADER, ...GOOD_ROWS), table, mapping)

  it('gives every column in SI with the row count and headers', () => {
    expect(result.ok).toBe(true)
    if (!result.ok) return
    expect(result.rowCount).toBe(6)
    expect(result.headers).toEqual(['t', 'thrust', 'p_chamber'])
    expect(result.columns.t).toEqual([0, 0.1, 0.2, 0.3, 0.4, 0.5])
    expect(result.columns.thrust).toEqual([0, 1, 2, 3, 4, 5])
    // kPa → Pa; still gauge.
    expect(result.columns.p_chamber).toEqual([0, 10_000, 20_000, 30_000, 40_000, 50_000])
    expect(result.pressures).toEqual({ p_chamber: 'gauge' })
  })

  it('reads Windows line endings, a byte-order mark, blank lines, quoted cells, signs and exponents', () => {
    const text = `\ufeff${HEADER}\r\n"0",0,0\r\n\r\n0.1,+1,1e1\r\n0.2,2.0,"20"\r\n,,\r\n0.3,3,3.0E1\r\n0.4,4,40\r\n0.5,-5,50\r\n`
    const r = parseLog(text, table, mapping)
    expect(r.ok ? r.columns.thrust : errors(r)).toEqual([0, 1, 2, 3, 4, -5])
    expect(r.ok ? r.columns.p_chamber : []).toEqual([0, 10_000, 20_000, 30_000, 40_000, 50_000])
  })

  it('ignores columns of the file that are not mapped, and takes them in any order', () => {
    const r = parseLog(
      csv('note,p_chamber,thrust,t', ...GOOD_ROWS.map((row, i) => `x${i},${row.split(',').reverse().join(',')}`)),
      table,
      mapping,
    )
    expect(r.ok ? r.columns.t : errors(r)).toEqual([0, 0.1, 0.2, 0.3, 0.4, 0.5])
  })

  it('reads a tab-separated export too', () => {
    const r = parseLog(
      csv(HEADER.replaceAll(',', '\t'), ...GOOD_ROWS.map((row) => row.replaceAll(',', '\t'))),
      table,
      mapping,
    )
    expect(r.ok).toBe(true)
  })
})

describe('parseLog: units of the file', () => {
  it('converts a psi column for a kPa spec column with 1 psi = 6894.757293168 Pa (exact definition)', () => {
    const r = parseLog(csv(HEADER, ...GOOD_ROWS), table, {
      ...mapping,
      p_chamber: { header: 'p_chamber', unit: 'psi' },
    })
    if (!r.ok) throw new Error(JSON.stringify(r.errors))
    expectClose(r.columns.p_chamber?.[1] as number, 10 * 6894.757293168, 1e-12)
    expectClose(r.columns.p_chamber?.[5] as number, 50 * PSI, 1e-15)
  })

  it('converts milliseconds to seconds and pound-force to newtons', () => {
    const r = parseLog(csv('ms,lbf,p', '0,1,0', '100,2,1', '200,3,2', '300,4,3', '400,5,4'), table, {
      t: { header: 'ms', unit: 'ms' },
      thrust: { header: 'lbf', unit: 'lbf' },
      p_chamber: { header: 'p', unit: 'bar' },
    })
    if (!r.ok) throw new Error(JSON.stringify(r.errors))
    expect(r.columns.t).toEqual([0, 0.1, 0.2, 0.3, 0.4])
    expect(r.columns.thrust?.[0]).toBe(4.4482216152605)
    expect(r.columns.p_chamber?.[4]).toBe(400_000)
  })

  it('says how each pressure column was read: the spec by default, the mapping when it says otherwise', () => {
    const r = parseLog(csv(HEADER, ...GOOD_ROWS), table, {
      ...mapping,
      p_chamber: { header: 'p_chamber', unit: 'kPa', pressure: 'absolute' },
    })
    expect(r.ok ? r.pressures : {}).toEqual({ p_chamber: 'absolute' })
  })

  it('refuses a unit of the wrong kind, naming the column', () => {
    const issue = only(
      parseLog(csv(HEADER, ...GOOD_ROWS), table, { ...mapping, thrust: { header: 'thrust', unit: 'psi' } }),
    )
    expect(issue.column).toBe('thrust')
    expect(issue.message).toBe(
      'Column "thrust" (Thrust): psi measures a pressure, but this column holds a force; choose one of N, kN, kgf, gf, lbf.',
    )
  })

  it('refuses a unit it does not know', () => {
    const issue = only(
      parseLog(csv(HEADER, ...GOOD_ROWS), table, { ...mapping, t: { header: 't', unit: 'fortnight' } }),
    )
    expect(issue.message).toMatch(/"fortnight" is not a unit Isentrope knows; choose one of s, ms/)
  })
})

describe('parseLog: problems with the whole file', () => {
  it('an empty file', () => {
    expect(only(parseLog('', table, mapping)).message).toMatch(/^The file is empty/)
    expect(only(parseLog(' \n\r\n\n', table, mapping)).message).toMatch(/^The file is empty/)
  })

  it('no header row: the first row holds numbers', () => {
    const issue = only(parseLog(csv(...GOOD_ROWS), table, mapping))
    expect(issue.message).toMatch(/^Row 1 holds numbers, not column names: the file has no header row/)
    expect(issue.message).toContain('t, thrust, p_chamber')
  })

  it('a mapped column missing from the file, listing the columns it has', () => {
    const issue = only(parseLog(csv('t,thrust', '0,0'), table, mapping))
    expect(issue.column).toBe('p_chamber')
    expect(issue.message).toBe(
      'The file has no column "p_chamber" (chosen for Chamber pressure). Its columns are: "t", "thrust".',
    )
  })

  it('a spec column with no file column chosen', () => {
    const { p_chamber: _omitted, ...partial } = mapping
    expect(only(parseLog(csv(HEADER, ...GOOD_ROWS), table, partial)).message).toMatch(
      /No column of the file is chosen for Chamber pressure \(p_chamber\)/,
    )
  })

  it('two columns with the chosen name', () => {
    const issue = only(parseLog(csv('t,thrust,thrust,p_chamber', '0,0,0,0'), table, mapping))
    expect(issue.message).toMatch(/2 columns named "thrust" \(columns 2 and 3\)/)
  })

  it('a units row right under the header: say so and tell them to delete it', () => {
    const issue = only(parseLog(csv(HEADER, 's,N,kPa', ...GOOD_ROWS), table, mapping))
    expect(issue.row).toBe(2)
    expect(issue.message).toBe(
      'Row 2 holds units (s, N, kPa), not numbers. Delete that row and upload again; the units are chosen in the column mapping.',
    )
  })

  it('a units row in brackets is recognised too', () => {
    expect(only(parseLog(csv(HEADER, '[s],[N],(kPa)', ...GOOD_ROWS), table, mapping)).message).toMatch(
      /^Row 2 holds units/,
    )
  })

  it("semicolons between values and ',' as the decimal mark", () => {
    const text = csv('t;thrust;p_chamber', '0,0;0;0', '0,1;1,5;10,2', '0,2;2;20')
    expect(only(parseLog(text, table, mapping)).message).toBe(
      "This file uses ';' between values and ',' as the decimal mark; export it with ',' between values and '.' for decimals.",
    )
  })

  it("semicolons between values with '.' decimals", () => {
    const text = csv('t;thrust;p_chamber', '0.0;0;0', '0.1;1.5;10')
    expect(only(parseLog(text, table, mapping)).message).toBe(
      "This file uses ';' between values; export it with ',' between values and '.' for decimals.",
    )
  })

  it("',' as the decimal mark in a comma-separated file: most rows have too many values", () => {
    const text = csv(HEADER, '0,0,0', '0,1,1,5,10,2', '0,2,2,5,20,5', '0,3,3,5,30,5', '0,4,4,5,40,5', '0,5,5,5,50,5')
    const issue = only(parseLog(text, table, mapping))
    expect(issue.message).toBe(
      "Most rows have more values than the header has names (row 3: 6 values, header: 3). This usually means the file uses ',' as the decimal mark; export it with ',' between values and '.' for decimals.",
    )
  })

  it('fewer rows than the table needs', () => {
    expect(only(parseLog(csv(HEADER, ...GOOD_ROWS.slice(0, 3)), table, mapping)).message).toBe(
      'The log has 3 data rows; Run log needs at least 5.',
    )
  })
})

describe('parseLog: problems in a row, each naming the row and the column', () => {
  it('text in a number column', () => {
    const issue = only(parseLog(withLine(4, '0.2,abc,20'), table, mapping))
    expect(issue).toEqual({ row: 4, column: 'thrust', message: 'Row 4, column "thrust": "abc" is text, not a number.' })
  })

  it('a decimal comma in a quoted cell', () => {
    expect(only(parseLog(withLine(3, '0.1,"1,5",10'), table, mapping)).message).toBe(
      `Row 3, column "thrust": "1,5" uses ',' as the decimal mark; write 1.5.`,
    )
  })

  it('NaN, Infinity and an empty cell', () => {
    const text = csv(HEADER, '0.0,0,0', '0.1,NaN,10', '0.2,2,Infinity', '0.3,,30', '0.4,4,-inf', '0.5,1e999,50')
    const list = errors(parseLog(text, table, mapping))
    expect(list.map((e) => [e.row, e.column])).toEqual([
      [3, 'thrust'],
      [4, 'p_chamber'],
      [5, 'thrust'],
      [6, 'p_chamber'],
      [7, 'thrust'],
    ])
    expect(list[0]?.message).toBe(
      'Row 3, column "thrust": "NaN" is not a number; remove the rows where the logger had no reading.',
    )
    expect(list[1]?.message).toBe(
      'Row 4, column "p_chamber": "Infinity" is not a finite number; remove the rows where the logger had no reading.',
    )
    expect(list[2]?.message).toBe(
      'Row 5, column "thrust": the cell is empty; every row needs a number in each column used.',
    )
    expect(list[4]?.message).toMatch(/"1e999" is not a finite number/)
  })

  it('hexadecimal and other numbers JavaScript would read are refused', () => {
    expect(only(parseLog(withLine(3, '0.1,0x1A,10'), table, mapping)).message).toMatch(/"0x1A" is not a decimal number/)
    expect(parseDecimal('0x1A')).toBeNaN()
    expect(parseDecimal('  ')).toBeNaN()
    expect(parseDecimal('1_000')).toBeNaN()
    expect(parseDecimal(' -1.5e-3 ')).toBe(-0.0015)
  })

  it('reads decimals to the same double as the JavaScript engine, exponents and long digit strings included', () => {
    // The engine's Number() is an independent, correctly rounded decimal reader; the fast path must agree bit for bit.
    let seed = 12345
    const random = () => {
      seed = (seed * 1103515245 + 12345) % 2147483648
      return seed / 2147483648
    }
    const cells: string[] = [
      '0',
      '-0',
      '0.1',
      '0.3',
      '.5',
      '5.',
      '+7',
      '1e22',
      '1e23',
      '9007199254740993',
      '123456789012345',
      '1234567890123456',
      '1.7976931348623157e308',
      '4.9e-324',
      '0.000001',
      '1E-22',
      '1e-23',
      '  42.5\t',
    ]
    for (let k = 0; k < 5000; k++) {
      const intPart = String(Math.floor(random() * 10 ** Math.floor(random() * 9)))
      const frac =
        random() < 0.8 ? `.${String(Math.floor(random() * 10 ** Math.floor(1 + random() * 9))).padStart(3, '0')}` : ''
      const exp = random() < 0.2 ? `e${random() < 0.5 ? '-' : '+'}${Math.floor(random() * 30)}` : ''
      cells.push(`${random() < 0.3 ? '-' : ''}${intPart}${frac}${exp}`)
    }
    for (const cell of cells) expect(Object.is(parseDecimal(cell), Number(cell)), cell).toBe(true)
  })

  it('cells that start like spreadsheet formulas are kept as text and refused, never calculated', () => {
    const text = csv(
      HEADER,
      '0.0,0,0',
      '0.1,=1+2,10',
      '0.2,+SUM(A1:A3),20',
      '0.3,@cmd,30',
      `0.4,"-2+3",40`,
      '0.5,=HYPERLINK("x"),50',
    )
    const list = errors(parseLog(text, table, mapping))
    expect(list.map((e) => e.row)).toEqual([3, 4, 5, 6, 7])
    expect(list[0]?.message).toBe(
      'Row 3, column "thrust": "=1+2" is a spreadsheet formula, not a number (it is kept as text, never calculated); export the values, not the formulas.',
    )
    expect(list[3]?.message).toMatch(/"-2\+3" is a spreadsheet formula, not a number/)
  })

  it('a sign on a number is fine', () => {
    expect(
      parseLog(csv(HEADER, '0.0,-0.5,+0', '0.1,+1,10', '0.2,2,20', '0.3,3,30', '0.4,-4,40'), table, mapping).ok,
    ).toBe(true)
  })

  it('time not strictly increasing: a repeated and a decreasing time, by row', () => {
    const text = csv(HEADER, '0.0,0,0', '0.1,1,10', '0.1,1,10', '0.3,3,30', '0.25,4,40', '0.5,5,50')
    const list = errors(parseLog(text, table, mapping))
    expect(list).toEqual([
      {
        row: 4,
        column: 't',
        message:
          'Row 4, column "t": the time "0.1" does not increase from the row before ("0.1"); times must strictly increase.',
      },
      {
        row: 6,
        column: 't',
        message:
          'Row 6, column "t": the time "0.25" does not increase from the row before ("0.3"); times must strictly increase.',
      },
    ])
  })

  it('a row with too few or too many values', () => {
    const list = errors(
      parseLog(csv(HEADER, '0.0,0,0', '0.1,1', '0.2,2,20,7', '0.3,3,30', '0.4,4,40', '0.5,5,50'), table, mapping),
    )
    expect(list.map((e) => e.message)).toEqual([
      'Row 3 has 2 values, but the header names 3 columns.',
      'Row 4 has 4 values, but the header names 3 columns.',
    ])
  })

  it('counts rows as a spreadsheet does: blank lines and lines inside a quoted cell count', () => {
    const text = csv(
      'note,t,thrust,p_chamber',
      'a,0.0,0,0',
      '',
      'b,0.1,1,10',
      '"two',
      'lines",0.2,2,20',
      'c,0.3,x,30',
      'd,0.4,4,40',
    )
    const issue = only(parseLog(text, table, mapping))
    // Line 1 header, 2 a, 3 blank, 4 b, 5–6 the quoted note, 7 the bad row.
    expect(issue.row).toBe(7)
  })

  it(`lists at most ${MAX_LISTED_ISSUES} problems and counts all of them`, () => {
    const rows = Array.from({ length: 30 }, (_, i) => `${i * 0.1},bad,${i}`)
    const result = parseLog(csv(HEADER, ...rows), table, mapping)
    expect(result.ok).toBe(false)
    if (result.ok) return
    expect(result.errors).toHaveLength(20)
    expect(result.totalErrors).toBe(30)
    expect(result.errors[0]?.row).toBe(2)
    expect(result.errors[19]?.row).toBe(21)
  })
})

describe('suggestMapping', () => {
  it('matches keys and labels ignoring case and punctuation, reading units in brackets', () => {
    expect(suggestMapping(['Time [s]', 'THRUST (lbf)', 'Chamber pressure [psi]'], table)).toEqual({
      t: { header: 'Time [s]', unit: 's' },
      thrust: { header: 'THRUST (lbf)', unit: 'lbf' },
      p_chamber: { header: 'Chamber pressure [psi]', unit: 'psi', pressure: 'gauge' },
    })
  })

  it('knows usual names of each role, unit suffixes and gauge/absolute marks', () => {
    expect(suggestMapping(['time_ms', 'force_N', 'pc (psig)'], table)).toEqual({
      t: { header: 'time_ms', unit: 'ms' },
      thrust: { header: 'force_N', unit: 'N' },
      p_chamber: { header: 'pc (psig)', unit: 'psi', pressure: 'gauge' },
    })
    expect(suggestMapping(['t', 'F', 'p_chamber_kPa'], table).p_chamber).toEqual({
      header: 'p_chamber_kPa',
      unit: 'kPa',
      pressure: 'gauge',
    })
    expect(suggestMapping(['t', 'F', 'P0 [bar a]'], table).p_chamber).toEqual({
      header: 'P0 [bar a]',
      unit: 'bar',
      pressure: 'absolute',
    })
  })

  it("proposes the spec's unit when the header has none or one of the wrong kind, and leaves out what it cannot find", () => {
    expect(suggestMapping(['t', 'thrust [kPa]', 'note'], table)).toEqual({
      t: { header: 't', unit: 's' },
      thrust: { header: 'thrust [kPa]', unit: 'N' },
    })
  })

  it.each([
    ['thrust (kg)', 'kgf'],
    ['load [g]', 'gf'],
    ['thrust [kgf]', 'kgf'],
    ['Force (gf)', 'gf'],
    ['thrust_lbf', 'lbf'],
    ['thrust (lb)', 'lbf'],
    ['load cell [N]', 'N'],
    ['Thrust (KG)', 'kgf'],
    ['thrust (grams)', 'gf'],
  ])('a force column headed %s is suggested in %s, never newtons for a mass label', (header, unit) => {
    expect(suggestMapping(['t', header], table).thrust).toEqual({ header, unit })
  })

  it('a load cell logged in grams, mapped as suggested, gives newtons by 1 gf = 0.00980665 N (exact, from g0)', () => {
    const r = parseLog(
      csv('t,load [g],pc', '0,0,0', '0.1,1000,1', '0.2,2500,2'),
      { ...table, minRows: 2 },
      {
        ...suggestMapping(['t', 'load [g]', 'pc'], table),
        p_chamber: { header: 'pc', unit: 'kPa', pressure: 'gauge' },
      },
    )
    expect(r.ok).toBe(true)
    if (!r.ok) return
    // 1000 g-force = 1 kgf = 9.80665 N; 2500 gf = 24.516625 N (NIST SP 811: 1 kgf = 9.80665 N).
    const [zero, one, two] = r.columns.thrust as [number, number, number]
    expect(zero).toBe(0)
    expectClose(one, 9.80665, 1e-15)
    expectClose(two, 24.516625, 1e-15)
  })

  it('uses each header once, preferring the key over a usual name', () => {
    const m = suggestMapping(['pc', 'p_chamber', 't', 'thrust'], table)
    expect(m.p_chamber?.header).toBe('p_chamber')
  })

  it('a suggestion for a good file parses', () => {
    const headers = ['Time [s]', 'Thrust [N]', 'pc [kPa]']
    const r = parseLog(csv(headers.join(','), ...GOOD_ROWS), table, suggestMapping(headers, table))
    expect(r.ok).toBe(true)
  })
})

describe('sniffBinary', () => {
  const bytes = (...b: number[]) => new Uint8Array(b)

  it('recognises a PNG renamed .csv', () => {
    const s = sniffBinary(bytes(0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13))
    expect(s).toMatchObject({ binary: true, kind: 'a PNG image' })
    expect(s.binary && s.message).toMatch(/^This file is a PNG image, not a CSV text file/)
  })

  it('recognises PDF, ZIP (an .xlsx), old Office, gzip, JPEG and GIF signatures', () => {
    const kinds = [
      new TextEncoder().encode('%PDF-1.7\n'),
      bytes(0x50, 0x4b, 0x03, 0x04, 0x14, 0),
      bytes(0xd0, 0xcf, 0x11, 0xe0, 0xa1, 0xb1, 0x1a, 0xe1),
      bytes(0x1f, 0x8b, 8),
      bytes(0xff, 0xd8, 0xff, 0xe0),
      new TextEncoder().encode('GIF89a'),
    ].map((b) => {
      const s = sniffBinary(b)
      return s.binary ? s.kind : 'text'
    })
    expect(kinds).toEqual([
      'a PDF document',
      'a ZIP archive',
      'an Office 97–2003 file',
      'a gzip archive',
      'a JPEG image',
      'a GIF image',
    ])
  })

  it('treats NUL bytes and UTF-16 as not CSV text', () => {
    expect(sniffBinary(new TextEncoder().encode('t,thrust\n0,\u0000')).binary).toBe(true)
    expect(sniffBinary(bytes(0xff, 0xfe, 0x74, 0x00))).toMatchObject({ binary: true, kind: 'UTF-16 text' })
  })

  it('passes CSV text, with or without a UTF-8 byte-order mark, and an empty file', () => {
    expect(sniffBinary(new TextEncoder().encode(csv(HEADER, ...GOOD_ROWS)))).toEqual({ binary: false })
    expect(sniffBinary(new TextEncoder().encode('\ufeffTime [s],Thrust [N],°C\n0,1,20'))).toEqual({ binary: false })
    expect(sniffBinary(new Uint8Array(0))).toEqual({ binary: false })
  })
})

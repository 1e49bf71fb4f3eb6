/**
 * The plain reader (shared/grading/csv-plain.ts) against the general reader (papaparse and every
 * check): parseLog takes the plain way for a logger's usual file and must give exactly what
 * parseLogGeneral gives on every file, the plain reader's own and those it hands over.
 */
import { describe, expect, it } from 'vitest'
import { parseLog, parseLogGeneral } from '../../../shared/grading/csv'
import type { ColumnMapping } from '../../../shared/grading/csv'
import { plainLayout, readPlainRows } from '../../../shared/grading/csv-plain'
import { TableSchema } from '../../../shared/modules/schema'

const table = TableSchema.parse({
  key: 'run',
  label: 'Run log',
  minRows: 5,
  columns: [
    { key: 't', label: 'Time', unit: 's', role: 'time' },
    { key: 'thrust', label: 'Thrust', unit: 'N', role: 'thrust' },
    { key: 'p_chamber', label: 'Chamber pressure', unit: 'kPa', pressure: 'gauge', role: 'chamber-pressure' },
    { key: 'temp', label: 'Gas temperature', unit: 'degC' },
  ],
})

const mapping: ColumnMapping = {
  t: { header: 'time [s]', unit: 'ms' },
  thrust: { header: 'F', unit: 'lbf' },
  p_chamber: { header: 'pc', unit: 'psi' },
  temp: { header: 'T', unit: 'degC' },
}

/** A small seeded generator (mulberry32), so every run checks the same files. */
function seeded(seed: number): () => number {
  let a = seed >>> 0
  return () => {
    a = (a + 0x6d2b79f5) >>> 0
    let t = a
    t = Math.imul(t ^ (t >>> 15), t | 1)
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61)
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296
  }
}

/** A good log: header, then `rows` rows of time (ms), an unused column, thrust, pressure, temperature. */
function goodRows(rows: number, random: () => number): string[][] {
  const out: string[][] = []
  for (let i = 0; i < rows; i++) {
    out.push([
      (i * 0.4).toFixed(1),
      'x',
      (10 * random() - 1).toPrecision(1 + Math.floor(random() * 15)),
      (random() * 120).toExponential(Math.floor(random() * 6)),
      (20 + random()).toFixed(3),
    ])
  }
  return out
}

const HEADER = ['time [s]', 'note', 'F', 'pc', 'T']

function join(lines: string[][], separator = ',', newline = '\n'): string {
  return lines.map((cells) => cells.join(separator)).join(newline)
}

function expectSame(text: string): void {
  const plain = parseLog(text, table, mapping)
  const general = parseLogGeneral(text, table, mapping)
  expect(plain).toEqual(general)
}

describe('the plain reader gives what the general reader gives', () => {
  const random = seeded(7)

  it('reads a logger’s usual file the plain way, with the same columns (LF, CRLF, tabs, blank lines)', () => {
    const rows = goodRows(40, random)
    const files = [
      join([HEADER, ...rows]),
      `${join([HEADER, ...rows])}\n`,
      join([HEADER, ...rows], ',', '\r\n'),
      `${join([HEADER, ...rows], ',', '\r\n')}\r\n\r\n`,
      join([HEADER, ...rows], '\t'),
      `\n , \n${join([HEADER, ...rows.slice(0, 10)])}\n,,,,\n\n${join(rows.slice(10))}\n  \n`,
      join([HEADER, ...rows.map((r) => r.map((c) => ` ${c}\t`))]),
      join([
        HEADER,
        ...rows.map((r) => [
          r[0] as string,
          r[1] as string,
          `+${(r[2] as string).replace('-', '')}`,
          r[3] as string,
          r[4] as string,
        ]),
      ]),
      // 17 significant digits: the slow path of parseDecimal, in place.
      join([
        HEADER,
        ...rows.map((r, i) => [r[0] as string, 'x', (1 + i / 3).toPrecision(17), r[3] as string, r[4] as string]),
      ]),
    ]
    for (const text of files) {
      const delimiter = text.includes('\t') && !text.includes(',') ? '\t' : ','
      expect(plainLayout(text, delimiter), JSON.stringify(text.slice(0, 60))).toBeDefined()
      const result = parseLog(text, table, mapping)
      expect(result.ok, JSON.stringify(result).slice(0, 300)).toBe(true)
      expectSame(text)
    }
  })

  it('hands every file with something to say to the general reader, which says it', () => {
    const rows = goodRows(12, random)
    const good = join([HEADER, ...rows])
    const lines = good.split('\n')
    const replace = (line: number, text: string) => lines.map((l, i) => (i === line ? text : l)).join('\n')
    const files = [
      replace(3, '0.8,x,"1.5",2,20'), // a quote mark
      good.replace('\n', '\r'), // a lone carriage return
      good.replace('\n', '\r\n'), // line ends mixed
      replace(4, '1.2,x,1e400,3,20'), // not finite
      replace(4, '1.2,x,,3,20'), // empty cell
      replace(4, '1.2,x,1;5,3,20'), // text
      replace(4, '1.2,x,=1+2,3,20'), // a formula
      replace(4, '1.2,x,1,5,3,20'), // a value too many
      replace(4, '1.2,x,1,3'), // a value too few
      replace(4, '0.4,x,1,3,20'), // time does not increase
      replace(4, '1.2,x,1,3,-300'), // below absolute zero
      replace(1, 's,,lbf,psi,degC'), // a row of units
      replace(4, '\u00a0,\u00a0,\u00a0,\u00a0,\u00a0'), // blank to trim(), not to the plain reader
      replace(4, '1.2,x,0x1A,3,20'),
      join([HEADER, ...rows.slice(0, 4)]), // too few rows
      join([['1', '2', '3', '4', '5'], ...rows]), // no header row
      join([['time [s]', 'note', 'F', 'pc', 'T', 'F'], ...rows.map((r) => [...r, '1'])]), // a name twice
      join([['time [s]', 'note', 'F', 'T'], ...rows.map((r) => r.slice(0, 4))]), // a column missing
      `\u00a0\n${good}`, // a header line blank to trim() only
    ]
    for (const text of files) expectSame(text)
  })

  it('declines rows it cannot read without a message, so the general reader reads them', () => {
    const rows = goodRows(12, random)
    const columns = [
      { key: 't', index: 0, toSI: (v: number) => v / 1000, temperature: false },
      { key: 'thrust', index: 2, toSI: (v: number) => v, temperature: false },
      { key: 'temp', index: 4, toSI: (v: number) => v + 273.15, temperature: true },
    ]
    const read = (text: string) => {
      const layout = plainLayout(text, ',')
      if (!layout) throw new Error('expected a plain layout')
      return readPlainRows(text, layout, ',', HEADER.length, columns, 0, 5)
    }
    const good = join([HEADER, ...rows])
    expect(read(good)?.rowCount).toBe(12)
    expect(read(good)?.columns.temp).toEqual(rows.map((r) => Number(r[4]) + 273.15))
    const lines = good.split('\n')
    const replace = (line: number, text: string) => lines.map((l, i) => (i === line ? text : l)).join('\n')
    for (const bad of [
      '1.2,x,1e400,3,20',
      '1.2,x,,3,20',
      '1.2,x,1,5,3,20',
      '1.2,x,1,3',
      '0.4,x,1,3,20',
      '1.2,x,1,3,-300',
      '1.2,x,1 5,3,20',
    ]) {
      expect(read(replace(4, bad)), bad).toBeUndefined()
    }
    expect(read(join([HEADER, ...rows.slice(0, 4)]))).toBeUndefined()
  })

  it('agrees on 300 files with random faults', () => {
    const faults: ((cells: string[]) => string[])[] = [
      (c) => c.map((x, i) => (i === 2 ? `${x}e1` : x)),
      (c) => c.map((x, i) => (i === 3 ? ` ${x} ` : x)),
      (c) => c.map((x, i) => (i === 2 ? x.replace('.', ',') : x)),
      (c) => c.map((x, i) => (i === 2 ? `"${x}"` : x)),
      (c) => [...c, ''],
      (c) => c.slice(0, 4),
      (c) => c.map((x, i) => (i === 4 ? '-500' : x)),
      (c) => c.map((x, i) => (i === 0 ? '0' : x)),
      (c) => c.map((x, i) => (i === 1 ? '=SUM(A1)' : x)),
      (c) => c.map((x, i) => (i === 2 ? 'NaN' : x)),
      (c) => c.map((x, i) => (i === 2 ? '.5' : x)),
      (c) => c.map((x, i) => (i === 2 ? '5.' : x)),
      (c) => c.map((x, i) => (i === 2 ? '1e-30' : x)),
      (c) => c.map(() => ''),
      (c) => c.map((x, i) => (i === 1 ? '' : x)),
    ]
    for (let file = 0; file < 300; file++) {
      const rows = goodRows(5 + Math.floor(random() * 20), random)
      const faulty = rows.map((r) =>
        random() < 0.08 ? (faults[Math.floor(random() * faults.length)] as (c: string[]) => string[])(r) : r,
      )
      const newline = random() < 0.3 ? '\r\n' : '\n'
      const separator = random() < 0.2 ? '\t' : ','
      const text = join([HEADER, ...faulty], separator, newline) + (random() < 0.5 ? newline : '')
      expectSame(text)
    }
  })
})

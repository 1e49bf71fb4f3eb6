import { describe, expect, it } from 'vitest'
import { parseRosterCsv } from '../../shared/roster/import-csv'

const rowsOf = (text: string) => {
  const r = parseRosterCsv(text)
  if (!r.ok) throw new Error(r.problems.map((p) => p.message).join(' | '))
  return r.rows
}

describe('roster CSV reader', () => {
  it('numbers rows as a spreadsheet does: header row 1, blank lines counted', () => {
    const rows = rowsOf('\nemail,name\n\na@x.example,A\n\n\nb@x.example,B\n')
    expect(rows.map((r) => r.row)).toEqual([4, 7])
  })

  it('drops a byte-order mark, trims cells and lower-cases e-mail addresses', () => {
    const [r] = rowsOf('\uFEFFEmail , Name\n  Anneke.Rushmere@X.Example ,  Anneke   Rushmere \n')
    expect(r).toMatchObject({
      email: 'anneke.rushmere@x.example',
      displayName: 'Anneke Rushmere',
      role: 'student',
      section: null,
      group: null,
    })
  })

  it('reads tab-separated rows pasted from a spreadsheet, and quoted names with commas', () => {
    expect(rowsOf('email\tname\trole\nc@x.example\tC\tTA\n')[0]).toMatchObject({ role: 'ta' })
    expect(rowsOf('email,name\nd@x.example,"Rushmere, Anneke"\n')[0]).toMatchObject({ displayName: 'Rushmere, Anneke' })
  })

  it('refuses two columns that mean the same thing, naming both', () => {
    const r = parseRosterCsv('email,E-mail,name\na@x.example,a@x.example,A\n')
    expect(r.ok).toBe(false)
    if (!r.ok) expect(r.problems[0]!.message).toContain('"email" and "E-mail"')
  })

  it('refuses an unclosed quote', () => {
    const r = parseRosterCsv('email,name\na@x.example,"Anneke\n')
    expect(r.ok).toBe(false)
  })

  it('counts bytes, not characters, against the size limit', () => {
    // 100,000 three-byte characters: 100 k characters but about 293 KB.
    const r = parseRosterCsv(`email,name\na@x.example,${'€'.repeat(100_000)}\n`)
    expect(r.ok).toBe(false)
    if (!r.ok) expect(r.problems[0]!.message).toMatch(/^The file is 29\d KB; at most 256 KB/)
  })
})

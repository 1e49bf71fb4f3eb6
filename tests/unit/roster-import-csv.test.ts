import { describe, expect, it } from 'vitest'
import { parseRosterCsv } from '../../shared/roster/import-csv'
import { editDistance, matchName, nameKey } from '../../shared/roster/match-names'

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

/** Windows-1252 bytes of a string whose characters are all in Latin-1 (é = 0xE9, ü = 0xFC). */
const cp1252 = (s: string) => Uint8Array.from([...s].map((c) => c.charCodeAt(0)))
const utf8 = (s: string) => new TextEncoder().encode(s)

const read = (input: string | Uint8Array, locale?: string) => {
  const r = parseRosterCsv(input, { locale })
  if (!r.ok) throw new Error(r.problems.map((p) => p.message).join(' | '))
  return r
}

describe('roster files as registrars and spreadsheets save them', () => {
  it('reads a semicolon file with separate last- and first-name columns, joining given name first', () => {
    const r = read(utf8('Last name;First name;Student e-mail;Lab group\nOkafor;Mira;m.okafor@univ.example;a1\n'))
    expect(r.reading.delimiter).toBe(';')
    expect(r.reading.encoding).toBe('utf-8')
    expect(r.reading.columns).toEqual({
      email: ['Student e-mail'],
      name: ['First name', 'Last name'],
      group: ['Lab group'],
    })
    expect(r.reading.nameOrder?.order).toBe('given-first')
    expect(r.rows[0]).toMatchObject({ email: 'm.okafor@univ.example', displayName: 'Mira Okafor', group: 'a1' })
  })

  it('joins family name first when the header words are Japanese, or the file is declared Hungarian', () => {
    const ja = read('メール,姓,名\nk.tanaka@univ.example,田中,花子\n'.replace('メール', 'email'))
    expect(ja.rows[0]!.displayName).toBe('田中 花子')
    expect(ja.reading.nameOrder).toEqual({ order: 'family-first', because: 'the header says "姓"' })
    const hu = read('email,first name,last name\nb.nagy@univ.example,Bence,Nagy\n', 'hu-HU')
    expect(hu.rows[0]!.displayName).toBe('Nagy Bence')
    expect(hu.reading.columns.name).toEqual(['last name', 'first name'])
    // The same file declared English keeps the given name first.
    expect(read('email,first name,last name\nb.nagy@univ.example,Bence,Nagy\n', 'en').rows[0]!.displayName).toBe(
      'Bence Nagy',
    )
  })

  it('reads "Name" beside "Surname" as the given name', () => {
    const r = read('Email,Name,Surname\nl.rossi@univ.example,Lucia,Rossi\n')
    expect(r.rows[0]!.displayName).toBe('Lucia Rossi')
    expect(r.reading.columns.name).toEqual(['Name', 'Surname'])
  })

  it('reads a tab-separated file', () => {
    const r = read(
      utf8('Email Address\tFull Name\tSection\tTeam\nd.lindqvist@univ.example\tDag Lindqvist\tTue PM\tRig 3\n'),
    )
    expect(r.reading.delimiter).toBe('\t')
    expect(r.rows[0]).toMatchObject({ displayName: 'Dag Lindqvist', section: 'Tue PM', group: 'Rig 3' })
    expect(r.reading.columns).toMatchObject({ email: ['Email Address'], section: ['Section'], group: ['Team'] })
  })

  it('decodes a Windows-1252 file with é and ü, and says so', () => {
    const r = read(cp1252('email;surname;given name\nr.muller@univ.example;M\u00fcller;Ren\u00e9e\n'))
    expect(r.reading.encoding).toBe('windows-1252')
    expect(r.rows[0]!.displayName).toBe('Renée Müller')
  })

  it('decodes UTF-8 with a byte-order mark, and the first header is still read', () => {
    const bytes = new Uint8Array([0xef, 0xbb, 0xbf, ...utf8('email,name\nz.ozturk@univ.example,Zeynep Öztürk\n')])
    const r = read(bytes)
    expect(r.reading.encoding).toBe('utf-8-bom')
    expect(r.reading.columns.email).toEqual(['email'])
    expect(r.rows[0]!.displayName).toBe('Zeynep Öztürk')
  })

  it('keeps separators inside quoted cells, and skips blank lines while numbering rows as a spreadsheet does', () => {
    const r = read(
      utf8('email;name;section\n\n"a.diaz@univ.example";"Díaz; Ana";"Wed; AM"\n\n\n"b@univ.example";"Bo, ""Ben""";\n'),
    )
    expect(r.reading.delimiter).toBe(';')
    expect(r.rows.map((x) => [x.row, x.displayName, x.section])).toEqual([
      [3, 'Díaz; Ana', 'Wed; AM'],
      [6, 'Bo, "Ben"', null],
    ])
  })

  it('refuses a file with two e-mail columns, naming both', () => {
    const r = parseRosterCsv('Student e-mail,Email address,Name\na@univ.example,b@univ.example,A\n')
    expect(r.ok).toBe(false)
    if (!r.ok) expect(r.problems[0]!.message).toContain('"Student e-mail" and "Email address"')
  })

  it('refuses a first-name column without a last-name column, saying which part is missing', () => {
    const r = parseRosterCsv('email,first name\na@univ.example,Ana\n')
    expect(r.ok).toBe(false)
    if (!r.ok) expect(r.problems[0]!.message).toContain('"first name" but not the other part of the name')
  })

  it('refuses 2,001 rows and accepts 2,000', () => {
    const file = (n: number) =>
      ['email,name', ...Array.from({ length: n }, (_, i) => `p${i}@univ.example,P ${i}`)].join('\n')
    const r = parseRosterCsv(utf8(file(2001)))
    expect(r.ok).toBe(false)
    if (!r.ok) expect(r.problems[0]!.message).toContain('2,001 people; at most 2,000')
    expect(parseRosterCsv(utf8(file(2000))).ok).toBe(true)
  })
})

describe('matching section and group names to the course', () => {
  const groups = [{ name: 'Group A1' }, { name: 'Group A2' }, { name: 'Rig 3' }]
  it('"a1", " A1 " and "group a1" are the course\'s Group A1', () => {
    for (const n of ['a1', ' A1 ', 'group a1', 'Group  A1', 'GROUP A1'])
      expect(matchName('group', n, groups).same.map((g) => g.name)).toEqual(['Group A1'])
    expect(nameKey('section', 'Section 2')).toBe('2')
  })

  it('a name one or two edits from an existing one is close; another number or short code is not', () => {
    expect(matchName('group', 'A 1', groups).close.map((g) => g.name)).toEqual(['Group A1'])
    expect(matchName('group', 'Goup A1', groups).close.map((g) => g.name)).toEqual(['Group A1'])
    expect(matchName('group', 'Rig3', groups).close.map((g) => g.name)).toEqual(['Rig 3'])
    expect(matchName('group', 'A3', groups)).toEqual({ same: [], close: [] })
    expect(matchName('group', 'B1', groups)).toEqual({ same: [], close: [] })
    expect(matchName('section', 'Tue AM', [{ name: 'Tue PM' }])).toEqual({ same: [], close: [] })
    expect(matchName('section', 'Tues PM', [{ name: 'Tue PM' }]).close).toEqual([{ name: 'Tue PM' }])
  })

  it('counts edits as Levenshtein does', () => {
    expect(editDistance('kitten', 'sitting')).toBe(3)
    expect(editDistance('a1', 'a1')).toBe(0)
    expect(editDistance('', 'ab')).toBe(2)
  })
})

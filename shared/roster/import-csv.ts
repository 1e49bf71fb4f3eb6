/**
 * Reading a roster CSV (email, name or its two parts, role, section, group). The same function runs
 * in the browser (a quick check before the upload) and on the server, which never trusts the
 * browser's reading. Pure: no DOM, no Node APIs.
 *
 * The file comes as bytes (decoded here, see decode-bytes.ts) or as text typed on the page. The
 * separator (comma, semicolon or tab) is papaparse's guess. Rows are numbered as a spreadsheet
 * numbers them: the header is row 1, the next record row 2, and blank lines count. Cells are text
 * and are never evaluated.
 */
import Papa from 'papaparse/papaparse.min.js'
import { z } from 'zod'
import type {
  ImportRole,
  RosterEncoding,
  RosterFileProblem,
  RosterFileReading,
  RosterRowProblem,
} from '../schemas/roster-import'
import { singleLineProblem } from '../schemas/names'
import { ROSTER_IMPORT_MAX_BYTES, ROSTER_IMPORT_MAX_ROWS } from '../schemas/roster-import'
import { utf8ByteLength } from '../text'
import { decodeRosterBytes } from './decode-bytes'
import { nameKey } from './match-names'
import type { RosterField } from './roster-columns'
import { normaliseHeader, readHeader } from './roster-columns'

export type RosterColumn = RosterField

const ROLE_WORDS: Record<string, ImportRole> = {
  student: 'student',
  ta: 'ta',
  teachingassistant: 'ta',
}

const EmailSchema = z.string().email()

export const MAX_NAME_LENGTH = 120
export const MAX_SECTION_LENGTH = 60
export const MAX_GROUP_LENGTH = 60

export interface ParsedRosterRow {
  row: number
  /** Trimmed and lower-cased. */
  email: string
  displayName: string
  role: ImportRole
  /** False when the role cell was empty: a new person is a student, an enrolled one keeps their role. */
  roleGiven: boolean
  section: string | null
  group: string | null
  problems: RosterRowProblem[]
}

export type RosterParseResult =
  | { ok: true; rows: ParsedRosterRow[]; ignoredColumns: string[]; reading: RosterFileReading }
  | { ok: false; problems: RosterFileProblem[] }

export interface RosterParseOptions {
  /** The file's declared language (BCP 47), for the order of split name columns. */
  locale?: string
}

const normalise = normaliseHeader
const isBlank = (record: readonly string[]) => record.every((c) => c.trim() === '')
const shown = (s: string) => `"${s.length > 40 ? `${s.slice(0, 37)}…` : s}"`
const plural = (n: number, one: string, many = `${one}s`) => `${n.toLocaleString('en-US')} ${n === 1 ? one : many}`
const tooBig = (bytes: number): RosterParseResult => ({
  ok: false,
  problems: [
    {
      message: `The file is ${Math.ceil(bytes / 1024).toLocaleString('en-US')} KB; at most ${ROSTER_IMPORT_MAX_BYTES / 1024} KB can be imported at once. Split it into smaller files.`,
    },
  ],
})

/** Reads the file; whole-file problems refuse it, cell problems are kept on their rows. */
export function parseRosterCsv(input: string | Uint8Array, opts: RosterParseOptions = {}): RosterParseResult {
  let text: string
  let encoding: RosterEncoding
  if (typeof input === 'string') {
    const bytes = utf8ByteLength(input)
    if (bytes > ROSTER_IMPORT_MAX_BYTES) return tooBig(bytes)
    // A byte-order mark copied along with the text would otherwise stick to the first header.
    text = input.replace(/^\uFEFF/, '')
    encoding = 'text'
  } else {
    if (input.length > ROSTER_IMPORT_MAX_BYTES) return tooBig(input.length)
    ;({ text, encoding } = decodeRosterBytes(input))
  }
  // papaparse guesses the separator from the first lines; blank lines would blur its count of
  // cells per line, so the guess skips them, and the reading itself keeps them (row numbers).
  const guess = Papa.parse(text, { skipEmptyLines: 'greedy', preview: 10, delimitersToGuess: [',', ';', '\t'] })
  const delimiter = guess.meta.delimiter
  const parsed = Papa.parse(text, { skipEmptyLines: false, delimiter })
  const quoteError = parsed.errors.find((e) => e.type === 'Quotes')
  if (quoteError) {
    const where = quoteError.row !== undefined ? `Row ${quoteError.row + 1}` : 'A row'
    return {
      ok: false,
      problems: [{ message: `${where} has a quoted cell that is never closed (a " without its partner).` }],
    }
  }
  const records = parsed.data
  const headerIndex = records.findIndex((r) => !isBlank(r))
  if (headerIndex < 0)
    return {
      ok: false,
      problems: [{ message: 'The file is empty: it needs a header row (email, name, …) and one row per person.' }],
    }
  const header = readHeader(records[headerIndex] ?? [], opts.locale)
  const problems: RosterFileProblem[] = [...header.problems]

  const dataRows: { row: number; cells: string[] }[] = []
  for (let i = headerIndex + 1; i < records.length; i++) {
    const r = records[i] ?? []
    if (!isBlank(r)) dataRows.push({ row: i + 1, cells: r })
  }
  if (dataRows.length > ROSTER_IMPORT_MAX_ROWS) {
    problems.push({
      message: `The file lists ${plural(dataRows.length, 'person', 'people')}; at most ${ROSTER_IMPORT_MAX_ROWS.toLocaleString('en-US')} can be imported at once. Split it into smaller files.`,
    })
  }
  if (dataRows.length === 0 && problems.length === 0) {
    problems.push({ message: 'The file has a header row but nobody in it: add one row per person below the header.' })
  }
  if (problems.length > 0) return { ok: false, problems }

  const at = (cells: string[], i: number | undefined) => (i === undefined ? '' : (cells[i] ?? '').trim())
  const cell = (cells: string[], c: RosterColumn) =>
    c === 'name' && header.nameParts
      ? header.nameParts
          .map((i) => at(cells, i))
          .filter((part) => part !== '')
          .join(' ')
      : at(cells, header.at.get(c))
  const rows = dataRows.map(({ row, cells }) => readRow(row, cells, cell))
  markDuplicates(rows)
  markGroupSections(rows)
  return {
    ok: true,
    rows,
    ignoredColumns: header.ignoredColumns,
    reading: { encoding, delimiter, ...header.reading },
  }
}

function readRow(row: number, cells: string[], cell: (cells: string[], c: RosterColumn) => string): ParsedRosterRow {
  const problems: RosterRowProblem[] = []
  const email = cell(cells, 'email').toLowerCase()
  if (email === '') problems.push({ column: 'email', message: 'email: empty; every person needs an e-mail address.' })
  else if (email.length > 254 || !EmailSchema.safeParse(email).success) {
    problems.push({ column: 'email', message: `email: ${shown(email)} is not a valid e-mail address.` })
  }
  // Runs of white space (a line break inside a quoted cell, a tab) become one space; any other
  // control character is refused below.
  const displayName = cell(cells, 'name').replace(/\s+/g, ' ')
  const nameProblem = singleLineProblem(displayName)
  if (displayName === '') problems.push({ column: 'name', message: 'name: empty; every person needs a name.' })
  else if (displayName.length > MAX_NAME_LENGTH)
    problems.push({ column: 'name', message: `name: at most ${MAX_NAME_LENGTH} characters.` })
  else if (nameProblem)
    problems.push({
      column: 'name',
      message: `name: a display name is one line of plain text; this one contains ${nameProblem}.`,
    })
  const roleText = cell(cells, 'role')
  let role: ImportRole = 'student'
  if (roleText !== '') {
    const r = ROLE_WORDS[normalise(roleText)]
    if (r) role = r
    else if (normalise(roleText) === 'instructor') {
      problems.push({
        column: 'role',
        message: 'role: an import adds students and TAs only; instructors are not imported.',
      })
    } else
      problems.push({
        column: 'role',
        message: `role: ${shown(roleText)} is not a role here; write student or ta (empty means student).`,
      })
  }
  const section = cell(cells, 'section') || null
  if (section !== null && section.length > MAX_SECTION_LENGTH) {
    problems.push({
      column: 'section',
      message: `section: a section name has at most ${MAX_SECTION_LENGTH} characters.`,
    })
  }
  const sectionProblem = section === null ? null : singleLineProblem(section)
  if (sectionProblem)
    problems.push({
      column: 'section',
      message: `section: a section name is one line of plain text; this one contains ${sectionProblem}.`,
    })
  const group = cell(cells, 'group') || null
  if (group !== null && group.length > MAX_GROUP_LENGTH) {
    problems.push({ column: 'group', message: `group: a lab-group name has at most ${MAX_GROUP_LENGTH} characters.` })
  }
  const groupProblem = group === null ? null : singleLineProblem(group)
  if (groupProblem)
    problems.push({
      column: 'group',
      message: `group: a lab-group name is one line of plain text; this one contains ${groupProblem}.`,
    })
  if (group !== null && role === 'ta') {
    problems.push({
      column: 'group',
      message: 'group: teaching assistants are not put in lab groups; leave the cell empty.',
    })
  }
  return { row, email, displayName, role, roleGiven: roleText !== '', section, group, problems }
}

/** The same e-mail twice: both rows are refused, each naming the other. */
function markDuplicates(rows: ParsedRosterRow[]): void {
  const byEmail = new Map<string, ParsedRosterRow[]>()
  for (const r of rows) {
    if (r.email === '') continue
    const list = byEmail.get(r.email) ?? []
    list.push(r)
    byEmail.set(r.email, list)
  }
  for (const [email, list] of byEmail) {
    if (list.length < 2) continue
    for (const r of list) {
      const others = list.filter((o) => o !== r).map((o) => o.row)
      r.problems.push({
        column: 'email',
        message: `email: ${email} also appears in row${others.length === 1 ? '' : 's'} ${others.join(', ')}; list each person once.`,
      })
    }
  }
}

/** A lab group belongs to one section: rows naming the same group with different sections are refused. */
function markGroupSections(rows: ParsedRosterRow[]): void {
  const first = new Map<string, ParsedRosterRow>()
  for (const r of rows) {
    if (r.group === null || r.section === null) continue
    const key = nameKey('group', r.group)
    const f = first.get(key)
    if (!f) first.set(key, r)
    else if (nameKey('section', f.section!) !== nameKey('section', r.section)) {
      r.problems.push({
        column: 'group',
        message: `group: lab group ${shown(r.group)} is in section ${shown(f.section!)} in row ${f.row}, but in section ${shown(r.section)} here.`,
      })
    }
  }
}

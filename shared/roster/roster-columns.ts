/**
 * Which header cell of a roster file is which field. Registrars and spreadsheets name the columns
 * in many ways ("Student E-mail", "Surname", "Lab group"), and split the name into given and
 * family parts; the header words of languages that write the family name first (Japanese,
 * Chinese, Korean, Hungarian, Vietnamese) also say in which order the parts are joined.
 */
import type { RosterFileProblem, RosterFileReading } from '../schemas/roster-import'
import { FAMILY_NAME_FIRST_LANGUAGES } from '../schemas/roster-import'

export type RosterField = 'email' | 'name' | 'role' | 'section' | 'group'
/** What a header cell can be: a field, or one part of a name split over two columns. */
export type HeaderColumn = RosterField | 'given' | 'family'

/** Header text (lower-cased, letters and digits only) → column. */
const ALIASES: Record<string, HeaderColumn> = {
  email: 'email',
  emailaddress: 'email',
  mail: 'email',
  mailaddress: 'email',
  studentemail: 'email',
  studentemailaddress: 'email',
  studentmail: 'email',
  universityemail: 'email',
  schoolemail: 'email',
  institutionalemail: 'email',
  preferredemail: 'email',
  name: 'name',
  displayname: 'name',
  fullname: 'name',
  studentname: 'name',
  studentfullname: 'name',
  firstname: 'given',
  givenname: 'given',
  givennames: 'given',
  forename: 'given',
  forenames: 'given',
  studentfirstname: 'given',
  lastname: 'family',
  familyname: 'family',
  surname: 'family',
  surnames: 'family',
  studentlastname: 'family',
  studentsurname: 'family',
  role: 'role',
  courserole: 'role',
  section: 'section',
  sectionname: 'section',
  sectioncode: 'section',
  sectionnumber: 'section',
  classsection: 'section',
  labsection: 'section',
  group: 'group',
  groupname: 'group',
  labgroup: 'group',
  labgroupname: 'group',
  team: 'group',
  teamname: 'group',
  labteam: 'group',
}

/** Name headers in languages that write the family name first. */
const FAMILY_FIRST_WORDS: Record<string, HeaderColumn> = {
  // Japanese and Chinese
  姓: 'family',
  名: 'given',
  氏名: 'name',
  姓名: 'name',
  // Korean
  성: 'family',
  이름: 'name',
  // Hungarian
  vezetéknév: 'family',
  keresztnév: 'given',
  utónév: 'given',
  // Vietnamese
  họ: 'family',
  tên: 'given',
  họtên: 'name',
  họvàtên: 'name',
}

export const normaliseHeader = (header: string) =>
  header
    .normalize('NFKC')
    .toLowerCase()
    .replace(/[^\p{L}\p{N}]/gu, '')

const shown = (s: string) => `"${s.length > 40 ? `${s.slice(0, 37)}…` : s}"`

export interface HeaderReading {
  /** Cell index of each field; the name may come from two cells instead (`nameParts`). */
  at: Map<RosterField, number>
  /** Cell indices of the name's parts in joining order, when the name is split over two columns. */
  nameParts: number[] | null
  reading: Omit<RosterFileReading, 'encoding' | 'delimiter'>
  ignoredColumns: string[]
  problems: RosterFileProblem[]
}

const familyFirstLocale = (locale: string | undefined) =>
  locale !== undefined &&
  (FAMILY_NAME_FIRST_LANGUAGES as readonly string[]).includes(locale.split('-')[0]!.toLowerCase())

/** Reads the header row: which cell is which field, or why the file cannot be read. */
export function readHeader(header: readonly string[], locale?: string): HeaderReading {
  const found = new Map<HeaderColumn, number>()
  const ignoredColumns: string[] = []
  const problems: RosterFileProblem[] = []
  let familyFirstWord: string | null = null
  header.forEach((cell, i) => {
    const h = cell.trim()
    const key = normaliseHeader(h)
    const localWord = FAMILY_FIRST_WORDS[key]
    const column = ALIASES[key] ?? localWord
    if (!column) {
      if (h !== '') ignoredColumns.push(h)
      return
    }
    const first = found.get(column)
    if (first !== undefined) {
      const what = column === 'given' ? 'given name' : column === 'family' ? 'family name' : column
      problems.push({
        message: `Two columns are both read as "${what}": ${shown((header[first] ?? '').trim())} and ${shown(h)}. Keep one of them.`,
        columns: [column === 'given' || column === 'family' ? 'name' : column],
      })
      return
    }
    if (localWord && (column === 'given' || column === 'family')) familyFirstWord ??= h
    found.set(column, i)
  })

  // "Name" beside "Surname" (and no given-name column) is the given name, as in forms that ask
  // for "Name" and "Surname".
  const nameKey = found.has('name') ? normaliseHeader(header[found.get('name')!] ?? '') : ''
  if ((nameKey === 'name' || nameKey === '이름') && found.has('family') && !found.has('given')) {
    found.set('given', found.get('name')!)
    found.delete('name')
  }
  const at = new Map<RosterField, number>()
  for (const f of ['email', 'name', 'role', 'section', 'group'] as const) {
    const i = found.get(f)
    if (i !== undefined) at.set(f, i)
  }
  const given = found.get('given')
  const family = found.get('family')
  const cellAt = (i: number) => (header[i] ?? '').trim()
  let nameParts: number[] | null = null
  let nameOrder: RosterFileReading['nameOrder'] = null
  if (at.has('name')) {
    // A full-name column is read as it is; name parts beside it are not needed.
    for (const i of [given, family]) if (i !== undefined) ignoredColumns.push(cellAt(i))
  } else if (given !== undefined && family !== undefined) {
    const declared = locale !== undefined
    const familyFirst = declared ? familyFirstLocale(locale) : familyFirstWord !== null
    nameParts = familyFirst ? [family, given] : [given, family]
    nameOrder = {
      order: familyFirst ? 'family-first' : 'given-first',
      because: declared
        ? `the file is declared as "${locale}"`
        : familyFirstWord !== null
          ? `the header says ${shown(familyFirstWord)}`
          : 'the header words are English',
    }
  }

  const missing: string[] = []
  if (!at.has('email')) missing.push('email')
  if (!at.has('name') && nameParts === null) missing.push('name')
  if (missing.length > 0) {
    const half = !at.has('name') && (given !== undefined) !== (family !== undefined)
    problems.push({
      message:
        `The header row lacks the required column${missing.length === 1 ? '' : 's'} ${missing.join(' and ')}. ` +
        (half
          ? `It has ${shown(cellAt((given ?? family)!))} but not the other part of the name: add a ${given !== undefined ? 'last-name' : 'first-name'} column, or one name column.`
          : 'The first row must name the columns: email, and name (or first name and last name), and optionally role, section, group.'),
      columns: missing,
    })
  }

  const columns: RosterFileReading['columns'] = {}
  for (const [f, i] of at) columns[f] = [cellAt(i)]
  if (nameParts) columns.name = nameParts.map(cellAt)
  return { at, nameParts, reading: { columns, nameOrder }, ignoredColumns, problems }
}

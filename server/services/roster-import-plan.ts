import type { ParsedRosterRow } from '../../shared/roster/import-csv'
import { parseRosterCsv } from '../../shared/roster/import-csv'
import type { NameKind } from '../../shared/roster/match-names'
import { nameKey, nameMatcher } from '../../shared/roster/match-names'
import type { CourseRole } from '../../shared/schemas/auth'
import type {
  RosterImportCounts,
  RosterImportPreview,
  RosterImportRow,
  RosterRowProblem,
  RosterSkip,
} from '../../shared/schemas/roster-import'
import type { Executor } from '../db/client'
import { AppError } from '../errors'
import type { CourseGroup, CourseSection, KnownPerson } from '../repositories/roster-import'
import { findPeopleByEmail, listCourseGroups, listCourseSections } from '../repositories/roster-import'

/**
 * The classification a roster import runs before writing anything: which rows are new people,
 * which change an enrolment, which move someone to another section or lab group, which are
 * refused. The preview shows it; the confirm runs it again inside its transaction.
 *
 * Section and group names in the file are matched to the course's by their key (see
 * shared/roster/match-names.ts): "a1" is the course's "Group A1". A name one or two edits away
 * from an existing one is refused on its row with a suggestion, rather than making a new group.
 */

/** What the request carries: the file (bytes) or typed text, its declared language, and unticked moves. */
export interface RosterInput {
  data: string | Uint8Array
  locale?: string
  skip?: RosterSkip[]
}

export interface PlannedRow {
  view: RosterImportRow
  parsed: ParsedRosterRow
  /** The role to give: the file's, or for an empty cell the current one (new people: student). */
  role: 'student' | 'ta'
  person: KnownPerson | null
  /** Section to set (the lower-cased name it has or will have), or null to leave as is. */
  sectionKey: string | null
  groupKey: string | null
  /** An unticked move: nothing is written for this row. */
  skipped: boolean
}

export interface Plan {
  preview: RosterImportPreview
  rows: PlannedRow[]
  /** Lower-cased name → the spelling the file used first. */
  newSections: Map<string, string>
  newGroups: Map<string, { name: string; sectionKey: string | null }>
}

const ROLE_WORDS: Record<CourseRole, string> = {
  instructor: 'instructor',
  ta: 'teaching assistant',
  student: 'student',
}
const q = (s: string) => `"${s}"`
const MAX_NEW_NAMES_COMPARED = 300
const KIND_WORDS: Record<NameKind, string> = { section: 'section', group: 'lab group' }

/** "Group A1" as it is; "G1" as "lab group G1"; "Tue PM" as "section Tue PM". */
function named(kind: NameKind, name: string): string {
  return nameKey(kind, name) !== name.trim().toLowerCase().replace(/\s+/g, ' ') ? name : `${KIND_WORDS[kind]} ${name}`
}

function refuseFile(problems: { message: string; columns?: string[] }[]): AppError {
  const first = problems[0]?.message ?? 'The file cannot be read.'
  return new AppError(
    'roster_file_refused',
    problems.length > 1 ? `${first} (and ${problems.length - 1} more problem${problems.length > 2 ? 's' : ''})` : first,
    422,
    { problems },
  )
}

type Resolved = { key: string | null; problem: RosterRowProblem | null }

/**
 * Resolves the file's section or group names to keys: an existing entry's lower-cased name, or
 * for a name the course lacks, the lower-cased spelling the file first used for that name's key.
 */
function resolver<T extends { name: string }>(kind: NameKind, existing: readonly T[], fileNames: (string | null)[]) {
  // Per key the file uses: the spelling it first used, and on how many rows.
  const inFile = new Map<string, { name: string; rows: number; order: number }>()
  for (const n of fileNames) {
    if (n === null) continue
    const k = nameKey(kind, n)
    const seen = inFile.get(k)
    if (seen) seen.rows++
    else inFile.set(k, { name: n, rows: 1, order: inFile.size })
  }
  const existingKeys = new Set(existing.map((e) => nameKey(kind, e.name)))
  const newInFile = [...inFile.entries()].filter(([k]) => !existingKeys.has(k)).map(([, v]) => v)
  // Comparing every new name with every other grows with the square of their number; a class
  // list names a few dozen groups, so past this many the check within the file is left out.
  const compareWithinFile = newInFile.length <= MAX_NEW_NAMES_COMPARED
  const matchExisting = nameMatcher(kind, existing)
  const matchNewInFile = nameMatcher(kind, newInFile)
  const cache = new Map<string, Resolved & { spelling: string }>()
  return (raw: string): Resolved & { spelling: string } => {
    const hit = cache.get(raw)
    if (hit) return hit
    const m = matchExisting(raw)
    const column = kind
    let out: Resolved & { spelling: string }
    if (m.same.length === 1) out = { key: m.same[0]!.name.toLowerCase(), spelling: m.same[0]!.name, problem: null }
    else if (m.same.length > 1) {
      out = {
        key: null,
        spelling: raw,
        problem: {
          column,
          message: `${column}: ${q(raw)} could be ${m.same.map((e) => q(e.name)).join(' or ')}; write the ${KIND_WORDS[kind]}'s name exactly.`,
        },
      }
    } else if (m.close.length > 0) {
      out = {
        key: null,
        spelling: raw,
        problem: {
          column,
          message: `${column}: this course has no ${KIND_WORDS[kind]} ${q(raw)}; did you mean ${m.close
            .slice(0, 3)
            .map((e) => e.name)
            .join(' or ')}? Correct the name, or add the ${KIND_WORDS[kind]} on the course page first.`,
        },
      }
    } else {
      const own = inFile.get(nameKey(kind, raw)) ?? { name: raw, rows: 1, order: 0 }
      // Two new names a slip apart ("Rig 3", "Rig3"): the one on fewer rows (or later) is the slip.
      const slipOf = compareWithinFile
        ? matchNewInFile(raw, (v) => v.rows > own.rows || (v.rows === own.rows && v.order < own.order)).close[0]
        : undefined
      out = slipOf
        ? {
            key: null,
            spelling: raw,
            problem: {
              column,
              message: `${column}: ${q(raw)} is close to ${q(slipOf.name)} elsewhere in this file; did you mean ${slipOf.name}? Write one name for one ${KIND_WORDS[kind]}.`,
            },
          }
        : { key: own.name.toLowerCase(), spelling: own.name, problem: null }
    }
    cache.set(raw, out)
    return out
  }
}

export async function planRosterImport(
  db: Executor,
  courseId: number,
  input: RosterInput,
  now: Date,
  invitationTtlHours: number,
): Promise<Plan> {
  const parsed = parseRosterCsv(input.data, { locale: input.locale })
  if (!parsed.ok) throw refuseFile(parsed.problems)

  const [sections, groups, people] = await Promise.all([
    listCourseSections(db, courseId),
    listCourseGroups(db, courseId),
    findPeopleByEmail(db, courseId, [...new Set(parsed.rows.filter((r) => r.email !== '').map((r) => r.email))], now),
  ])
  // Stored names compare as MariaDB's unique indexes do: without regard to case.
  const sectionByKey = new Map<string, CourseSection>(sections.map((s) => [s.name.toLowerCase(), s]))
  const sectionById = new Map<number, CourseSection>(sections.map((s) => [s.id, s]))
  const groupByKey = new Map<string, CourseGroup>(groups.map((g) => [g.name.toLowerCase(), g]))
  const groupById = new Map<number, CourseGroup>(groups.map((g) => [g.id, g]))
  const personByEmail = new Map(people.map((p) => [p.email.toLowerCase(), p]))
  const resolveSection = resolver(
    'section',
    sections,
    parsed.rows.map((r) => r.section),
  )
  const resolveGroup = resolver(
    'group',
    groups,
    parsed.rows.map((r) => r.group),
  )

  const newSections = new Map<string, string>()
  const newGroups = new Map<string, { name: string; sectionKey: string | null }>()
  // New groups take the section of the first row that names both.
  for (const r of parsed.rows) {
    if (r.group === null) continue
    const g = resolveGroup(r.group)
    if (g.key === null || groupByKey.has(g.key)) continue
    const sectionKey = r.section === null ? null : resolveSection(r.section).key
    const known = newGroups.get(g.key)
    if (!known) newGroups.set(g.key, { name: g.spelling, sectionKey })
    else if (known.sectionKey === null && sectionKey !== null) known.sectionKey = sectionKey
  }

  const sectionName = (key: string) => sectionByKey.get(key)?.name ?? newSections.get(key) ?? key
  const groupName = (key: string) => groupByKey.get(key)?.name ?? newGroups.get(key)?.name ?? key
  const rows: PlannedRow[] = parsed.rows.map((r) => {
    const problems: RosterRowProblem[] = [...r.problems]
    const s = r.section === null ? null : resolveSection(r.section)
    const g = r.group === null ? null : resolveGroup(r.group)
    if (s?.problem) problems.push(s.problem)
    if (g?.problem) problems.push(g.problem)
    let sectionKey = s?.key ?? null
    const groupKey = g?.key ?? null
    if (groupKey !== null) {
      const existing = groupByKey.get(groupKey)
      const groupSectionKey = existing
        ? existing.sectionId !== null
          ? (sectionById.get(existing.sectionId)?.name.toLowerCase() ?? null)
          : null
        : (newGroups.get(groupKey)?.sectionKey ?? null)
      if (existing && sectionKey !== null && groupSectionKey !== null && groupSectionKey !== sectionKey) {
        problems.push({
          column: 'group',
          message: `group: lab group ${q(existing.name)} belongs to section ${q(sectionById.get(existing.sectionId!)?.name ?? '')}, but this row says section ${q(r.section!)}.`,
        })
      }
      // A group implies its section when the row leaves the section empty.
      if (sectionKey === null && s === null) sectionKey = groupSectionKey
    }
    if (sectionKey !== null && !sectionByKey.has(sectionKey) && !newSections.has(sectionKey)) {
      newSections.set(sectionKey, s?.spelling ?? sectionKey)
    }
    const person = personByEmail.get(r.email) ?? null
    const current = person?.enrollment?.role ?? null
    if (current === 'instructor') {
      problems.push({
        column: 'role',
        message: 'role: this person teaches this course; an import does not change instructors.',
      })
    }
    const role = r.roleGiven || current === null || current === 'instructor' ? r.role : current
    if (role === 'ta' && !r.roleGiven && groupKey !== null) {
      problems.push({
        column: 'group',
        message: 'group: this person is a teaching assistant here, and teaching assistants are not put in lab groups.',
      })
    }
    const view: RosterImportRow = {
      row: r.row,
      email: r.email,
      displayName: r.displayName,
      role,
      section: sectionKey === null ? (r.section ?? null) : sectionName(sectionKey),
      group: groupKey === null ? (r.group ?? null) : groupName(groupKey),
      kind: 'invalid',
      changes: [],
      moves: [],
      problems,
      invite: false,
      notify: false,
    }
    const planned = { view, parsed: r, role, person, sectionKey, groupKey, skipped: false }
    if (problems.length > 0) return planned

    const sectionNote = (key: string) => (sectionByKey.has(key) ? '' : ' (a new section)')
    const groupNote = (key: string) => (groupByKey.has(key) ? '' : ' (a new lab group)')
    const changes: string[] = []
    if (!person) {
      view.kind = 'new'
      changes.push(`account created and enrolled as ${ROLE_WORDS[role]}`)
      if (sectionKey !== null) changes.push(`section ${view.section}${sectionNote(sectionKey)}`)
      if (groupKey !== null) changes.push(`lab group ${view.group}${groupNote(groupKey)}`)
      view.invite = true
    } else {
      view.kind = 'existing'
      const e = person.enrollment
      if (!e) {
        changes.push(`enrolled as ${ROLE_WORDS[role]} (has an account)`)
        if (sectionKey !== null) changes.push(`section ${view.section}${sectionNote(sectionKey)}`)
        if (groupKey !== null) changes.push(`lab group ${view.group}${groupNote(groupKey)}`)
      } else {
        if (e.role !== role) changes.push(`role ${ROLE_WORDS[e.role]} → ${ROLE_WORDS[role]}`)
        const currentSection = e.sectionId !== null ? (sectionById.get(e.sectionId)?.name ?? null) : null
        if (sectionKey !== null && currentSection?.toLowerCase() !== sectionKey) {
          if (currentSection === null) changes.push(`section ${view.section}${sectionNote(sectionKey)}`)
          else
            view.moves.push(
              `moves from ${named('section', currentSection)} to ${named('section', view.section!)}${sectionNote(sectionKey)}`,
            )
        }
        const currentGroup = e.labGroupId !== null ? (groupById.get(e.labGroupId)?.name ?? null) : null
        if (groupKey !== null && currentGroup?.toLowerCase() !== groupKey) {
          if (currentGroup === null) changes.push(`lab group ${view.group}${groupNote(groupKey)}`)
          else
            view.moves.push(
              `moves from ${named('group', currentGroup)} to ${named('group', view.group!)}${groupNote(groupKey)}`,
            )
        }
      }
      if (!person.hasPassword && !person.liveInvitation) {
        view.invite = true
        changes.push('invitation e-mailed (the account has no password and no unexpired invitation)')
      } else if (!e) {
        view.notify = true
      }
    }
    view.changes = changes
    return planned
  })

  applySkips(rows, input.skip ?? [])

  const views = rows.map((r) => r.view)
  const existing = views.filter((v) => v.kind === 'existing')
  const counts: RosterImportCounts = {
    rows: views.length,
    new: views.filter((v) => v.kind === 'new').length,
    changed: existing.filter((v) => v.moves.length === 0 && v.changes.length > 0).length,
    moves: existing.filter((v) => v.moves.length > 0).length,
    unchanged: existing.filter((v) => v.moves.length === 0 && v.changes.length === 0).length,
    invalid: views.filter((v) => v.kind === 'invalid').length,
    invitations: views.filter((v) => v.invite).length,
    enrollmentMails: views.filter((v) => v.notify).length,
  }
  // Only what rows to be written need is created.
  const written = rows.filter((r) => r.view.kind !== 'invalid' && !r.skipped)
  const usedSections = new Set(written.map((r) => r.sectionKey).filter((k): k is string => k !== null))
  const usedGroups = new Set(written.map((r) => r.groupKey).filter((k): k is string => k !== null))
  for (const k of [...newSections.keys()]) if (!usedSections.has(k)) newSections.delete(k)
  for (const k of [...newGroups.keys()]) if (!usedGroups.has(k)) newGroups.delete(k)
  return {
    preview: {
      ok: counts.invalid === 0,
      rows: views,
      counts,
      newSections: [...newSections.values()],
      newGroups: [...newGroups.values()].map((g) => g.name),
      ignoredColumns: parsed.ignoredColumns,
      reading: parsed.reading,
      invitationValidHours: invitationTtlHours,
    },
    rows,
    newSections,
    newGroups,
  }
}

/**
 * Marks the moves the instructor unticked. Each must still be a move of the same person in this
 * file: anything else means the file or the course changed since the preview, and the whole
 * import is refused so nothing is written on a stale choice.
 */
function applySkips(rows: PlannedRow[], skip: readonly RosterSkip[]): void {
  const byRow = new Map(rows.map((r) => [r.view.row, r]))
  for (const s of skip) {
    const r = byRow.get(s.row)
    if (!r || r.view.email !== s.email.trim().toLowerCase()) {
      throw new AppError(
        'roster_skip_invalid',
        `skip: row ${s.row} of this file is not ${s.email}. Check the file again and untick the moves anew.`,
        422,
        { row: s.row },
      )
    }
    if (r.view.kind !== 'existing' || r.view.moves.length === 0) {
      throw new AppError(
        'roster_skip_invalid',
        `skip: row ${s.row} (${s.email}) does not move anyone to another section or lab group, so it cannot be left out. Check the file again.`,
        422,
        { row: s.row },
      )
    }
    r.skipped = true
  }
}

import { createHash, randomBytes } from 'node:crypto'
import type { ParsedRosterRow } from '../../shared/roster/import-csv'
import { parseRosterCsv } from '../../shared/roster/import-csv'
import type { CourseRole } from '../../shared/schemas/auth'
import type {
  RosterImportCounts,
  RosterImportPreview,
  RosterImportResult,
  RosterImportRow,
  RosterRowProblem,
} from '../../shared/schemas/roster-import'
import { formatInZone } from '../../shared/time'
import type { Database, Executor } from '../db/client'
import { AppError, notFound } from '../errors'
import type { CourseEnrollment } from '../repositories/enrollments'
import { insertInvitations } from '../repositories/invitations'
import type { NewMail } from '../repositories/outbox'
import { invitationLink, pageLinks, rosterAddedMail, rosterInvitationMail } from '../mail/templates'
import { enqueueMail } from '../repositories/outbox'
import type { CourseGroup, CourseSection, EnrollmentWrite, KnownPerson } from '../repositories/roster-import'
import {
  findCourseTitle,
  findPeopleByEmail,
  insertEnrollments,
  insertGroups,
  insertPasswordlessUsers,
  insertSections,
  listCourseGroups,
  listCourseSections,
  updateEnrollment,
} from '../repositories/roster-import'

/**
 * Roster import: an instructor's CSV of students and TAs becomes accounts, enrolments, sections,
 * lab groups and invitations. The preview and the confirm run the same classification; the
 * confirm runs it again inside the transaction that writes, so what is written always matches
 * what the server itself checked at that moment.
 *
 * Rules (also shown on the import screen):
 * - Sections and lab groups named in the file that the course lacks are created.
 * - An empty role, section or group cell leaves an enrolled person's role, section or group as
 *   it is (a new person with an empty role is a student); an import never removes anyone or
 *   clears anything.
 * - A new person gets an account without a password and an invitation e-mail with a
 *   set-password link. A person whose account already has a password gets a short "added to the
 *   course" e-mail when newly enrolled, and nothing when already enrolled.
 * - An account that still has no password and no unexpired invitation gets a fresh invitation,
 *   so importing the file again re-invites people whose link expired, and nobody else.
 */
export interface RosterImportOptions {
  appUrl: string
  invitationTtlHours: number
}

const ROLE_WORDS: Record<CourseRole, string> = {
  instructor: 'instructor',
  ta: 'teaching assistant',
  student: 'student',
}
const q = (s: string) => `"${s}"`

interface PlannedRow {
  view: RosterImportRow
  parsed: ParsedRosterRow
  /** The role to give: the file's, or for an empty cell the current one (new people: student). */
  role: 'student' | 'ta'
  person: KnownPerson | null
  /** Section to set (by lower-cased name), or null to leave as is. */
  sectionKey: string | null
  groupKey: string | null
}

interface Plan {
  preview: RosterImportPreview
  rows: PlannedRow[]
  /** Lower-cased name → the spelling the file used first. */
  newSections: Map<string, string>
  newGroups: Map<string, { name: string; sectionKey: string | null }>
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

async function plan(db: Executor, courseId: number, csv: string, now: Date, invitationTtlHours: number): Promise<Plan> {
  const parsed = parseRosterCsv(csv)
  if (!parsed.ok) throw refuseFile(parsed.problems)

  const [sections, groups, people] = await Promise.all([
    listCourseSections(db, courseId),
    listCourseGroups(db, courseId),
    findPeopleByEmail(db, courseId, [...new Set(parsed.rows.filter((r) => r.email !== '').map((r) => r.email))], now),
  ])
  // Names compare as MariaDB's unique indexes do: without regard to case.
  const sectionByKey = new Map<string, CourseSection>(sections.map((s) => [s.name.toLowerCase(), s]))
  const sectionById = new Map<number, CourseSection>(sections.map((s) => [s.id, s]))
  const groupByKey = new Map<string, CourseGroup>(groups.map((g) => [g.name.toLowerCase(), g]))
  const groupById = new Map<number, CourseGroup>(groups.map((g) => [g.id, g]))
  const personByEmail = new Map(people.map((p) => [p.email.toLowerCase(), p]))

  const newSections = new Map<string, string>()
  const newGroups = new Map<string, { name: string; sectionKey: string | null }>()
  // New groups take the section of the first row that names both.
  for (const r of parsed.rows) {
    if (r.group === null || groupByKey.has(r.group.toLowerCase())) continue
    const key = r.group.toLowerCase()
    const g = newGroups.get(key)
    if (!g) newGroups.set(key, { name: r.group, sectionKey: r.section?.toLowerCase() ?? null })
    else if (g.sectionKey === null && r.section !== null) g.sectionKey = r.section.toLowerCase()
  }

  // The spelling the file first used for each section it names.
  const spelling = new Map<string, string>()
  for (const r of parsed.rows)
    if (r.section !== null && !spelling.has(r.section.toLowerCase())) spelling.set(r.section.toLowerCase(), r.section)
  const sectionName = (key: string) => sectionByKey.get(key)?.name ?? newSections.get(key) ?? key
  const rows: PlannedRow[] = parsed.rows.map((r) => {
    const problems: RosterRowProblem[] = [...r.problems]
    let sectionKey = r.section?.toLowerCase() ?? null
    const groupKey = r.group?.toLowerCase() ?? null
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
      if (sectionKey === null) sectionKey = groupSectionKey
    }
    if (sectionKey !== null && !sectionByKey.has(sectionKey) && !newSections.has(sectionKey)) {
      newSections.set(sectionKey, spelling.get(sectionKey) ?? sectionKey)
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
      section: sectionKey === null ? null : sectionName(sectionKey),
      group: groupKey === null ? null : (groupByKey.get(groupKey)?.name ?? newGroups.get(groupKey)?.name ?? r.group),
      kind: 'invalid',
      changes: [],
      problems,
      invite: false,
      notify: false,
    }
    if (problems.length > 0) return { view, parsed: r, role, person, sectionKey, groupKey }

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
          changes.push(`section ${currentSection ?? 'none'} → ${view.section}${sectionNote(sectionKey)}`)
        }
        const currentGroup = e.labGroupId !== null ? (groupById.get(e.labGroupId)?.name ?? null) : null
        if (groupKey !== null && currentGroup?.toLowerCase() !== groupKey) {
          changes.push(`lab group ${currentGroup ?? 'none'} → ${view.group}${groupNote(groupKey)}`)
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
    return { view, parsed: r, role, person, sectionKey, groupKey }
  })

  const views = rows.map((r) => r.view)
  const counts: RosterImportCounts = {
    rows: views.length,
    new: views.filter((v) => v.kind === 'new').length,
    changed: views.filter((v) => v.kind === 'existing' && v.changes.length > 0).length,
    unchanged: views.filter((v) => v.kind === 'existing' && v.changes.length === 0).length,
    invalid: views.filter((v) => v.kind === 'invalid').length,
    invitations: views.filter((v) => v.invite).length,
    enrollmentMails: views.filter((v) => v.notify).length,
  }
  // Only what valid rows need is created.
  const validRows = rows.filter((r) => r.view.kind !== 'invalid')
  const usedSections = new Set(validRows.map((r) => r.sectionKey).filter((k): k is string => k !== null))
  const usedGroups = new Set(validRows.map((r) => r.groupKey).filter((k): k is string => k !== null))
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
      invitationValidHours: invitationTtlHours,
    },
    rows,
    newSections,
    newGroups,
  }
}

/** What importing `csv` would do; writes nothing. */
export async function previewRosterImport(
  db: Database,
  e: CourseEnrollment,
  csv: string,
  opts: Pick<RosterImportOptions, 'invitationTtlHours'>,
): Promise<RosterImportPreview> {
  return (await plan(db, e.courseId, csv, new Date(), opts.invitationTtlHours)).preview
}

/** A set-password token: what goes in the link, and what is stored. */
export function newInvitationToken(): { token: string; tokenHash: string } {
  const token = randomBytes(32).toString('base64url')
  return { token, tokenHash: hashInvitationToken(token) }
}

export function hashInvitationToken(token: string): string {
  return createHash('sha256').update(token, 'utf8').digest('hex')
}

/**
 * Imports the roster in one transaction, or refuses the whole file (nothing written) when any
 * row is invalid. Mail is queued in the same transaction.
 */
export async function confirmRosterImport(
  db: Database,
  e: CourseEnrollment,
  csv: string,
  opts: RosterImportOptions,
): Promise<RosterImportResult> {
  const now = new Date()
  const course = await findCourseTitle(db, e.courseId)
  if (!course) throw notFound('That course')
  try {
    return await db.transaction(async (tx) => {
      const p = await plan(tx, e.courseId, csv, now, opts.invitationTtlHours)
      if (!p.preview.ok) {
        const n = p.preview.counts.invalid
        throw new AppError(
          'roster_rows_invalid',
          `${n} row${n === 1 ? ' has' : 's have'} problems, so nothing was imported. Fix ${n === 1 ? 'it' : 'them'} in the file and try again.`,
          422,
          { preview: p.preview },
        )
      }
      await insertSections(tx, e.courseId, [...p.newSections.values()])
      const sectionId = new Map((await listCourseSections(tx, e.courseId)).map((s) => [s.name.toLowerCase(), s.id]))
      await insertGroups(
        tx,
        e.courseId,
        [...p.newGroups.values()].map((g) => ({
          name: g.name,
          sectionId: g.sectionKey === null ? null : (sectionId.get(g.sectionKey) ?? null),
        })),
      )
      const groupId = new Map((await listCourseGroups(tx, e.courseId)).map((g) => [g.name.toLowerCase(), g.id]))

      const created = await insertPasswordlessUsers(
        tx,
        p.rows
          .filter((r) => r.view.kind === 'new')
          .map((r) => ({ email: r.parsed.email, displayName: r.parsed.displayName })),
      )
      const inserts: EnrollmentWrite[] = []
      let updated = 0
      let unchanged = 0
      const userIdOf = (r: PlannedRow) => r.person?.userId ?? created.get(r.parsed.email)
      for (const r of p.rows) {
        const userId = userIdOf(r)
        if (userId === undefined) throw new Error(`no user id for roster row ${r.view.row}`)
        const enrolled = r.person?.enrollment ?? null
        const write: EnrollmentWrite = {
          userId,
          role: r.role,
          sectionId: r.sectionKey !== null ? (sectionId.get(r.sectionKey) ?? null) : (enrolled?.sectionId ?? null),
          labGroupId: r.groupKey !== null ? (groupId.get(r.groupKey) ?? null) : (enrolled?.labGroupId ?? null),
        }
        if (!enrolled) inserts.push(write)
        else if (
          enrolled.role !== write.role ||
          enrolled.sectionId !== write.sectionId ||
          enrolled.labGroupId !== write.labGroupId
        ) {
          await updateEnrollment(tx, e.courseId, write)
          updated++
        } else if (r.view.changes.length === 0) unchanged++
      }
      await insertEnrollments(tx, e.courseId, inserts)

      const expiresAt = new Date(now.getTime() + opts.invitationTtlHours * 3_600_000)
      const invited = p.rows
        .filter((r) => r.view.invite)
        .map((r) => ({ r, userId: userIdOf(r)!, ...newInvitationToken() }))
      const ids = await insertInvitations(
        tx,
        invited.map((i) => ({
          userId: i.userId,
          courseId: e.courseId,
          tokenHash: i.tokenHash,
          expiresAt,
          createdBy: e.userId,
        })),
      )
      const links = pageLinks(opts.appUrl, course.slug)
      const mails: NewMail[] = [
        ...invited.map((i) =>
          invitationMail({
            to: { email: i.r.parsed.email, displayName: i.r.person?.displayName ?? i.r.parsed.displayName },
            course,
            role: i.r.role,
            link: invitationLink(opts.appUrl, i.token),
            expires: formatInZone(expiresAt, course.timeZone),
            invitationId: ids.get(i.tokenHash)!,
          }),
        ),
        ...p.rows
          .filter((r) => r.view.notify)
          .map((r) =>
            enrolledMail({
              to: { email: r.parsed.email, displayName: r.person?.displayName ?? r.parsed.displayName },
              course,
              role: r.role,
              link: links.course,
              courseId: e.courseId,
            }),
          ),
      ]
      await enqueueMail(tx, mails)
      return {
        created: created.size,
        enrolled: inserts.length,
        updated,
        unchanged,
        invitationsSent: invited.length,
        enrollmentMailsSent: mails.length - invited.length,
        sectionsCreated: [...p.newSections.values()],
        groupsCreated: [...p.newGroups.values()].map((g) => g.name),
      }
    })
  } catch (err) {
    if (isDuplicate(err)) {
      throw new AppError(
        'roster_changed',
        'The roster changed while this import ran (someone else imported or enrolled the same people). Preview the file again.',
        409,
      )
    }
    throw err
  }
}

function isDuplicate(err: unknown): boolean {
  let x: unknown = err
  for (let i = 0; x && i < 4; i++) {
    if ((x as { code?: string }).code === 'ER_DUP_ENTRY') return true
    x = (x as { cause?: unknown }).cause
  }
  return false
}

type MailCourse = { code: string; title: string; timeZone: string }

function invitationMail(p: {
  to: { email: string; displayName: string }
  course: MailCourse
  role: 'student' | 'ta'
  link: string
  expires: string
  invitationId: number
}): NewMail {
  return {
    dedupeKey: `invitation:${p.invitationId}`,
    toAddress: p.to.email,
    toName: p.to.displayName,
    ...rosterInvitationMail({
      name: p.to.displayName,
      course: p.course,
      role: p.role,
      link: p.link,
      expires: p.expires,
    }),
  }
}

function enrolledMail(p: {
  to: { email: string; displayName: string }
  course: MailCourse
  role: 'student' | 'ta'
  link: string
  courseId: number
}): NewMail {
  return {
    dedupeKey: `course-enrolled:${p.courseId}`,
    toAddress: p.to.email,
    toName: p.to.displayName,
    ...rosterAddedMail({ name: p.to.displayName, course: p.course, role: p.role, link: p.link }),
  }
}

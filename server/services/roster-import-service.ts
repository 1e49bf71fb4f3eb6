import { createHash, randomBytes } from 'node:crypto'
import type { RosterImportPreview, RosterImportResult } from '../../shared/schemas/roster-import'
import { formatInZone } from '../../shared/time'
import type { Database } from '../db/client'
import { AppError, notFound } from '../errors'
import type { CourseEnrollment } from '../repositories/enrollments'
import { insertInvitations } from '../repositories/invitations'
import type { NewMail } from '../repositories/outbox'
import { invitationLink, pageLinks, rosterAddedMail, rosterInvitationMail } from '../mail/templates'
import { enqueueMail } from '../repositories/outbox'
import type { EnrollmentWrite } from '../repositories/roster-import'
import {
  findCourseTitle,
  insertEnrollments,
  insertGroups,
  insertPasswordlessUsers,
  insertSections,
  listCourseGroups,
  listCourseSections,
  updateEnrollment,
} from '../repositories/roster-import'
import type { PlannedRow, RosterInput } from './roster-import-plan'
import { planRosterImport } from './roster-import-plan'

/**
 * Roster import: an instructor's CSV of students and TAs becomes accounts, enrolments, sections,
 * lab groups and invitations. The preview and the confirm run the same classification; the
 * confirm runs it again inside the transaction that writes, so what is written always matches
 * what the server itself checked at that moment.
 *
 * Rules (also shown on the import screen):
 * - Sections and lab groups are matched to the course's without regard to case, spaces or a
 *   leading "Section"/"Group" word; names the course lacks are created, unless they are one or two
 *   edits from an existing name (then the row is refused with a suggestion).
 * - A row that moves an enrolled person to another section or group is a move; the instructor
 *   may leave moves out (`skip`), and nothing is written for such a row.
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

/** What importing the file would do; writes nothing. */
export async function previewRosterImport(
  db: Database,
  e: CourseEnrollment,
  input: RosterInput,
  opts: Pick<RosterImportOptions, 'invitationTtlHours'>,
): Promise<RosterImportPreview> {
  return (await planRosterImport(db, e.courseId, input, new Date(), opts.invitationTtlHours)).preview
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
  input: RosterInput,
  opts: RosterImportOptions,
): Promise<RosterImportResult> {
  const now = new Date()
  const course = await findCourseTitle(db, e.courseId)
  if (!course) throw notFound('That course')
  try {
    return await db.transaction(async (tx) => {
      const p = await planRosterImport(tx, e.courseId, input, now, opts.invitationTtlHours)
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

      const rows = p.rows.filter((r) => !r.skipped)
      const created = await insertPasswordlessUsers(
        tx,
        rows
          .filter((r) => r.view.kind === 'new')
          .map((r) => ({ email: r.parsed.email, displayName: r.parsed.displayName })),
      )
      const inserts: EnrollmentWrite[] = []
      let updated = 0
      let unchanged = 0
      const userIdOf = (r: PlannedRow) => r.person?.userId ?? created.get(r.parsed.email)
      for (const r of rows) {
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
      const invited = rows
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
        ...rows
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
        skipped: p.rows.length - rows.length,
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

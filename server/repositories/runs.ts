import { and, asc, desc, eq, inArray, isNotNull, isNull, or } from 'drizzle-orm'
import { alias } from 'drizzle-orm/mysql-core'
import type { RunEntryKind, RunOutcome } from '../../shared/schemas/runs'
import type { ChecklistItem } from '../../shared/modules/stand-schema'
import type { Executor } from '../db/client'
import {
  bookings,
  courses,
  enrollments,
  labGroups,
  moduleVersions,
  modules,
  runEntries,
  runPeople,
  runRecords,
  standSlots,
  stands,
  users,
} from '../db/schema'

/** A booking with what the run page shows of it (read from the stand tables directly). */
export interface BookingRow {
  id: number
  courseId: number
  status: 'active' | 'cancelled' | 'moved'
  startsAt: Date
  minutes: number
  standName: string
  standLocation: string
  labGroupId: number
  labGroupName: string
  sectionId: number
  moduleId: number
  publishedVersionId: number | null
  timeZone: string
}

const bookingCols = {
  id: bookings.id,
  courseId: stands.courseId,
  status: bookings.status,
  startsAt: standSlots.startsAt,
  minutes: standSlots.minutes,
  standName: stands.name,
  standLocation: stands.location,
  labGroupId: bookings.labGroupId,
  labGroupName: labGroups.name,
  sectionId: standSlots.sectionId,
  moduleId: bookings.moduleId,
  publishedVersionId: modules.publishedVersionId,
  timeZone: courses.timeZone,
}

function bookingQuery(db: Executor) {
  return db
    .select(bookingCols)
    .from(bookings)
    .innerJoin(standSlots, eq(standSlots.id, bookings.slotId))
    .innerJoin(stands, eq(stands.id, standSlots.standId))
    .innerJoin(labGroups, eq(labGroups.id, bookings.labGroupId))
    .innerJoin(modules, eq(modules.id, bookings.moduleId))
    .innerJoin(courses, eq(courses.id, stands.courseId))
}

export async function findBooking(db: Executor, courseId: number, bookingId: number): Promise<BookingRow | null> {
  const rows = await bookingQuery(db)
    .where(and(eq(bookings.id, bookingId), eq(stands.courseId, courseId)))
    .limit(1)
  return rows[0] ?? null
}

/** The title of a module version (the sheet as issued). */
export async function versionTitle(db: Executor, versionId: number): Promise<string> {
  const rows = await db
    .select({ title: moduleVersions.title })
    .from(moduleVersions)
    .where(eq(moduleVersions.id, versionId))
    .limit(1)
  return rows[0]?.title ?? ''
}

export interface RunRow {
  id: number
  courseId: number
  bookingId: number
  moduleVersionId: number
  checklist: ChecklistItem[]
  openedBy: string
  openedAt: Date
  startedAt: Date | null
  endedAt: Date | null
  outcome: RunOutcome | null
  outcomeReason: string | null
  waitMinutes: number | null
  notes: string | null
  signedOffBy: string | null
  signedOffAt: Date | null
}

const opener = alias(users, 'opener')
const signer = alias(users, 'signer')

function runQuery(db: Executor) {
  return db
    .select({
      id: runRecords.id,
      courseId: runRecords.courseId,
      bookingId: runRecords.bookingId,
      moduleVersionId: runRecords.moduleVersionId,
      checklist: runRecords.checklist,
      openedBy: opener.displayName,
      openedAt: runRecords.openedAt,
      startedAt: runRecords.startedAt,
      endedAt: runRecords.endedAt,
      outcome: runRecords.outcome,
      outcomeReason: runRecords.outcomeReason,
      waitMinutes: runRecords.waitMinutes,
      notes: runRecords.notes,
      signedOffBy: signer.displayName,
      signedOffAt: runRecords.signedOffAt,
    })
    .from(runRecords)
    .leftJoin(opener, eq(opener.id, runRecords.openedBy))
    .leftJoin(signer, eq(signer.id, runRecords.signedOffBy))
}

const asRun = (r: Omit<RunRow, 'openedBy'> & { openedBy: string | null }): RunRow => ({
  ...r,
  openedBy: r.openedBy ?? '(removed)',
})

export async function findRunByBooking(db: Executor, bookingId: number): Promise<RunRow | null> {
  const rows = await runQuery(db).where(eq(runRecords.bookingId, bookingId)).limit(1)
  return rows[0] ? asRun(rows[0]) : null
}

export async function findRun(db: Executor, courseId: number, runId: number): Promise<RunRow | null> {
  const rows = await runQuery(db)
    .where(and(eq(runRecords.id, runId), eq(runRecords.courseId, courseId)))
    .limit(1)
  return rows[0] ? asRun(rows[0]) : null
}

/** Locks the run row for a sign-off; whether it is still unsigned. */
export async function lockRun(tx: Executor, runId: number): Promise<{ signedOffAt: Date | null } | null> {
  const rows = await tx
    .select({ signedOffAt: runRecords.signedOffAt })
    .from(runRecords)
    .where(eq(runRecords.id, runId))
    .for('update')
  return rows[0] ?? null
}

export async function insertRun(
  db: Executor,
  r: { courseId: number; bookingId: number; moduleVersionId: number; checklist: ChecklistItem[]; openedBy: number },
): Promise<number> {
  const [row] = await db.insert(runRecords).values(r).$returningId()
  return row!.id
}

export interface EntryRow {
  id: number
  kind: RunEntryKind
  itemKey: string | null
  text: string | null
  by: string
  at: Date
}

export async function listEntries(db: Executor, runId: number): Promise<EntryRow[]> {
  return db
    .select({
      id: runEntries.id,
      kind: runEntries.kind,
      itemKey: runEntries.itemKey,
      text: runEntries.text,
      by: users.displayName,
      at: runEntries.at,
    })
    .from(runEntries)
    .innerJoin(users, eq(users.id, runEntries.byUserId))
    .where(eq(runEntries.runId, runId))
    .orderBy(asc(runEntries.id))
}

export async function insertEntry(
  db: Executor,
  e: { runId: number; kind: RunEntryKind; itemKey?: string | null; text?: string | null; byUserId: number },
): Promise<number> {
  const [row] = await db.insert(runEntries).values(e).$returningId()
  return row!.id
}

/** The one sign-off write: refused (0 rows) when another sign-off got there first. */
export async function signOffRun(
  tx: Executor,
  runId: number,
  s: {
    startedAt: Date
    endedAt: Date
    outcome: RunOutcome
    outcomeReason: string | null
    waitMinutes: number | null
    notes: string | null
    signedOffBy: number
    signedOffAt: Date
  },
): Promise<boolean> {
  const [res] = await tx
    .update(runRecords)
    .set(s)
    .where(and(eq(runRecords.id, runId), isNull(runRecords.signedOffAt)))
  return res.affectedRows === 1
}

export async function insertPeople(tx: Executor, runId: number, userIds: number[]): Promise<void> {
  if (userIds.length === 0) return
  await tx.insert(runPeople).values(userIds.map((userId) => ({ runId, userId })))
}

export async function listPeople(
  db: Executor,
  courseId: number,
  runId: number,
): Promise<{ id: number; name: string; role: 'student' | 'ta' | 'instructor' | null }[]> {
  return db
    .select({ id: users.id, name: users.displayName, role: enrollments.role })
    .from(runPeople)
    .innerJoin(users, eq(users.id, runPeople.userId))
    .leftJoin(enrollments, and(eq(enrollments.userId, users.id), eq(enrollments.courseId, courseId)))
    .where(eq(runPeople.runId, runId))
    .orderBy(asc(users.displayName))
}

/** The people who may be marked present at a group's run: its members and the course's staff. */
export async function listCandidates(
  db: Executor,
  courseId: number,
  labGroupId: number,
): Promise<{ id: number; name: string; role: 'student' | 'ta' | 'instructor' }[]> {
  return db
    .select({ id: users.id, name: users.displayName, role: enrollments.role })
    .from(enrollments)
    .innerJoin(users, eq(users.id, enrollments.userId))
    .where(
      and(
        eq(enrollments.courseId, courseId),
        or(eq(enrollments.labGroupId, labGroupId), inArray(enrollments.role, ['ta', 'instructor'])),
      ),
    )
    .orderBy(asc(enrollments.role), asc(users.displayName))
}

/** The signed-off runs of a lab group for a sheet, newest first. */
export async function listSignedRuns(db: Executor, courseId: number, labGroupId: number, moduleId: number) {
  return db
    .select({
      id: runRecords.id,
      bookingId: bookings.id,
      startsAt: standSlots.startsAt,
      standName: stands.name,
      outcome: runRecords.outcome,
      signedOffBy: signer.displayName,
      signedOffAt: runRecords.signedOffAt,
    })
    .from(runRecords)
    .innerJoin(bookings, eq(bookings.id, runRecords.bookingId))
    .innerJoin(standSlots, eq(standSlots.id, bookings.slotId))
    .innerJoin(stands, eq(stands.id, standSlots.standId))
    .leftJoin(signer, eq(signer.id, runRecords.signedOffBy))
    .where(
      and(
        eq(runRecords.courseId, courseId),
        eq(bookings.labGroupId, labGroupId),
        eq(bookings.moduleId, moduleId),
        isNotNull(runRecords.signedOffAt),
      ),
    )
    .orderBy(desc(standSlots.startsAt))
}

/** A run as a hand-in needs it: whose group and sheet it is, and whether it is signed off. */
export async function findRunForHandIn(db: Executor, courseId: number, runId: number) {
  const rows = await db
    .select({
      id: runRecords.id,
      labGroupId: bookings.labGroupId,
      moduleId: bookings.moduleId,
      signedOffAt: runRecords.signedOffAt,
    })
    .from(runRecords)
    .innerJoin(bookings, eq(bookings.id, runRecords.bookingId))
    .where(and(eq(runRecords.id, runId), eq(runRecords.courseId, courseId)))
    .limit(1)
  return rows[0] ?? null
}

/** The run a submission is linked to, for the review page. */
export async function findLinkedRun(db: Executor, runId: number) {
  const rows = await db
    .select({
      id: runRecords.id,
      bookingId: runRecords.bookingId,
      startedAt: runRecords.startedAt,
      outcome: runRecords.outcome,
      reason: runRecords.outcomeReason,
      waitMinutes: runRecords.waitMinutes,
      signedOffBy: signer.displayName,
      signedOffAt: runRecords.signedOffAt,
    })
    .from(runRecords)
    .leftJoin(signer, eq(signer.id, runRecords.signedOffBy))
    .where(eq(runRecords.id, runId))
    .limit(1)
  return rows[0] ?? null
}

import type { ChecklistItem } from '../../shared/modules/stand-schema'
import type {
  LinkedRunView,
  RunBookingView,
  RunEntryInput,
  RunNotOpenedDetails,
  RunView,
  SignOffInput,
  SignedRunView,
} from '../../shared/schemas/runs'
import type { Database } from '../db/client'
import { AppError, forbidden, notFound } from '../errors'
import type { CourseEnrollment } from '../repositories/enrollments'
import { findVersion } from '../repositories/modules'
import type { BookingRow, EntryRow, RunRow } from '../repositories/runs'
import {
  findBooking,
  findLinkedRun,
  findRun,
  findRunForHandIn,
  findRunByBooking,
  insertEntry,
  insertPeople,
  insertRun,
  listCandidates,
  listEntries,
  listPeople,
  listSignedRuns,
  lockRun,
  signOffRun,
  versionTitle,
} from '../repositories/runs'

/**
 * Runs at the stand. Who may do what:
 * - staff of the booking's section (a TA of that section, or any instructor): read, open, tick any
 *   item, write notes and corrections, sign off;
 * - students of the booked lab group: read, tick the items that are not staff-only, write notes;
 * - everyone else: the booking does not exist for them (404).
 */
type Scope = 'staff' | 'group'

function scopeOf(e: CourseEnrollment, b: { sectionId: number; labGroupId: number }): Scope | null {
  if (e.role === 'instructor') return 'staff'
  if (e.role === 'ta') return e.sectionId === b.sectionId ? 'staff' : null
  return e.labGroupId === b.labGroupId ? 'group' : null
}

async function bookingInScope(db: Database, e: CourseEnrollment, bookingId: number) {
  const b = await findBooking(db, e.courseId, bookingId)
  const scope = b ? scopeOf(e, b) : null
  if (!b || !scope) throw notFound('That booking')
  return { b, scope }
}

async function bookingView(db: Database, b: BookingRow): Promise<RunBookingView> {
  return {
    id: b.id,
    status: b.status,
    startsAt: b.startsAt.toISOString(),
    minutes: b.minutes,
    standName: b.standName,
    standLocation: b.standLocation,
    labGroupId: b.labGroupId,
    labGroupName: b.labGroupName,
    sectionId: b.sectionId,
    moduleId: b.moduleId,
    moduleTitle: b.publishedVersionId ? await versionTitle(db, b.publishedVersionId) : '',
    timeZone: b.timeZone,
  }
}

/** Each item's state from its latest tick or untick (entries come oldest first). */
function latestMarks(entries: EntryRow[]): Map<string, EntryRow> {
  const latest = new Map<string, EntryRow>()
  for (const x of entries) {
    if ((x.kind === 'tick' || x.kind === 'untick') && x.itemKey) latest.set(x.itemKey, x)
  }
  return latest
}

/** The hold items whose latest mark is not a tick. */
export function openHoldPoints(checklist: ChecklistItem[], entries: EntryRow[]): ChecklistItem[] {
  const latest = latestMarks(entries)
  return checklist.filter((i) => i.hold && latest.get(i.key)?.kind !== 'tick')
}

async function runView(db: Database, run: RunRow, b: BookingRow, scope: Scope): Promise<RunView> {
  const [entries, people, candidates] = await Promise.all([
    listEntries(db, run.id),
    listPeople(db, run.courseId, run.id),
    listCandidates(db, run.courseId, b.labGroupId),
  ])
  const latest = latestMarks(entries)
  const open = run.signedOffAt === null
  return {
    id: run.id,
    booking: await bookingView(db, b),
    openedBy: run.openedBy,
    openedAt: run.openedAt.toISOString(),
    checklist: run.checklist.map((i) => {
      const m = latest.get(i.key)
      return {
        ...i,
        ticked: m?.kind === 'tick',
        by: m?.by ?? null,
        at: m ? m.at.toISOString() : null,
      }
    }),
    entries: entries.map((x) => ({ ...x, at: x.at.toISOString() })),
    signOff:
      run.signedOffAt && run.outcome && run.startedAt && run.endedAt
        ? {
            outcome: run.outcome,
            reason: run.outcomeReason,
            waitMinutes: run.waitMinutes,
            startedAt: run.startedAt.toISOString(),
            endedAt: run.endedAt.toISOString(),
            notes: run.notes,
            by: run.signedOffBy ?? '(removed)',
            at: run.signedOffAt.toISOString(),
            people: people.map((p) => ({ ...p, role: p.role ?? 'student' })),
          }
        : null,
    candidates,
    can: {
      tickStudentItems: open,
      tickStaffItems: open && scope === 'staff',
      signOff: open && scope === 'staff',
      correct: scope === 'staff',
    },
  }
}

/** The run record of a booking, or 404 `run_not_opened` carrying the booking (and whether the caller may open it). */
export async function getRun(db: Database, e: CourseEnrollment, bookingId: number): Promise<RunView> {
  const { b, scope } = await bookingInScope(db, e, bookingId)
  const run = await findRunByBooking(db, b.id)
  if (!run) {
    const details: RunNotOpenedDetails = { booking: await bookingView(db, b), canOpen: scope === 'staff' }
    throw new AppError('run_not_opened', 'The run for this booking has not been opened yet.', 404, details)
  }
  return runView(db, run, b, scope)
}

/** Opens the run of a booking with the checklist of the sheet's issued version (copied, so later edits do not change it). */
export async function openRun(db: Database, e: CourseEnrollment, bookingId: number): Promise<RunView> {
  const { b, scope } = await bookingInScope(db, e, bookingId)
  if (scope !== 'staff') throw forbidden('Only the course staff open a run at the stand.')
  if (b.status !== 'active') {
    throw new AppError(
      'booking_not_active',
      `This booking was ${b.status}; a run is opened for an active booking.`,
      409,
    )
  }
  if (await findRunByBooking(db, b.id)) throw runExists()
  if (b.publishedVersionId === null) {
    throw new AppError('not_published', 'The lab sheet of this booking is not issued to the class.', 409)
  }
  const v = await findVersion(db, b.publishedVersionId)
  const checklist = ((v?.frontMatter as { checklist?: ChecklistItem[] } | null)?.checklist ?? []).map((i) => ({
    key: i.key,
    text: i.text,
    staff: i.staff,
    hold: i.hold,
  }))
  try {
    await insertRun(db, {
      courseId: e.courseId,
      bookingId: b.id,
      moduleVersionId: b.publishedVersionId,
      checklist,
      openedBy: e.userId,
    })
  } catch (err) {
    // Two staff opening at once: the unique key on booking_id lets one through.
    if (isDuplicate(err)) throw runExists()
    throw err
  }
  return runView(db, (await findRunByBooking(db, b.id))!, b, scope)
}

const runExists = () => new AppError('run_exists', 'The run for this booking is already open.', 409)

function isDuplicate(err: unknown): boolean {
  for (let x: unknown = err; x; x = (x as { cause?: unknown }).cause) {
    if ((x as { code?: string }).code === 'ER_DUP_ENTRY') return true
  }
  return false
}

async function runInScope(db: Database, e: CourseEnrollment, runId: number) {
  const run = await findRun(db, e.courseId, runId)
  if (!run) throw notFound('That run')
  const { b, scope } = await bookingInScope(db, e, run.bookingId).catch(() => {
    throw notFound('That run')
  })
  return { run, b, scope }
}

/** A tick, untick, note or correction: a new entry, never a change to an old one. */
export async function addEntry(
  db: Database,
  e: CourseEnrollment,
  runId: number,
  input: RunEntryInput,
): Promise<RunView> {
  const { run, b, scope } = await runInScope(db, e, runId)
  if (input.kind === 'correction' && scope !== 'staff') {
    throw forbidden('Corrections are written by the course staff; a student can add a note.')
  }
  if (input.kind === 'tick' || input.kind === 'untick') {
    if (run.signedOffAt) {
      throw new AppError(
        'run_signed_off',
        'This run is signed off: its checklist can no longer change. Add a correction or a note instead.',
        409,
      )
    }
    const item = run.checklist.find((i) => i.key === input.itemKey)
    if (!item) {
      throw new AppError(
        'unknown_checklist_item',
        `itemKey: this run's checklist has no item "${input.itemKey}".`,
        400,
        { field: 'itemKey', itemKey: input.itemKey, known: run.checklist.map((i) => i.key) },
      )
    }
    if (item.staff && scope !== 'staff') {
      throw forbidden(`"${item.text}" (${item.key}) is ticked by the course staff only.`)
    }
  }
  await insertEntry(db, {
    runId: run.id,
    kind: input.kind,
    itemKey: input.itemKey ?? null,
    text: input.text ?? null,
    byUserId: e.userId,
  })
  return runView(db, run, b, scope)
}

/**
 * The one sign-off: every hold item ticked, the people present from the group and the staff, and
 * one guarded UPDATE (a second sign-off, even a simultaneous one, is refused).
 */
export async function signOff(db: Database, e: CourseEnrollment, runId: number, input: SignOffInput): Promise<RunView> {
  const { run, b, scope } = await runInScope(db, e, runId)
  if (scope !== 'staff') throw forbidden('Only the course staff sign a run off.')
  const alreadySigned = () =>
    new AppError('run_signed_off', 'This run is already signed off; a run is signed off once.', 409)
  if (run.signedOffAt) throw alreadySigned()

  const candidates = await listCandidates(db, e.courseId, b.labGroupId)
  const allowed = new Set(candidates.map((c) => c.id))
  const people = [...new Set(input.people)]
  const strangers = people.filter((id) => !allowed.has(id))
  if (strangers.length > 0) {
    throw new AppError(
      'not_at_run',
      `people: ${strangers.join(', ')} ${strangers.length === 1 ? 'is' : 'are'} not a member of ${b.labGroupName} or staff of this course.`,
      400,
      { field: 'people', ids: strangers },
    )
  }

  await db.transaction(async (tx) => {
    const locked = await lockRun(tx, run.id)
    if (!locked || locked.signedOffAt) throw alreadySigned()
    const open = openHoldPoints(run.checklist, await listEntries(tx, run.id))
    if (open.length > 0) {
      throw new AppError(
        'hold_points_open',
        `Not every hold point is ticked: ${open.map((i) => `"${i.text}" (${i.key})`).join(', ')}.`,
        409,
        { items: open.map((i) => i.key) },
      )
    }
    const at = new Date()
    const done = await signOffRun(tx, run.id, {
      startedAt: new Date(input.startedAt),
      endedAt: new Date(input.endedAt),
      outcome: input.outcome,
      outcomeReason: input.outcome === 'aborted' ? (input.reason ?? null) : null,
      waitMinutes: input.outcome === 'hang-fire' || input.outcome === 'misfire' ? (input.waitMinutes ?? null) : null,
      notes: input.notes || null,
      signedOffBy: e.userId,
      signedOffAt: at,
    })
    if (!done) throw alreadySigned()
    await insertPeople(tx, run.id, people)
    await insertEntry(tx, { runId: run.id, kind: 'sign-off', text: input.outcome, byUserId: e.userId })
  })
  return runView(db, (await findRun(db, e.courseId, run.id))!, b, scope)
}

/** The caller's lab group's signed-off runs of a sheet (none for staff or a student without a group). */
export async function signedRuns(db: Database, e: CourseEnrollment, moduleId: number): Promise<SignedRunView[]> {
  if (e.role !== 'student' || e.labGroupId === null) return []
  const rows = await listSignedRuns(db, e.courseId, e.labGroupId, moduleId)
  return rows.map((r) => ({
    id: r.id,
    bookingId: r.bookingId,
    startsAt: r.startsAt.toISOString(),
    standName: r.standName,
    outcome: r.outcome!,
    signedOffBy: r.signedOffBy ?? '(removed)',
    signedOffAt: r.signedOffAt!.toISOString(),
  }))
}

/**
 * The run a hand-in is linked to. A sheet with `requiresSignedRun` needs a signed-off run of the
 * student's own lab group for that sheet; any other sheet may name one (checked the same way) or not.
 * @returns the run's id, or null when none is named and none is required
 */
export async function runForHandIn(
  db: Database,
  e: CourseEnrollment,
  moduleId: number,
  requiresSignedRun: boolean,
  runRecordId: number | undefined,
): Promise<number | null> {
  const refuse = (why: string) => new AppError('signed_run_required', why, 409, { field: 'runRecordId' })
  if (runRecordId === undefined) {
    if (!requiresSignedRun) return null
    throw refuse(
      'runRecordId: this lab sheet is handed in against a signed-off stand run of your lab group. Choose the run (see Stand time).',
    )
  }
  if (e.labGroupId === null) {
    throw refuse('runRecordId: a stand run belongs to a lab group, and you are not in one yet.')
  }
  const run = await findRunForHandIn(db, e.courseId, runRecordId)
  if (!run || run.labGroupId !== e.labGroupId) {
    throw refuse(`runRecordId: run ${runRecordId} is not a run of your lab group.`)
  }
  if (run.moduleId !== moduleId) throw refuse(`runRecordId: run ${runRecordId} was booked for another lab sheet.`)
  if (!run.signedOffAt) throw refuse(`runRecordId: run ${runRecordId} is not signed off by the course staff yet.`)
  return run.id
}

/** The run a hand-in is linked to, as the review page shows it. */
export async function linkedRun(db: Database, runId: number | null): Promise<LinkedRunView | null> {
  if (runId === null) return null
  const r = await findLinkedRun(db, runId)
  if (!r || !r.outcome || !r.startedAt || !r.signedOffAt) return null
  return {
    id: r.id,
    bookingId: r.bookingId,
    startedAt: r.startedAt.toISOString(),
    outcome: r.outcome,
    reason: r.reason,
    waitMinutes: r.waitMinutes,
    signedOffBy: r.signedOffBy ?? '(removed)',
    signedOffAt: r.signedOffAt.toISOString(),
  }
}

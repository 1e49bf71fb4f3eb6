import type {
  BookingSettings,
  SlotCreate,
  SlotList,
  SlotPattern,
  SlotsCreated,
  SlotsQuery,
  SlotView,
  StandCreate,
  StandUpdate,
  StandView,
  StandsOverview,
} from '../../shared/schemas/stands'
import { MAX_PATTERN_SLOTS, MAX_SLOT_MINUTES, WEEKDAYS } from '../../shared/schemas/stands'
import { formatInZone, zonedTimeToUtc } from '../../shared/time'
import type { Database, Executor } from '../db/client'
import { retryOnLockConflict } from '../db/retry'
import { AppError, notFound } from '../errors'
import type { CourseEnrollment } from '../repositories/enrollments'
import { activeCountsByModule, findGroup, listBookings, waitlistsOf } from '../repositories/bookings'
import {
  courseBookingSettings,
  findStand,
  insertSlots,
  insertStand,
  listSections,
  listSheets,
  listSlots,
  listStands,
  overlappingSlots,
  sectionOfCourse,
  setBookingCutoff,
  setStandModules,
  slotsStartingAt,
  standModuleIds,
  standNameTaken,
  updateStand,
} from '../repositories/stands'

/** A validation failure that names its field, as the error middleware words zod's. */
export function fieldError(path: string, message: string): AppError {
  return new AppError('validation_failed', message, 400, [{ path, message }])
}

/**
 * The sections a staff member acts on: every section for an instructor (undefined), their own for a
 * TA (null when a TA has no section: they act on none).
 */
export function staffSection(e: CourseEnrollment): number | null | undefined {
  return e.role === 'instructor' ? undefined : e.sectionId
}

/** Whether a staff member may act on something of `sectionId`. */
export function staffActsOn(e: CourseEnrollment, sectionId: number): boolean {
  const mine = staffSection(e)
  return mine === undefined || mine === sectionId
}

/** The section a student's lab group books in: the group's own, else the student's. */
export async function studentGroup(
  db: Executor,
  e: CourseEnrollment,
): Promise<{ id: number; name: string; sectionId: number | null } | null> {
  if (e.labGroupId === null) return null
  const g = await findGroup(db, e.courseId, e.labGroupId)
  if (!g) return null
  return { id: g.id, name: g.name, sectionId: g.sectionId ?? e.sectionId }
}

/** "Tue, Mar 2, 2027, 13:00 MST" for a slot start, in the course's time zone. */
export const whenText = (startsAt: Date, minutes: number, timeZone: string) =>
  `${formatInZone(startsAt, timeZone)} (${minutes} min)`

// ---- Stands ----

async function standViews(db: Executor, courseId: number): Promise<StandView[]> {
  const rows = await listStands(db, courseId)
  const allowed = await standModuleIds(
    db,
    rows.map((r) => r.id),
  )
  const sheets = new Map((await listSheets(db, courseId)).map((s) => [s.id, s.title]))
  return rows.map((r) => ({
    id: r.id,
    name: r.name,
    location: r.location,
    maxPressureNote: r.maxPressureNote,
    modules: (allowed.get(r.id) ?? []).map((id) => ({ id, title: sheets.get(id) ?? `Sheet ${id}` })),
  }))
}

export async function standsOverview(db: Database, e: CourseEnrollment): Promise<StandsOverview> {
  const settings = await courseBookingSettings(db, e.courseId)
  const sheets = await listSheets(db, e.courseId)
  const sections = await listSections(db, e.courseId)
  const mine = staffSection(e)
  return {
    stands: await standViews(db, e.courseId),
    standSheets: sheets
      .filter((s) => s.standRuns > 0)
      .map((s) => ({ id: s.id, title: s.title, standRuns: s.standRuns })),
    sections: mine === undefined ? sections : sections.filter((s) => s.id === mine),
    cutoffHours: settings.cutoffHours,
    timeZone: settings.timeZone,
  }
}

/** Only sheets of this course that run on a stand (standRuns ≥ 1) may be allowed on one. */
async function checkStandSheets(db: Executor, courseId: number, moduleIds: number[]): Promise<number[]> {
  const ids = [...new Set(moduleIds)]
  const found = new Map((await listSheets(db, courseId, ids)).map((s) => [s.id, s]))
  for (const [i, id] of ids.entries()) {
    const s = found.get(id)
    if (!s) throw fieldError(`moduleIds.${i}`, `moduleIds: sheet ${id} is not a lab sheet of this course.`)
    if (s.standRuns < 1)
      throw fieldError(
        `moduleIds.${i}`,
        `moduleIds: “${s.title}” is not run on a stand (its front matter has no "standRuns:").`,
      )
  }
  return ids
}

export async function createStand(db: Database, e: CourseEnrollment, input: StandCreate): Promise<StandView> {
  const moduleIds = await checkStandSheets(db, e.courseId, input.moduleIds)
  if (await standNameTaken(db, e.courseId, input.name))
    throw new AppError('stand_exists', `name: this course already has a stand called “${input.name}”.`, 409)
  const id = await db.transaction(async (tx) => {
    const standId = await insertStand(tx, {
      courseId: e.courseId,
      name: input.name,
      location: input.location,
      maxPressureNote: input.maxPressureNote,
    })
    await setStandModules(tx, standId, moduleIds)
    return standId
  })
  return (await standViews(db, e.courseId)).find((s) => s.id === id)!
}

export async function changeStand(
  db: Database,
  e: CourseEnrollment,
  standId: number,
  input: StandUpdate,
): Promise<StandView> {
  if (!(await findStand(db, e.courseId, standId))) throw notFound('That stand')
  const moduleIds = input.moduleIds ? await checkStandSheets(db, e.courseId, input.moduleIds) : undefined
  if (input.name !== undefined && (await standNameTaken(db, e.courseId, input.name, standId)))
    throw new AppError('stand_exists', `name: this course already has a stand called “${input.name}”.`, 409)
  await db.transaction(async (tx) => {
    const { moduleIds: _m, ...fields } = input
    await updateStand(
      tx,
      standId,
      Object.fromEntries(Object.entries(fields).filter(([, v]) => v !== undefined)) as typeof fields,
    )
    if (moduleIds) await setStandModules(tx, standId, moduleIds)
  })
  return (await standViews(db, e.courseId)).find((s) => s.id === standId)!
}

// ---- Slots ----

interface PlannedSlot {
  startsAt: Date
  minutes: number
  /** The request field a problem with this slot is reported against. */
  field: string
}

const isoWeekday = (date: string) => {
  const [y, m, d] = date.split('-').map(Number) as [number, number, number]
  const w = new Date(Date.UTC(y, m - 1, d)).getUTCDay()
  return w === 0 ? 7 : w
}

const addDay = (date: string) => {
  const [y, m, d] = date.split('-').map(Number) as [number, number, number]
  return new Date(Date.UTC(y, m - 1, d + 1)).toISOString().slice(0, 10)
}

const toMinutes = (hhmm: string) => Number(hhmm.slice(0, 2)) * 60 + Number(hhmm.slice(3, 5))
const toClock = (min: number) => `${String(Math.floor(min / 60)).padStart(2, '0')}:${String(min % 60).padStart(2, '0')}`

/** The slots a weekly pattern makes, in the course's time zone; refuses a pattern that makes none. */
export function planPattern(p: SlotPattern, timeZone: string): PlannedSlot[] {
  const day = WEEKDAYS[p.weekday - 1]!
  for (const [i, x] of p.except.entries()) {
    if (x < p.from || x > p.to || isoWeekday(x) !== p.weekday)
      throw fieldError(`except.${i}`, `except: ${x} is not a ${day} between ${p.from} and ${p.to}.`)
  }
  const skip = new Set(p.except)
  const startMin = toMinutes(p.start)
  const endMin = toMinutes(p.end)
  if (p.slotMinutes > endMin - startMin)
    throw fieldError(
      'slotMinutes',
      `slotMinutes: a ${p.slotMinutes}-minute slot does not fit between ${p.start} and ${p.end}.`,
    )
  const out: PlannedSlot[] = []
  for (let d = p.from; d <= p.to; d = addDay(d)) {
    if (isoWeekday(d) !== p.weekday || skip.has(d)) continue
    for (let t = startMin; t + p.slotMinutes <= endMin; t += p.slotMinutes) {
      out.push({ startsAt: zonedTimeToUtc(`${d}T${toClock(t)}`, timeZone), minutes: p.slotMinutes, field: 'from' })
    }
    if (out.length > MAX_PATTERN_SLOTS)
      throw fieldError('to', `to: this pattern makes more than ${MAX_PATTERN_SLOTS} slots; open the term in parts.`)
  }
  if (out.length === 0)
    throw fieldError('weekday', `weekday: there is no ${day} between ${p.from} and ${p.to} that is not an exception.`)
  return out
}

/**
 * Opens one slot or a weekly pattern of slots on a stand, all or nothing: under a lock on the stand
 * row (so two requests cannot both find a time free), every planned slot is checked against the
 * stand's open slots, and one refused slot refuses the whole request.
 */
export async function openSlots(
  db: Database,
  e: CourseEnrollment,
  standId: number,
  input: SlotCreate,
  now = new Date(),
): Promise<SlotsCreated> {
  if (!(await sectionOfCourse(db, e.courseId, input.sectionId)))
    throw fieldError('sectionId', 'sectionId: that is not a section of this course.')
  if (!staffActsOn(e, input.sectionId))
    throw new AppError('wrong_section', 'sectionId: a TA opens slots for their own section only.', 403)
  const { timeZone } = await courseBookingSettings(db, e.courseId)
  const planned: PlannedSlot[] =
    input.kind === 'one'
      ? [{ startsAt: zonedTimeToUtc(`${input.date}T${input.start}`, timeZone), minutes: input.minutes, field: 'date' }]
      : planPattern(input, timeZone)
  const first = planned[0]!
  if (first.startsAt.getTime() <= now.getTime())
    throw new AppError(
      'slot_in_past',
      `${first.field}: ${formatInZone(first.startsAt, timeZone)} is in the past; slots open for times still to come.`,
      400,
      [{ path: first.field, message: 'in the past' }],
    )
  const last = planned[planned.length - 1]!
  const ids = await retryOnLockConflict(() =>
    db.transaction(async (tx) => {
      if (!(await findStand(tx, e.courseId, standId, true))) throw notFound('That stand')
      const open = await overlappingSlots(
        tx,
        standId,
        new Date(first.startsAt.getTime() - MAX_SLOT_MINUTES * 60_000),
        new Date(last.startsAt.getTime() + last.minutes * 60_000),
      )
      for (const s of planned) {
        const end = s.startsAt.getTime() + s.minutes * 60_000
        const clash = open.find(
          (o) => o.startsAt.getTime() < end && o.startsAt.getTime() + o.minutes * 60_000 > s.startsAt.getTime(),
        )
        if (clash)
          throw new AppError(
            'slot_overlap',
            `The slot at ${formatInZone(s.startsAt, timeZone)} overlaps slot ${clash.id} of this stand (${whenText(clash.startsAt, clash.minutes, timeZone)}); nothing was opened.`,
            409,
            { slotStartsAt: s.startsAt.toISOString(), clashingSlotId: clash.id },
          )
      }
      const sameStart = await slotsStartingAt(
        tx,
        standId,
        planned.map((s) => s.startsAt),
      )
      if (sameStart[0])
        throw new AppError(
          'slot_overlap',
          `A cancelled slot of this stand (slot ${sameStart[0].id}) already starts at ${formatInZone(sameStart[0].startsAt, timeZone)}; choose another start time. Nothing was opened.`,
          409,
          { clashingSlotId: sameStart[0].id },
        )
      return insertSlots(
        tx,
        planned.map((s) => ({
          standId,
          sectionId: input.sectionId,
          startsAt: s.startsAt,
          minutes: s.minutes,
          createdBy: e.userId,
        })),
      )
    }),
  )
  return {
    created: ids.length,
    slots: ids.map((id, i) => ({ id, startsAt: planned[i]!.startsAt.toISOString(), minutes: planned[i]!.minutes })),
  }
}

const DAY = 86_400_000

/**
 * Slots from `from` to `to` (dates in the course's zone; default: today and the next 15 weeks), as the
 * caller may see them: students their group's section only, TAs their section, instructors all.
 */
export async function slotList(db: Database, e: CourseEnrollment, q: SlotsQuery, now = new Date()): Promise<SlotList> {
  const settings = await courseBookingSettings(db, e.courseId)
  const tz = settings.timeZone
  const today = new Intl.DateTimeFormat('en-CA', { timeZone: tz }).format(now)
  const fromDate = q.from ?? today
  const from = zonedTimeToUtc(`${fromDate}T00:00`, tz)
  const to = q.to ? zonedTimeToUtc(`${addDay(q.to)}T00:00`, tz) : new Date(from.getTime() + 105 * DAY)
  if (to.getTime() - from.getTime() > 400 * DAY) throw fieldError('to', 'to: show at most a year of slots at once.')

  const group = e.role === 'student' ? await studentGroup(db, e) : null
  const section = e.role === 'student' ? (group?.sectionId ?? e.sectionId) : staffSection(e)
  const empty = section === null
  const rows = empty ? [] : await listSlots(db, e.courseId, from, to, section)
  const slotIds = rows.map((r) => r.id)
  const active = await listBookings(db, e.courseId, { slotIds, activeOnly: true })
  const bySlot = new Map(active.map((b) => [b.slotId, b]))
  const waits = await waitlistsOf(db, slotIds)
  const allowed = await standModuleIds(db, [...new Set(rows.map((r) => r.standId))])
  const isStaff = e.role !== 'student'

  const slots: SlotView[] = rows.map((r) => {
    const b = bySlot.get(r.id)
    const mine = !!b && !!group && b.labGroupId === group.id
    const list = waits.get(r.id) ?? []
    const place = group ? list.findIndex((w) => w.labGroupId === group.id) : -1
    return {
      id: r.id,
      stand: { id: r.standId, name: r.standName, location: r.standLocation },
      section: { id: r.sectionId, name: r.sectionName },
      startsAt: r.startsAt.toISOString(),
      minutes: r.minutes,
      cancelled: r.cancelledAt !== null,
      cancelReason: r.cancelReason,
      state: r.cancelledAt ? 'cancelled' : mine ? 'mine' : b ? 'taken' : 'free',
      booking:
        b && (isStaff || mine)
          ? {
              id: b.id,
              labGroup: { id: b.labGroupId, name: b.labGroupName },
              module: { id: b.moduleId, title: b.moduleTitle },
            }
          : null,
      myWaitPlace: place >= 0 ? place + 1 : null,
      waiting: isStaff ? list.length : 0,
      moduleIds: allowed.get(r.standId) ?? [],
    }
  })

  const sheets = (await listSheets(db, e.courseId)).filter((s) => s.status === 'published' && s.standRuns > 0)
  const counts = group ? await activeCountsByModule(db, group.id) : new Map<number, number>()
  return {
    from: from.toISOString(),
    to: to.toISOString(),
    timeZone: tz,
    cutoffHours: settings.cutoffHours,
    slots,
    labGroup: group ? { id: group.id, name: group.name } : null,
    sheets: sheets.map((s) => ({ id: s.id, title: s.title, standRuns: s.standRuns, booked: counts.get(s.id) ?? 0 })),
  }
}

export async function changeBookingSettings(
  db: Database,
  e: CourseEnrollment,
  input: BookingSettings,
): Promise<BookingSettings> {
  await setBookingCutoff(db, e.courseId, input.cutoffHours)
  return { cutoffHours: (await courseBookingSettings(db, e.courseId)).cutoffHours }
}

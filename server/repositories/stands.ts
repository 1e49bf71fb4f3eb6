import { and, asc, eq, gt, gte, inArray, isNull, lt, ne, sql } from 'drizzle-orm'
import type { Executor } from '../db/client'
import { courses, moduleVersions, modules, sections, standModules, standSlots, stands } from '../db/schema'

export interface StandRow {
  id: number
  courseId: number
  name: string
  location: string
  maxPressureNote: string
}

export interface SlotRow {
  id: number
  standId: number
  sectionId: number
  startsAt: Date
  minutes: number
  cancelledAt: Date | null
  cancelReason: string | null
}

/** A lab sheet as booking needs it: issued or not, and its published front matter's stand runs. */
export interface StandSheetRow {
  id: number
  title: string
  status: 'draft' | 'published' | 'closed'
  standRuns: number
}

const standCols = {
  id: stands.id,
  courseId: stands.courseId,
  name: stands.name,
  location: stands.location,
  maxPressureNote: stands.maxPressureNote,
}

const slotCols = {
  id: standSlots.id,
  standId: standSlots.standId,
  sectionId: standSlots.sectionId,
  startsAt: standSlots.startsAt,
  minutes: standSlots.minutes,
  cancelledAt: standSlots.cancelledAt,
  cancelReason: standSlots.cancelReason,
}

export async function listStands(db: Executor, courseId: number): Promise<StandRow[]> {
  return db.select(standCols).from(stands).where(eq(stands.courseId, courseId)).orderBy(asc(stands.name))
}

/** A stand of this course (null when the id is another course's or unknown); `forUpdate` locks its row. */
export async function findStand(
  db: Executor,
  courseId: number,
  standId: number,
  forUpdate = false,
): Promise<StandRow | null> {
  const q = db
    .select(standCols)
    .from(stands)
    .where(and(eq(stands.id, standId), eq(stands.courseId, courseId)))
    .limit(1)
  const rows = forUpdate ? await q.for('update') : await q
  return rows[0] ?? null
}

export async function standNameTaken(db: Executor, courseId: number, name: string, exceptId?: number) {
  const rows = await db
    .select({ id: stands.id })
    .from(stands)
    .where(and(eq(stands.courseId, courseId), eq(stands.name, name), exceptId ? ne(stands.id, exceptId) : undefined))
    .limit(1)
  return rows.length > 0
}

export async function insertStand(
  db: Executor,
  v: { courseId: number; name: string; location: string; maxPressureNote: string },
): Promise<number> {
  const [row] = await db.insert(stands).values(v).$returningId()
  return row!.id
}

export async function updateStand(
  db: Executor,
  standId: number,
  v: { name?: string; location?: string; maxPressureNote?: string },
): Promise<void> {
  if (Object.keys(v).length === 0) return
  await db.update(stands).set(v).where(eq(stands.id, standId))
}

/** Replaces the sheets allowed on a stand. */
export async function setStandModules(db: Executor, standId: number, moduleIds: number[]): Promise<void> {
  await db.delete(standModules).where(eq(standModules.standId, standId))
  if (moduleIds.length > 0) await db.insert(standModules).values(moduleIds.map((moduleId) => ({ standId, moduleId })))
}

/** The allowed sheet ids of each stand. */
export async function standModuleIds(db: Executor, standIds: number[]): Promise<Map<number, number[]>> {
  const out = new Map<number, number[]>()
  if (standIds.length === 0) return out
  const rows = await db
    .select({ standId: standModules.standId, moduleId: standModules.moduleId })
    .from(standModules)
    .where(inArray(standModules.standId, standIds))
    .orderBy(asc(standModules.moduleId))
  for (const r of rows) out.set(r.standId, [...(out.get(r.standId) ?? []), r.moduleId])
  return out
}

export async function standAllows(db: Executor, standId: number, moduleId: number): Promise<boolean> {
  const rows = await db
    .select({ m: standModules.moduleId })
    .from(standModules)
    .where(and(eq(standModules.standId, standId), eq(standModules.moduleId, moduleId)))
    .limit(1)
  return rows.length > 0
}

/**
 * The course's sheets with the title and stand runs of the version the class sees (the published
 * one; the current draft for a sheet never issued).
 */
export async function listSheets(db: Executor, courseId: number, ids?: number[]): Promise<StandSheetRow[]> {
  if (ids && ids.length === 0) return []
  const rows = await db
    .select({
      id: modules.id,
      status: modules.status,
      title: moduleVersions.title,
      frontMatter: moduleVersions.frontMatter,
    })
    .from(modules)
    .innerJoin(
      moduleVersions,
      eq(moduleVersions.id, sql`COALESCE(${modules.publishedVersionId}, ${modules.currentVersionId})`),
    )
    .where(and(eq(modules.courseId, courseId), ids ? inArray(modules.id, ids) : undefined))
    .orderBy(asc(modules.position), asc(modules.id))
  return rows.map((r) => {
    const runs = (r.frontMatter as { standRuns?: unknown } | null)?.standRuns
    return { id: r.id, title: r.title, status: r.status, standRuns: typeof runs === 'number' ? runs : 0 }
  })
}

export async function listSections(db: Executor, courseId: number): Promise<{ id: number; name: string }[]> {
  return db
    .select({ id: sections.id, name: sections.name })
    .from(sections)
    .where(eq(sections.courseId, courseId))
    .orderBy(asc(sections.name))
}

export async function courseBookingSettings(
  db: Executor,
  courseId: number,
): Promise<{ cutoffHours: number; timeZone: string; code: string; slug: string }> {
  const [row] = await db
    .select({
      cutoffHours: courses.bookingCutoffHours,
      timeZone: courses.timeZone,
      code: courses.code,
      slug: sql<string>`${courses.slug}`,
    })
    .from(courses)
    .where(eq(courses.id, courseId))
  if (!row) throw new Error(`course ${courseId} not found`)
  return row
}

export async function setBookingCutoff(db: Executor, courseId: number, hours: number): Promise<void> {
  await db.update(courses).set({ bookingCutoffHours: hours }).where(eq(courses.id, courseId))
}

/**
 * The stand's slots (cancelled ones too) that overlap [start, end): a slot overlaps when it starts
 * before `end` and ends after `start`. Cancelled slots do not count.
 */
export async function overlappingSlots(db: Executor, standId: number, start: Date, end: Date): Promise<SlotRow[]> {
  return db
    .select(slotCols)
    .from(standSlots)
    .where(
      and(
        eq(standSlots.standId, standId),
        isNull(standSlots.cancelledAt),
        lt(standSlots.startsAt, end),
        gt(sql`${standSlots.startsAt} + INTERVAL ${standSlots.minutes} MINUTE`, start),
      ),
    )
    .orderBy(asc(standSlots.startsAt))
}

export async function insertSlots(
  db: Executor,
  rows: { standId: number; sectionId: number; startsAt: Date; minutes: number; createdBy: number }[],
): Promise<number[]> {
  if (rows.length === 0) return []
  const ids = await db.insert(standSlots).values(rows).$returningId()
  return ids.map((r) => r.id)
}

/** A slot of a stand of this course; `forUpdate` locks its row (serialises bookings of it). */
export async function findSlot(
  db: Executor,
  courseId: number,
  slotId: number,
  forUpdate = false,
): Promise<(SlotRow & { standName: string; standLocation: string }) | null> {
  const q = db
    .select({ ...slotCols, standName: stands.name, standLocation: stands.location })
    .from(standSlots)
    .innerJoin(stands, eq(stands.id, standSlots.standId))
    .where(and(eq(standSlots.id, slotId), eq(stands.courseId, courseId)))
    .limit(1)
  const rows = forUpdate ? await q.for('update') : await q
  return rows[0] ?? null
}

/** Locks slot rows in id order (so two transactions never wait on each other in a circle). */
export async function lockSlots(db: Executor, slotIds: number[]): Promise<void> {
  const ids = [...new Set(slotIds)].sort((a, b) => a - b)
  for (const id of ids)
    await db.select({ id: standSlots.id }).from(standSlots).where(eq(standSlots.id, id)).for('update')
}

export async function cancelSlotRow(db: Executor, slotId: number, reason: string): Promise<void> {
  await db
    .update(standSlots)
    .set({ cancelledAt: sql`CURRENT_TIMESTAMP(3)`, cancelReason: reason })
    .where(eq(standSlots.id, slotId))
}

export interface SlotListRow extends SlotRow {
  standName: string
  standLocation: string
  sectionName: string
}

/** Slots of the course starting in [from, to), optionally of one section only. */
export async function listSlots(
  db: Executor,
  courseId: number,
  from: Date,
  to: Date,
  sectionId?: number,
): Promise<SlotListRow[]> {
  return db
    .select({ ...slotCols, standName: stands.name, standLocation: stands.location, sectionName: sections.name })
    .from(standSlots)
    .innerJoin(stands, eq(stands.id, standSlots.standId))
    .innerJoin(sections, eq(sections.id, standSlots.sectionId))
    .where(
      and(
        eq(stands.courseId, courseId),
        gte(standSlots.startsAt, from),
        lt(standSlots.startsAt, to),
        sectionId !== undefined ? eq(standSlots.sectionId, sectionId) : undefined,
      ),
    )
    .orderBy(asc(standSlots.startsAt), asc(stands.name))
}

export async function sectionOfCourse(db: Executor, courseId: number, sectionId: number): Promise<boolean> {
  const rows = await db
    .select({ id: sections.id })
    .from(sections)
    .where(and(eq(sections.id, sectionId), eq(sections.courseId, courseId)))
    .limit(1)
  return rows.length > 0
}

/** Slots of the stand (cancelled ones too) that start at one of these instants: the unique key refuses a second. */
export async function slotsStartingAt(db: Executor, standId: number, starts: Date[]): Promise<SlotRow[]> {
  if (starts.length === 0) return []
  return db
    .select(slotCols)
    .from(standSlots)
    .where(and(eq(standSlots.standId, standId), inArray(standSlots.startsAt, starts)))
    .orderBy(asc(standSlots.startsAt))
}

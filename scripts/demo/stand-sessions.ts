import { and, eq, inArray } from 'drizzle-orm'
import type { Transaction } from '../../server/db/client'
import {
  bookings,
  enrollments,
  labGroups,
  moduleVersions,
  modules,
  runEntries,
  runPeople,
  runRecords,
  sections,
  standModules,
  standSlots,
  stands,
  submissions,
  users,
} from '../../server/db/schema'
import type { ChecklistItem } from '../../shared/modules/stand-schema'
import { addDays } from '../../shared/schemas/stand-week'
import { zonedTimeToUtc } from '../../shared/time'
import { DEMO_COURSE, DEMO_GROUP_WITHOUT_HAND_IN, DEMO_INSTRUCTOR, DEMO_SECTIONS } from './scenario'

// The demo course's stand week: two invented stands, a term of 30-minute slots in each section's lab
// hours, the runs behind the seeded hand-ins (booked, walked through the checklist and signed off),
// and a few bookings still to come. Written straight into the tables, as the seeded hand-ins are
// made before any page exists to book them.

/** The demo's two stands (invented names and places). */
export const DEMO_STANDS = [
  {
    name: 'Blow-down stand 1',
    location: 'Test Bay 2, north wall',
    maxPressureNote: 'Receiver marked 1000 kPa gauge; demo runs charge to about 750 kPa',
    // The jet photographs are taken here too: the schlieren bench stands beside this stand.
    sheets: ['cold-flow-characterisation', 'reading-the-jet'],
  },
  {
    name: 'Combustor cell',
    location: 'Test Bay 2, hot-fire cell behind the blast wall',
    maxPressureNote: 'Receiver marked 1000 kPa gauge; fuel bottle regulator set by staff only',
    sheets: ['cold-flow-characterisation', 'hot-fire'],
  },
] as const

/** Each section's lab hours: the weekday (0 = Monday), the first slot's local start and how many 30-minute slots. */
const LAB_HOURS: Record<(typeof DEMO_SECTIONS)[number]['name'], { weekday: number; first: string; slots: number }> = {
  'Section A': { weekday: 1, first: '13:00', slots: 6 },
  'Section B': { weekday: 3, first: '09:00', slots: 6 },
}
const SLOT_MINUTES = 30
/** The term of slots: from three weeks before the week of seeding to eight weeks after it. */
const WEEKS_BEFORE = 3
const WEEKS_AFTER = 8

/** The one run that did not go to plan; the group ran again later the same afternoon. */
export const DEMO_ABORTED_RUN = {
  group: 'A2',
  sheet: 'cold-flow-characterisation',
  reason:
    'The receiver regulator did not hold its set point during the blow-down; the run was stopped from behind the barrier and the receiver vented before anyone approached.',
} as const

type DemoSheet = 'cold-flow-characterisation' | 'hot-fire' | 'reading-the-jet'

/** Which week (relative to the week of seeding) and slot each group's run of a sheet took place in. */
const PAST_RUNS: { sheet: DemoSheet; week: number; stand: number }[] = [
  { sheet: 'cold-flow-characterisation', week: -2, stand: 0 },
  { sheet: 'hot-fire', week: -1, stand: 1 },
]

/** Bookings still to come (the group without seeded hand-ins): the week panel and reminders show them. */
const UPCOMING: { group: string; sheet: DemoSheet; week: number; slot: number; stand: number }[] = [
  { group: DEMO_GROUP_WITHOUT_HAND_IN, sheet: 'cold-flow-characterisation', week: 1, slot: 1, stand: 0 },
  { group: DEMO_GROUP_WITHOUT_HAND_IN, sheet: 'hot-fire', week: 2, slot: 2, stand: 1 },
]

const MINUTE = 60_000

/** The Monday (YYYY-MM-DD) of the week holding `now` in the course's zone. */
function mondayOfWeek(now: Date, timeZone: string): string {
  const today = new Intl.DateTimeFormat('en-CA', {
    timeZone,
    year: 'numeric',
    month: '2-digit',
    day: '2-digit',
  }).format(now)
  const weekday = new Date(`${today}T00:00:00Z`).getUTCDay()
  return addDays(today, -((weekday + 6) % 7))
}

/** The local start "HH:mm" plus `slot` half hours. */
function slotTime(first: string, slot: number): string {
  const [h, m] = first.split(':').map(Number) as [number, number]
  const total = h * 60 + m + slot * SLOT_MINUTES
  return `${String(Math.floor(total / 60)).padStart(2, '0')}:${String(total % 60).padStart(2, '0')}`
}

/** The signed-off, completed run of each lab group and sheet: the run its hand-in is made against. */
export interface DemoRunLink {
  labGroupId: number
  moduleId: number
  runId: number
}

/**
 * Adds the stand sessions to the demo course, once: nothing happens (and no runs are returned) when
 * the course has stands already. Runs before the seeded hand-ins are made, as at a real stand;
 * {@link linkHandInsToRuns} then points each hand-in at its run.
 */
export async function seedStandSessions(tx: Transaction, courseId: number, now = new Date()): Promise<DemoRunLink[]> {
  const have = await tx.select({ id: stands.id }).from(stands).where(eq(stands.courseId, courseId)).limit(1)
  if (have.length > 0) return []
  const links: DemoRunLink[] = []

  const sheetRows = await tx
    .select({
      id: modules.id,
      slug: modules.slug,
      versionId: modules.publishedVersionId,
      fm: moduleVersions.frontMatter,
    })
    .from(modules)
    .innerJoin(moduleVersions, eq(moduleVersions.id, modules.publishedVersionId))
    .where(
      and(
        eq(modules.courseId, courseId),
        inArray(modules.slug, ['cold-flow-characterisation', 'hot-fire', 'reading-the-jet']),
      ),
    )
  const sheets = new Map(
    sheetRows.map((r) => [
      r.slug as DemoSheet,
      {
        id: r.id,
        versionId: r.versionId!,
        checklist: ((r.fm as { checklist?: ChecklistItem[] } | null)?.checklist ?? []) as ChecklistItem[],
      },
    ]),
  )

  // Stands and the sheets each may run.
  const standIds: number[] = []
  for (const s of DEMO_STANDS) {
    const [row] = await tx
      .insert(stands)
      .values({ courseId, name: s.name, location: s.location, maxPressureNote: s.maxPressureNote })
      .$returningId()
    standIds.push(row!.id)
    const allowed = s.sheets.flatMap((slug) => {
      const sheet = sheets.get(slug)
      return sheet ? [{ standId: row!.id, moduleId: sheet.id }] : []
    })
    if (allowed.length) await tx.insert(standModules).values(allowed)
  }

  // People: the instructor, each section's TA, each group and its members.
  const emails = [DEMO_INSTRUCTOR.email, ...DEMO_SECTIONS.map((s) => s.ta.email)]
  const staffRows = await tx
    .select({ id: users.id, email: users.email })
    .from(users)
    .where(inArray(users.email, emails))
  const staffId = new Map(staffRows.map((r) => [r.email, r.id]))
  const instructorId = staffId.get(DEMO_INSTRUCTOR.email)!
  const sectionRows = await tx
    .select({ id: sections.id, name: sections.name })
    .from(sections)
    .where(eq(sections.courseId, courseId))
  const sectionId = new Map(sectionRows.map((r) => [r.name, r.id]))
  const groupRows = await tx
    .select({ id: labGroups.id, name: labGroups.name, sectionId: labGroups.sectionId })
    .from(labGroups)
    .where(eq(labGroups.courseId, courseId))
  const memberRows = await tx
    .select({ userId: enrollments.userId, labGroupId: enrollments.labGroupId })
    .from(enrollments)
    .where(and(eq(enrollments.courseId, courseId), eq(enrollments.role, 'student')))

  // A term of slots: every lab afternoon or morning, on both stands.
  const monday = mondayOfWeek(now, DEMO_COURSE.timeZone)
  /** slot id by section, week, stand and slot number. */
  const slotIds = new Map<string, { id: number; startsAt: Date }>()
  const key = (section: string, week: number, stand: number, slot: number) => `${section}|${week}|${stand}|${slot}`
  for (const section of DEMO_SECTIONS) {
    const hours = LAB_HOURS[section.name]
    const sid = sectionId.get(section.name)
    if (sid === undefined) continue
    const rows: { standId: number; sectionId: number; startsAt: Date; minutes: number; createdBy: number }[] = []
    const keys: string[] = []
    for (let week = -WEEKS_BEFORE; week <= WEEKS_AFTER; week++) {
      const day = addDays(monday, week * 7 + hours.weekday)
      for (const [stand, standId] of standIds.entries()) {
        for (let slot = 0; slot < hours.slots; slot++) {
          const startsAt = zonedTimeToUtc(`${day}T${slotTime(hours.first, slot)}`, DEMO_COURSE.timeZone)
          rows.push({ standId, sectionId: sid, startsAt, minutes: SLOT_MINUTES, createdBy: instructorId })
          keys.push(key(section.name, week, stand, slot))
        }
      }
    }
    const ids = await tx.insert(standSlots).values(rows).$returningId()
    ids.forEach((r, i) => slotIds.set(keys[i]!, { id: r.id, startsAt: rows[i]!.startsAt }))
  }

  const book = async (groupId: number, sheet: DemoSheet, slotKey: string, bookedBy: number | null) => {
    const slot = slotIds.get(slotKey)
    const s = sheets.get(sheet)
    if (!slot || !s) return null
    const [row] = await tx
      .insert(bookings)
      .values({ slotId: slot.id, labGroupId: groupId, moduleId: s.id, bookedBy })
      .$returningId()
    return { bookingId: row!.id, startsAt: slot.startsAt }
  }

  /** Opens the run at the stand, ticks every item, and signs it off as the section's TA. */
  const signedRun = async (
    booking: { bookingId: number; startsAt: Date },
    sheet: DemoSheet,
    taId: number,
    people: number[],
    outcome: { kind: 'completed' } | { kind: 'aborted'; reason: string },
  ) => {
    const s = sheets.get(sheet)!
    const at = (minutes: number) => new Date(booking.startsAt.getTime() + minutes * MINUTE)
    const [run] = await tx
      .insert(runRecords)
      .values({
        courseId,
        bookingId: booking.bookingId,
        moduleVersionId: s.versionId,
        checklist: s.checklist,
        openedBy: taId,
        openedAt: at(1),
        startedAt: at(12),
        endedAt: at(outcome.kind === 'completed' ? 16 : 13),
        outcome: outcome.kind,
        outcomeReason: outcome.kind === 'aborted' ? outcome.reason : null,
        notes:
          outcome.kind === 'completed'
            ? 'Demo run: went to plan. Receiver vented and the stand left safe.'
            : 'Demo run: stopped early; regulator to be serviced before the next run.',
        signedOffBy: taId,
        signedOffAt: at(outcome.kind === 'completed' ? 20 : 18),
      })
      .$returningId()
    const runId = run!.id
    const ticks = s.checklist.map((item, i) => ({
      runId,
      kind: 'tick' as const,
      itemKey: item.key,
      byUserId: item.staff ? taId : (people[0] ?? taId),
      at: at(2 + i),
    }))
    await tx
      .insert(runEntries)
      .values([
        ...ticks,
        { runId, kind: 'sign-off' as const, byUserId: taId, at: at(outcome.kind === 'completed' ? 20 : 18) },
      ])
    await tx.insert(runPeople).values([...new Set([taId, ...people])].map((userId) => ({ runId, userId })))
    return runId
  }

  // The runs behind the seeded hand-ins: one per group and sheet (the aborted group twice).
  for (const g of groupRows) {
    const label = g.name.replace(/^Group /, '')
    if (label === DEMO_GROUP_WITHOUT_HAND_IN) continue
    const section = DEMO_SECTIONS.find((s) => sectionId.get(s.name) === g.sectionId)
    if (!section) continue
    const taId = staffId.get(section.ta.email)!
    const people = memberRows.filter((m) => m.labGroupId === g.id).map((m) => m.userId)
    // Groups take the slots in turn: group 1 the first slot, group 2 the second, and so on.
    const turn = Number(label.slice(1)) - 1
    for (const past of PAST_RUNS) {
      let slot = turn
      if (DEMO_ABORTED_RUN.group === label && DEMO_ABORTED_RUN.sheet === past.sheet) {
        const first = await book(g.id, past.sheet, key(section.name, past.week, past.stand, slot), people[0] ?? null)
        if (first)
          await signedRun(first, past.sheet, taId, people, { kind: 'aborted', reason: DEMO_ABORTED_RUN.reason })
        // Run again in the afternoon's last free slot.
        slot = LAB_HOURS[section.name].slots - 1
      }
      const booking = await book(g.id, past.sheet, key(section.name, past.week, past.stand, slot), people[0] ?? null)
      if (!booking) continue
      const runId = await signedRun(booking, past.sheet, taId, people, { kind: 'completed' })
      links.push({ labGroupId: g.id, moduleId: sheets.get(past.sheet)!.id, runId })
    }
  }

  // Bookings still to come.
  for (const u of UPCOMING) {
    const g = groupRows.find((r) => r.name === `Group ${u.group}`)
    const section = DEMO_SECTIONS.find((s) => sectionId.get(s.name) === g?.sectionId)
    if (!g || !section) continue
    const member = memberRows.find((m) => m.labGroupId === g.id)
    await book(g.id, u.sheet, key(section.name, u.week, u.stand, u.slot), member?.userId ?? null)
  }
  return links
}

/** Points each lab group's hand-ins of a stand sheet at the run they were made against. */
export async function linkHandInsToRuns(tx: Transaction, links: DemoRunLink[]): Promise<void> {
  for (const l of links) {
    await tx
      .update(submissions)
      .set({ runRecordId: l.runId })
      .where(and(eq(submissions.labGroupId, l.labGroupId), eq(submissions.moduleId, l.moduleId)))
  }
}

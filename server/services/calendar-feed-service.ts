import { createHash, randomBytes } from 'node:crypto'
import ical from 'ical-generator'
import type { CalendarFeedCreated, CalendarFeedStatus } from '../../shared/schemas/calendar-feed'
import { CalendarTokenSchema } from '../../shared/schemas/calendar-feed'
import type { Database } from '../db/client'
import { notFound } from '../errors'
import type { FeedCourse } from '../repositories/calendar-feeds'
import { listGroupBookings, listSlotSessions } from '../repositories/stand-calendar'
import type { SlotScope } from '../repositories/stand-calendar'
import {
  deleteCalendarToken,
  findCalendarToken,
  findUserByCalendarHash,
  listExtensionsOf,
  listFeedCourses,
  listIssuedSheetsWithDue,
  replaceCalendarToken,
} from '../repositories/calendar-feeds'

/**
 * Personal calendar feeds (iCalendar, RFC 5545). The address carries a random token that is the
 * only credential (calendar apps fetch without a session); only its SHA-256 is stored.
 */

const hashToken = (token: string) => createHash('sha256').update(token).digest('hex')

export const feedUrl = (appUrl: string, token: string) => `${appUrl.replace(/\/$/, '')}/api/calendar/${token}.ics`

/** Makes the person's feed address, replacing any earlier one (which stops working at once). */
export async function makeCalendarFeed(db: Database, userId: number, appUrl: string): Promise<CalendarFeedCreated> {
  // 32 random bytes: far beyond guessing, and 43 characters in base64url.
  const token = randomBytes(32).toString('base64url')
  await replaceCalendarToken(db, userId, hashToken(token))
  return { url: feedUrl(appUrl, token) }
}

export async function calendarFeedStatus(db: Database, userId: number): Promise<CalendarFeedStatus> {
  const row = await findCalendarToken(db, userId)
  return { active: row !== null, createdAt: row ? row.createdAt.toISOString() : null }
}

export async function turnOffCalendarFeed(db: Database, userId: number): Promise<void> {
  await deleteCalendarToken(db, userId)
}

/** One entry in a feed. Every kind of event (due dates, bookings, stand sessions) becomes one of these. */
export interface FeedEvent {
  /** Stable across fetches, so a calendar app updates the entry instead of adding a second one. */
  uid: string
  summary: string
  start: Date
  /** A span's end; none for a moment such as a due date. */
  end?: Date
  location?: string
  description: string
  url: string
}

interface FeedContext {
  db: Database
  userId: number
  appUrl: string
  courses: FeedCourse[]
}

/** The due time in the course's zone, in words, for the event's description. */
function localTime(at: Date, timeZone: string): string {
  const text = new Intl.DateTimeFormat('en-GB', { timeZone, dateStyle: 'full', timeStyle: 'short' }).format(at)
  return `${text} (${timeZone})`
}

/**
 * Due dates of issued sheets: a student's own (an extended date where they have one), and for staff
 * the class's due dates of the courses they teach. Three queries in all, however many sheets.
 */
async function dueDateEvents({ db, userId, appUrl, courses }: FeedContext): Promise<FeedEvent[]> {
  const byId = new Map(courses.map((c) => [c.courseId, c]))
  const sheets = await listIssuedSheetsWithDue(db, [...byId.keys()])
  const studentSheets = sheets.filter((s) => byId.get(s.courseId)?.role === 'student').map((s) => s.moduleId)
  const extended = await listExtensionsOf(db, userId, studentSheets)
  const base = appUrl.replace(/\/$/, '')
  return sheets.flatMap((s) => {
    const course = byId.get(s.courseId)
    if (!course) return []
    const ext = course.role === 'student' ? extended.get(s.moduleId) : undefined
    const due = ext ?? s.dueAt
    return [
      {
        uid: `due-${s.moduleId}-${userId}@isentrope`,
        summary: `${course.code}: ${s.title} due`,
        start: due,
        description: `Due ${localTime(due, course.timeZone)}.` + (ext ? ' This is your extended due date.' : ''),
        url: `${base}/c/${course.slug}/sheets/${s.slug}`,
      },
    ]
  })
}

/** A slot's span in the course's zone, in words: "Tuesday 2 March 2027, 13:00–13:30 (America/Denver)". */
export function localSpan(start: Date, end: Date, timeZone: string): string {
  // Put together from parts: how a locale punctuates a full date differs between ICU versions.
  const parts = new Intl.DateTimeFormat('en-GB', {
    timeZone,
    weekday: 'long',
    day: 'numeric',
    month: 'long',
    year: 'numeric',
  }).formatToParts(start)
  const part = (type: Intl.DateTimeFormatPartTypes) => parts.find((p) => p.type === type)?.value ?? ''
  const time = new Intl.DateTimeFormat('en-GB', { timeZone, hour: '2-digit', minute: '2-digit', hourCycle: 'h23' })
  return `${part('weekday')} ${part('day')} ${part('month')} ${part('year')}, ${time.format(start)}–${time.format(end)} (${timeZone})`
}

const minutesAfter = (start: Date, minutes: number) => new Date(start.getTime() + minutes * 60_000)
const place = (stand: string, location: string) => (location ? `${stand}, ${location}` : stand)

/** A student's own lab group's active bookings (cancelled or moved ones and cancelled slots drop out). */
async function bookingEvents({ db, userId, appUrl, courses }: FeedContext): Promise<FeedEvent[]> {
  const mine = courses.filter((c) => c.role === 'student' && c.labGroupId !== null)
  const byCourse = new Map(mine.map((c) => [c.courseId, c]))
  const rows = await listGroupBookings(
    db,
    mine.map((c) => c.labGroupId!),
  )
  const base = appUrl.replace(/\/$/, '')
  return rows.flatMap((b) => {
    const course = byCourse.get(b.courseId)
    if (!course) return []
    const end = minutesAfter(b.startsAt, b.minutes)
    return [
      {
        uid: `stand-booking-${b.bookingId}-${userId}@isentrope`,
        summary: `${course.code}: ${b.sheetTitle} at ${b.standName}`,
        start: b.startsAt,
        end,
        location: place(b.standName, b.location),
        description:
          `${b.groupName} has ${place(b.standName, b.location)} booked for ${b.sheetTitle}, ` +
          `${localSpan(b.startsAt, end, course.timeZone)}.`,
        url: `${base}/c/${course.slug}/stand-time`,
      },
    ]
  })
}

/** For staff: every slot that is not cancelled of their section (a TA) or course (an instructor), with who holds it. */
async function sessionEvents({ db, userId, appUrl, courses }: FeedContext): Promise<FeedEvent[]> {
  const scopes = courses.flatMap((c): SlotScope[] =>
    c.role === 'instructor'
      ? [{ courseId: c.courseId, sectionId: null }]
      : c.role === 'ta' && c.sectionId !== null
        ? [{ courseId: c.courseId, sectionId: c.sectionId }]
        : [],
  )
  const byCourse = new Map(courses.map((c) => [c.courseId, c]))
  const rows = await listSlotSessions(db, scopes)
  const base = appUrl.replace(/\/$/, '')
  return rows.flatMap((s) => {
    const course = byCourse.get(s.courseId)
    if (!course) return []
    const end = minutesAfter(s.startsAt, s.minutes)
    const who = s.groupName ? `${s.groupName} (${s.sheetTitle})` : 'not booked'
    return [
      {
        uid: `stand-slot-${s.slotId}-${userId}@isentrope`,
        summary: `${course.code} ${s.sectionName}: ${s.standName}, ${who}`,
        start: s.startsAt,
        end,
        location: place(s.standName, s.location),
        description:
          `Stand session of ${s.sectionName} at ${place(s.standName, s.location)}, ` +
          `${localSpan(s.startsAt, end, course.timeZone)}. ` +
          (s.groupName ? `Booked by ${s.groupName} for ${s.sheetTitle}.` : 'No group has booked it yet.'),
        url: s.bookingId ? `${base}/c/${course.slug}/stand-time/${s.bookingId}` : `${base}/c/${course.slug}/stand-time`,
      },
    ]
  })
}

/** Where each kind of event comes from; a new kind is one more entry here. */
const EVENT_SOURCES: ((ctx: FeedContext) => Promise<FeedEvent[]>)[] = [dueDateEvents, bookingEvents, sessionEvents]

/**
 * The feed of the person whose token this is, as iCalendar text. An unknown or malformed token gets
 * the same 404 (no hint whether it ever existed); a malformed one never reaches the database.
 */
export async function calendarFeed(db: Database, token: string, appUrl: string): Promise<string> {
  const parsed = CalendarTokenSchema.safeParse(token)
  const userId = parsed.success ? await findUserByCalendarHash(db, hashToken(parsed.data)) : null
  if (userId === null) throw notFound('That calendar')
  // A student's closed course is gone from their view; staff still read it.
  const courses = (await listFeedCourses(db, userId)).filter((c) => !(c.closed && c.role === 'student'))
  const ctx: FeedContext = { db, userId, appUrl, courses }
  const events = (await Promise.all(EVENT_SOURCES.map((source) => source(ctx)))).flat()

  const cal = ical({ name: 'Isentrope', prodId: { company: 'Isentrope', product: 'course-calendar', language: 'EN' } })
  for (const e of events) {
    // A due date is a moment, not a span: DTSTART alone with a date-time value is an event that ends
    // when it starts (RFC 5545 §3.6.1), which calendar apps show as a point at that time. A stand
    // slot is a span with DTEND. Both are written as UTC instants (…Z): that is exact in every app,
    // whereas a TZID would need a VTIMEZONE block for each zone, which none of our packages writes.
    // The course's own zone and local time are given in the description.
    cal.createEvent({
      id: e.uid,
      summary: e.summary,
      start: e.start,
      end: e.end ?? null,
      ...(e.location ? { location: e.location } : {}),
      description: e.description,
      url: e.url,
    })
  }
  return cal.toString()
}

import { createHash, randomBytes } from 'node:crypto'
import ical from 'ical-generator'
import type { CalendarFeedCreated, CalendarFeedStatus } from '../../shared/schemas/calendar-feed'
import { CalendarTokenSchema } from '../../shared/schemas/calendar-feed'
import type { Database } from '../db/client'
import { notFound } from '../errors'
import type { FeedCourse } from '../repositories/calendar-feeds'
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

/** One entry in a feed. Every kind of event (due dates now; bookings and stand sessions later) becomes one of these. */
export interface FeedEvent {
  /** Stable across fetches, so a calendar app updates the entry instead of adding a second one. */
  uid: string
  summary: string
  start: Date
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

/** Where each kind of event comes from; a new kind (bookings, stand sessions) is one more entry here. */
const EVENT_SOURCES: ((ctx: FeedContext) => Promise<FeedEvent[]>)[] = [dueDateEvents]

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
    // when it starts (RFC 5545 §3.6.1), which calendar apps show as a point at that time. It is
    // written as a UTC instant (…Z): that is exact in every app, whereas a TZID would need a
    // VTIMEZONE block for each zone, which none of our packages writes. The course's own zone and
    // local time are given in the description.
    cal.createEvent({
      id: e.uid,
      summary: e.summary,
      start: e.start,
      end: null,
      description: e.description,
      url: e.url,
    })
  }
  return cal.toString()
}

import type { StandWeek, StandWeekQuery } from '../../shared/schemas/stand-week'
import { addDays } from '../../shared/schemas/stand-week'
import { zonedTimeToUtc } from '../../shared/time'
import type { Database } from '../db/client'
import { notFound } from '../errors'
import type { CourseEnrollment } from '../repositories/enrollments'
import { findCourseSummary } from '../repositories/enrollments'
import { listSlotSessions } from '../repositories/stand-calendar'
import type { SlotScope } from '../repositories/stand-calendar'

/** Today's date (YYYY-MM-DD) in a time zone. */
function todayIn(timeZone: string, now: Date): string {
  // en-CA writes dates as YYYY-MM-DD.
  return new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit' }).format(now)
}

/** The Monday on or before a day. */
function mondayOf(day: string): string {
  const weekday = new Date(`${day}T00:00:00Z`).getUTCDay() // 0 = Sunday
  return addDays(day, -((weekday + 6) % 7))
}

/**
 * The stand sessions of one week of a course, as this person may see them: a student their own
 * section's slots, whether some group holds each and which are their own group's (never another
 * group's name); a TA their section's; an instructor the whole course's, with the groups' names.
 */
export async function standWeek(
  db: Database,
  enrollment: CourseEnrollment,
  query: StandWeekQuery,
  now = new Date(),
): Promise<StandWeek> {
  const course = await findCourseSummary(db, enrollment.userId, enrollment.courseId)
  if (!course) throw notFound('That course')
  const start = query.start ?? mondayOf(todayIn(course.timeZone, now))
  const next = addDays(start, 7)
  const range = {
    from: zonedTimeToUtc(`${start}T00:00`, course.timeZone),
    to: zonedTimeToUtc(`${next}T00:00`, course.timeZone),
  }
  const scope: SlotScope | null =
    enrollment.role === 'instructor'
      ? { courseId: enrollment.courseId, sectionId: null }
      : enrollment.sectionId !== null
        ? { courseId: enrollment.courseId, sectionId: enrollment.sectionId }
        : null
  const rows = scope ? await listSlotSessions(db, [scope], range) : []
  const student = enrollment.role === 'student'
  return {
    start,
    next,
    previous: addDays(start, -7),
    timeZone: course.timeZone,
    sessions: rows.map((s) => {
      const mine = student && s.labGroupId !== null && s.labGroupId === enrollment.labGroupId
      const shown = !student || mine
      return {
        slotId: s.slotId,
        startsAt: s.startsAt.toISOString(),
        endsAt: new Date(s.startsAt.getTime() + s.minutes * 60_000).toISOString(),
        standName: s.standName,
        location: s.location,
        sectionName: s.sectionName,
        booked: s.bookingId !== null,
        mine,
        groupName: shown ? s.groupName : null,
        sheetTitle: shown ? s.sheetTitle : null,
      }
    }),
  }
}

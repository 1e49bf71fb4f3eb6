import type { Database } from '../db/client'
import { pageLinks, standReminderMail } from '../mail/templates'
import { enqueueMail } from '../repositories/outbox'
import { listBookingsStartingBetween, listGroupMembers } from '../repositories/stand-calendar'
import { localSpan } from './calendar-feed-service'

const HOUR = 3_600_000

/**
 * The day-before reminders: for each active booking whose slot starts between 24 and 48 hours from
 * `now`, one e-mail to each student of the lab group. The job runs on a timer in every server
 * process; the outbox's unique (dedupe key, recipient) pair makes a second run, or a run in another
 * process, leave the queued message as it is, so each member gets one reminder per booking. A
 * window of a whole day means any timer period under a day finds every booking once.
 * @returns how many messages were offered to the outbox (already queued ones included)
 */
export async function queueStandReminders(db: Database, appUrl: string, now = new Date()): Promise<number> {
  const due = await listBookingsStartingBetween(
    db,
    new Date(now.getTime() + 24 * HOUR),
    new Date(now.getTime() + 48 * HOUR),
  )
  if (due.length === 0) return 0
  const members = await listGroupMembers(db, [...new Set(due.map((b) => b.labGroupId))])
  const mails = due.flatMap((b) =>
    members
      .filter((m) => m.labGroupId === b.labGroupId)
      .map((m) => ({
        dedupeKey: `stand-reminder:${b.bookingId}:${m.userId}`,
        toAddress: m.email,
        toName: m.name,
        ...standReminderMail({
          name: m.name,
          course: { code: b.courseCode, title: b.courseTitle },
          groupName: b.groupName,
          sheetTitle: b.sheetTitle,
          standName: b.standName,
          location: b.location,
          when: localSpan(b.startsAt, new Date(b.startsAt.getTime() + b.minutes * 60_000), b.timeZone),
          link: `${pageLinks(appUrl, b.courseSlug).course}/stand-time`,
        }),
      })),
  )
  await enqueueMail(db, mails)
  return mails.length
}

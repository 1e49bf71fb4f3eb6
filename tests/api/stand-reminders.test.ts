import { and, eq, like } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { courses, enrollments, labGroups, mailOutbox, users } from '../../server/db/schema'
import { createLogger } from '../../server/logger'
import { DEFAULT_OUTBOX_OPTIONS, drainOnce } from '../../server/mail/outbox-worker'
import { createSmtpSender } from '../../server/mail/transport'
import { queueStandReminders } from '../../server/services/stand-reminders'
import type { Fixture, TestContext } from '../helpers/app'
import { seedFixture, signedInAs, startTestApp, uniq } from '../helpers/app'
import { caughtMail, waitForMail } from '../helpers/maildev'
import { createModuleAs, moduleSource, publishAs } from '../helpers/modules'
import { cancelBooking, insertBooking, insertSlot, insertStand } from '../helpers/stand-rows'

// The day-before reminders: one e-mail per member of the group for each booking whose slot starts
// 24 to 48 hours after the job runs, however often and in however many processes it runs.

let ctx: TestContext
let fx: Fixture
let code = ''
const members: { id: number; email: string }[] = []
const booking: Record<'inRange' | 'cancelled' | 'tooSoon' | 'tooLate' | 'slotCancelled', number> = {
  inRange: 0,
  cancelled: 0,
  tooSoon: 0,
  tooLate: 0,
  slotCancelled: 0,
}
/** When the job runs in this file: Monday 1 March 2027, 14:00 MST. */
const NOW = new Date('2027-03-01T21:00:00Z')
const hoursAfterNow = (h: number) => new Date(NOW.getTime() + h * 3_600_000)

beforeAll(async () => {
  ctx = startTestApp()
  fx = await seedFixture(ctx)
  const db = ctx.handle.db
  await db.update(courses).set({ timeZone: 'America/Denver' }).where(eq(courses.id, fx.courseId))
  const [c] = await db.select({ code: courses.code }).from(courses).where(eq(courses.id, fx.courseId))
  code = c!.code
  const inst = await signedInAs(ctx, fx.instructor.email)
  const sheet = await createModuleAs(inst, fx.courseId, moduleSource('Reminder run'))
  await publishAs(inst, fx.courseId, sheet)
  const [g1] = await db
    .select({ id: labGroups.id })
    .from(labGroups)
    .where(and(eq(labGroups.courseId, fx.courseId), eq(labGroups.name, 'G1')))
  // A second member of G1 besides the fixture's student.
  const tag = uniq()
  const email = `partner.${tag}@test.example`
  const [u] = await db
    .insert(users)
    .values({ email, displayName: `Partner ${tag}` })
    .$returningId()
  await db
    .insert(enrollments)
    .values({ userId: u!.id, courseId: fx.courseId, role: 'student', sectionId: fx.sectionA, labGroupId: g1!.id })
  members.push({ id: fx.student.id, email: fx.student.email }, { id: u!.id, email })

  const standId = await insertStand(db, fx.courseId, 'Stand R', 'North annex, cell 3')
  const slotAt = async (hours: number, cancelled = false) =>
    insertSlot(db, { standId, sectionId: fx.sectionA, startsAt: hoursAfterNow(hours), cancelled })
  const book = async (slotId: number) => insertBooking(db, { slotId, labGroupId: g1!.id, moduleId: sheet.id })
  // 30 h after NOW: Tuesday 2 March 2027, 20:00 MST.
  booking.inRange = await book(await slotAt(30))
  booking.cancelled = await book(await slotAt(31))
  await cancelBooking(db, booking.cancelled)
  booking.slotCancelled = await book(await slotAt(32, true))
  booking.tooSoon = await book(await slotAt(23))
  booking.tooLate = await book(await slotAt(49))
})

afterAll(async () => {
  await ctx.close()
})

const logger = createLogger('silent')

describe('day-before stand reminders', () => {
  it('queues one reminder per group member for a booking 24–48 h ahead, once however often the job runs', async () => {
    // Two processes at once, then once more: the outbox keeps one message per (booking, member).
    const other = startTestApp()
    try {
      await Promise.all([
        queueStandReminders(ctx.handle.db, ctx.config.APP_URL, NOW),
        queueStandReminders(other.handle.db, ctx.config.APP_URL, NOW),
      ])
    } finally {
      await other.close()
    }
    await queueStandReminders(ctx.handle.db, ctx.config.APP_URL, NOW)

    const queued = await ctx.handle.db
      .select({ key: mailOutbox.dedupeKey, to: mailOutbox.toAddress })
      .from(mailOutbox)
      .where(like(mailOutbox.dedupeKey, 'stand-reminder:%'))
    const ours = queued.filter((q) => Object.values(booking).some((b) => q.key.startsWith(`stand-reminder:${b}:`)))
    expect(ours.map((q) => q.key).sort()).toEqual(
      members.map((m) => `stand-reminder:${booking.inRange}:${m.id}`).sort(),
    )

    const sender = createSmtpSender(ctx.config)
    try {
      while ((await drainOnce(ctx.handle.db, sender, logger, DEFAULT_OUTBOX_OPTIONS)) > 0) {
        /* until the queue is empty */
      }
    } finally {
      sender.close()
    }
    const addresses = members.map((m) => m.email)
    await waitForMail((all) => addresses.every((a) => all.some((m) => m.to.some((t) => t.address === a))))
    const caught = (await caughtMail()).filter((m) => m.to.some((t) => addresses.includes(t.address)))
    const reminders = caught.filter((m) => m.subject.includes('stand session'))
    expect(reminders.map((m) => m.to[0]!.address).sort()).toEqual([...addresses].sort())
    for (const m of reminders) {
      expect(m.subject).toBe(`${code}: stand session tomorrow, Stand R`)
      expect(m.text).toContain('Stand: Stand R')
      expect(m.text).toContain('Place: North annex, cell 3')
      // 30 h after NOW in the course's zone.
      expect(m.text).toContain('Tuesday 2 March 2027, 20:00–20:30 (America/Denver)')
      expect(m.text).toContain('For: Reminder run')
      expect(m.text).toContain('supports and does not replace the institution’s safety procedures')
      expect(m.text).toContain(`/c/${fx.courseSlug}/stand-time`)
    }
  })

  it('a later run the next day does not remind of the same booking again', async () => {
    // Six hours on, the booking is still 24–48 h ahead: nothing new is queued for it.
    await queueStandReminders(ctx.handle.db, ctx.config.APP_URL, new Date(NOW.getTime() + 6 * 3_600_000))
    const rows = await ctx.handle.db
      .select({ id: mailOutbox.id })
      .from(mailOutbox)
      .where(like(mailOutbox.dedupeKey, `stand-reminder:${booking.inRange}:%`))
    expect(rows).toHaveLength(members.length)
  })
})

import { and, eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser } from 'playwright-core'
import { hashPassword } from '../../server/auth/password'
import {
  bookings,
  courses,
  mailOutbox,
  enrollments,
  labGroups,
  sections,
  standModules,
  standSlots,
  stands,
  users,
} from '../../server/db/schema'
import { insertModuleWithVersion, markPublished } from '../../server/repositories/modules'
import { toVersion } from '../../server/services/module-service'
import { PASSWORD, uniq } from '../helpers/app'
import { launchBrowser, noSideways, screenshotPath, serveApp, signIn } from '../helpers/browser'
import { standSheetSource } from '../helpers/stands'

let app: Awaited<ReturnType<typeof serveApp>>
let chrome: Awaited<ReturnType<typeof launchBrowser>>
let browser: Browser
const tag = uniq()
const title = `Stand time laboratory ${tag}`
const people = {
  instructor: { email: `stand-inst.${tag}@test.example`, name: `Inga Instructor ${tag}`, id: 0 },
  student: { email: `stand-stud.${tag}@test.example`, name: `Sami Student ${tag}`, id: 0 },
}
let standId = 0
let groupId = 0

/** The first Tuesday at least four days from now (beyond the 24-hour cut-off), as YYYY-MM-DD. */
function nextTuesday(): string {
  const d = new Date(Date.now() + 4 * 86_400_000)
  while (d.getUTCDay() !== 2) d.setUTCDate(d.getUTCDate() + 1)
  return d.toISOString().slice(0, 10)
}
const plusDays = (date: string, n: number) =>
  new Date(new Date(`${date}T00:00:00Z`).getTime() + n * 86_400_000).toISOString().slice(0, 10)

beforeAll(async () => {
  app = await serveApp()
  const db = app.db.db
  const hash = await hashPassword(PASSWORD)
  for (const p of Object.values(people)) {
    const [u] = await db
      .insert(users)
      .values({ email: p.email, displayName: p.name, passwordHash: hash })
      .$returningId()
    p.id = u!.id
  }
  const [c] = await db
    .insert(courses)
    .values({
      code: `ST${tag.slice(0, 5)}`,
      title,
      term: 'Spring term',
      institution: 'Test University (fictional)',
      timeZone: 'America/Denver',
    })
    .$returningId()
  const courseId = c!.id
  const [tue] = await db.insert(sections).values({ courseId, name: 'Tue' }).$returningId()
  await db.insert(sections).values({ courseId, name: 'Thu' })
  const [g] = await db.insert(labGroups).values({ courseId, sectionId: tue!.id, name: 'Group T1' }).$returningId()
  groupId = g!.id
  await db.insert(enrollments).values([
    { userId: people.instructor.id, courseId, role: 'instructor' },
    { userId: people.student.id, courseId, role: 'student', sectionId: tue!.id, labGroupId: g!.id },
  ])
  const m = await insertModuleWithVersion(
    db,
    { courseId, slug: 'cold-flow-runs', position: 1, createdBy: people.instructor.id },
    toVersion(standSheetSource('Cold-flow stand runs', 1), 'cold-flow-runs', 'America/Denver'),
  )
  await markPublished(db, m.moduleId, m.versionId, null, people.instructor.id)
  const [s] = await db.insert(stands).values({ courseId, name: 'North stand', location: 'Bay 2' }).$returningId()
  standId = s!.id
  await db.insert(standModules).values({ standId, moduleId: m.moduleId })
  chrome = await launchBrowser()
  browser = chrome.browser
}, 120_000)
afterAll(async () => {
  await chrome?.close()
  await app?.close()
})

describe('stand time', () => {
  it('the instructor opens a term of Tuesday slots; a student books one and sees it booked', async () => {
    const from = nextTuesday()
    const to = plusDays(from, 14)
    const holiday = plusDays(from, 7)

    const ctx = await browser.newContext({ viewport: { width: 1280, height: 900 } })
    const page = await ctx.newPage()
    page.setDefaultTimeout(15_000)
    await signIn(page, app.url, people.instructor.email, PASSWORD)
    await page.getByRole('link', { name: title }).click()
    await page.getByRole('navigation', { name: 'Course' }).getByRole('link', { name: 'Stands' }).click()
    await page.getByRole('heading', { level: 1, name: 'Stands' }).waitFor()
    const form = page.getByTestId('slot-form')
    await form.getByLabel('A weekly pattern').check()
    await form.getByLabel('Stand').selectOption({ label: 'North stand' })
    await form.getByLabel('Section').selectOption({ label: 'Section Tue' })
    await form.getByLabel('Every').selectOption({ label: 'Tuesday' })
    await form.getByLabel('From').fill(from)
    await form.getByLabel('To (included)').fill(to)
    await form.getByLabel('Start').fill('13:00')
    await form.getByLabel('Until').fill('16:00')
    await form.getByLabel('Each slot (minutes)').fill('30')
    await form.getByLabel(/Except these dates/).fill(holiday)
    await form.getByRole('button', { name: 'Open the slots' }).click()
    // Three Tuesdays less the holiday, six half-hour slots each.
    await expect.poll(() => form.getByRole('status').innerText()).toContain('Opened 12 slots')
    const opened = await app.db.db.select({ id: standSlots.id }).from(standSlots).where(eq(standSlots.standId, standId))
    expect(opened).toHaveLength(12)
    await ctx.close()

    const sctx = await browser.newContext({ viewport: { width: 1280, height: 900 } })
    const sp = await sctx.newPage()
    sp.setDefaultTimeout(15_000)
    await signIn(sp, app.url, people.student.email, PASSWORD)
    await sp.getByRole('link', { name: title }).click()
    await sp.getByRole('navigation', { name: 'Course' }).getByRole('link', { name: 'Stand time' }).click()
    await sp.getByRole('heading', { level: 1, name: 'Stand time' }).waitFor()
    await expect.poll(() => sp.getByLabel('Book for the sheet').inputValue()).not.toBe('')
    await sp.getByRole('button', { name: 'Book 13:30–14:00' }).first().click()
    await expect
      .poll(() => sp.getByRole('region', { name: /Slots/ }).innerText())
      .toMatch(/13:30–14:00[\s\S]*North stand[\s\S]*Booked for your group/)
    await expect.poll(() => sp.getByText('Your group has no stand runs left to book.').count()).toBe(1)
    const mine = sp.getByRole('heading', { name: 'Your group’s bookings' }).locator('..')
    await expect.poll(() => mine.innerText()).toMatch(/13:30–14:00 · North stand · Cold-flow stand runs/)

    const rows = await app.db.db
      .select({ slotId: bookings.slotId, status: bookings.status })
      .from(bookings)
      .where(and(eq(bookings.labGroupId, groupId), eq(bookings.status, 'active')))
    expect(rows).toHaveLength(1)

    await sp.setViewportSize({ width: 375, height: 800 })
    await noSideways(sp)
    await sp.screenshot({ path: screenshotPath('stand-time-375'), fullPage: true })
    await sctx.close()
  }, 120_000)
  it('the instructor moves the booking to another slot with a reason, and the group is e-mailed', async () => {
    const ctx = await browser.newContext({ viewport: { width: 375, height: 800 } })
    const page = await ctx.newPage()
    page.setDefaultTimeout(15_000)
    await signIn(page, app.url, people.instructor.email, PASSWORD)
    await page.getByRole('link', { name: title }).click()
    await page.getByRole('navigation', { name: 'Course' }).getByRole('link', { name: 'Stand time' }).click()
    await page.getByRole('heading', { level: 1, name: 'Stand time' }).waitFor()
    const panel = page.getByRole('heading', { name: 'Bookings', exact: true }).locator('..')
    await expect.poll(() => panel.innerText()).toMatch(/13:30–14:00 · North stand · Cold-flow stand runs · Group T1/)
    await panel.getByRole('button', { name: 'Move or cancel' }).click()
    const target = panel.getByLabel('Move to')
    await expect.poll(() => target.locator('option').count()).toBeGreaterThan(1)
    const value = await target
      .locator('option', { hasText: '15:30–16:00' })
      .first()
      .evaluate((o) => (o as HTMLOptionElement).value)
    await target.selectOption(value)
    await panel.getByLabel('Reason (e-mailed to the group)').fill('The north bay is being recalibrated')
    await panel.getByRole('button', { name: 'Move booking' }).click()
    await expect.poll(() => panel.innerText()).toMatch(/15:30–16:00 · North stand · Cold-flow stand runs · Group T1/)
    await noSideways(page)

    const active = await app.db.db
      .select({ id: bookings.id, reason: bookings.reason, status: bookings.status })
      .from(bookings)
      .where(eq(bookings.labGroupId, groupId))
    expect(active.map((b) => b.status).sort()).toEqual(['active', 'moved'])
    const moved = active.find((b) => b.status === 'moved')!
    expect(moved.reason).toBe('The north bay is being recalibrated')
    const mails = await app.db.db
      .select({ to: mailOutbox.toAddress, text: mailOutbox.textBody })
      .from(mailOutbox)
      .where(eq(mailOutbox.dedupeKey, `booking-moved:${moved.id}`))
    expect(mails.map((m) => m.to)).toEqual([people.student.email])
    expect(mails[0]!.text).toContain('The north bay is being recalibrated')
    await ctx.close()
  }, 120_000)
})

import { eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser } from 'playwright-core'
import { hashPassword } from '../../server/auth/password'
import { courses, enrollments, labGroups, moduleVersions, modules, sections, users } from '../../server/db/schema'
import { PASSWORD, uniq } from '../helpers/app'
import { launchBrowser, noSideways, screenshotPath, serveApp, signIn } from '../helpers/browser'
import { insertBooking, insertSlot, insertStand } from '../helpers/stand-rows'

// The course home's "This week at the stand": a student sees their group's booking this week,
// steps to the next week (another group's booking, without its name) and back past it to an empty week.

let app: Awaited<ReturnType<typeof serveApp>>
let chrome: Awaited<ReturnType<typeof launchBrowser>>
let browser: Browser
const tag = uniq()
const title = `Stand week course ${tag}`
const student = { email: `week-stud.${tag}@test.example`, name: `Wren Student ${tag}` }
let courseSlug = ''

beforeAll(async () => {
  app = await serveApp()
  const db = app.db.db
  const [u] = await db
    .insert(users)
    .values({ email: student.email, displayName: student.name, passwordHash: await hashPassword(PASSWORD) })
    .$returningId()
  const [c] = await db
    .insert(courses)
    .values({
      code: `WK${tag.slice(0, 4).toUpperCase()}`,
      title,
      term: 'Test term',
      institution: 'Test University (fictional)',
      timeZone: 'America/Denver',
    })
    .$returningId()
  const courseId = c!.id
  const [row] = await db.select({ slug: courses.slug }).from(courses).where(eq(courses.id, courseId))
  courseSlug = row!.slug!
  const [s] = await db.insert(sections).values({ courseId, name: 'Bay 1' }).$returningId()
  const [mine] = await db.insert(labGroups).values({ courseId, sectionId: s!.id, name: 'Group W1' }).$returningId()
  const [theirs] = await db.insert(labGroups).values({ courseId, sectionId: s!.id, name: 'Group W2' }).$returningId()
  await db
    .insert(enrollments)
    .values({ userId: u!.id, courseId, role: 'student', sectionId: s!.id, labGroupId: mine!.id })
  const [m] = await db.insert(modules).values({ courseId, slug: 'blow-down', status: 'published' }).$returningId()
  const [v] = await db
    .insert(moduleVersions)
    .values({
      moduleId: m!.id,
      number: 1,
      status: 'published',
      source: '# Blow-down run',
      html: '<h1>Blow-down run</h1>',
      title: 'Blow-down run',
      valid: true,
    })
    .$returningId()
  await db.update(modules).set({ currentVersionId: v!.id, publishedVersionId: v!.id }).where(eq(modules.id, m!.id))
  const standId = await insertStand(db, courseId, 'Stand Wren', 'Bay 1 east')
  // This minute is always in the week holding today; the same time a week on is in the next week.
  const now = new Date(Math.floor(Date.now() / 60_000) * 60_000)
  const thisWeek = await insertSlot(db, { standId, sectionId: s!.id, startsAt: now })
  const nextWeek = await insertSlot(db, {
    standId,
    sectionId: s!.id,
    startsAt: new Date(now.getTime() + 7 * 86_400_000),
  })
  await insertBooking(db, { slotId: thisWeek, labGroupId: mine!.id, moduleId: m!.id })
  await insertBooking(db, { slotId: nextWeek, labGroupId: theirs!.id, moduleId: m!.id })
  chrome = await launchBrowser()
  browser = chrome.browser
}, 120_000)
afterAll(async () => {
  await chrome?.close()
  await app?.close()
})

describe('this week at the stand, in the browser', () => {
  it('a student sees their group’s session this week, steps a week on and back, and reaches an empty week', async () => {
    const ctx = await browser.newContext({ viewport: { width: 1280, height: 900 } })
    const page = await ctx.newPage()
    await signIn(page, app.url, student.email, PASSWORD)
    await page.getByRole('link', { name: title }).click()
    const panel = page.getByTestId('stand-week')
    await panel.getByRole('heading', { name: 'This week at the stand' }).waitFor()
    const sessions = panel.getByTestId('stand-week-session')
    await sessions.first().waitFor()
    expect(await sessions.count()).toBe(1)
    expect(await sessions.first().innerText()).toContain('Stand Wren (Bay 1 east)')
    expect(await sessions.first().innerText()).toContain('Your group: Blow-down run')
    expect(await panel.getByRole('link', { name: 'Book stand time' }).getAttribute('href')).toBe(
      `/c/${courseSlug}/stand-time`,
    )
    const thisSpan = await panel.getByTestId('stand-week-span').innerText()

    await panel.getByRole('button', { name: 'Next week' }).click()
    await expect.poll(() => panel.getByTestId('stand-week-span').innerText()).not.toBe(thisSpan)
    await expect.poll(() => sessions.first().innerText()).toContain('Booked')
    expect(await sessions.count()).toBe(1)
    expect(await panel.innerText()).not.toContain('Group W2')

    await panel.getByRole('button', { name: 'Previous week' }).click()
    await expect.poll(() => panel.getByTestId('stand-week-span').innerText()).toBe(thisSpan)
    await panel.getByRole('button', { name: 'Previous week' }).click()
    await expect.poll(() => panel.innerText()).toContain('No stand sessions for your section this week.')
    expect(await sessions.count()).toBe(0)

    await page.screenshot({ path: screenshotPath('stand-week-desktop'), fullPage: true })
    await page.setViewportSize({ width: 375, height: 812 })
    await noSideways(page)
    await ctx.close()
  })
})

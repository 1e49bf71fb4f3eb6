import { eq } from 'drizzle-orm'
import ICAL from 'ical.js'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser } from 'playwright-core'
import { hashPassword } from '../../server/auth/password'
import { courses, enrollments, moduleVersions, modules, sections, users } from '../../server/db/schema'
import { PASSWORD, uniq } from '../helpers/app'
import { launchBrowser, noSideways, screenshotPath, serveApp, signIn } from '../helpers/browser'

let app: Awaited<ReturnType<typeof serveApp>>
let chrome: Awaited<ReturnType<typeof launchBrowser>>
let browser: Browser
const tag = uniq()
const code = `CAL${tag.slice(0, 4).toUpperCase()}`
const title = `Calendar course ${tag}`
const student = { email: `cal-stud.${tag}@test.example`, name: `Cara Student ${tag}`, id: 0 }
/** 2027-03-02 17:00 in America/Denver (MST, UTC−7 before the March change), as an instant. */
const DUE = new Date('2027-03-03T00:00:00Z')
let courseId = 0

/** A sheet issued to the class, written straight to the database (the journey is about the feed, not publishing). */
async function issueSheet(slug: string, sheetTitle: string, dueAt: Date | null, status: 'published' | 'draft') {
  const db = app.db.db
  const [m] = await db.insert(modules).values({ courseId, slug, status }).$returningId()
  const [v] = await db
    .insert(moduleVersions)
    .values({
      moduleId: m!.id,
      number: 1,
      status: status === 'published' ? 'published' : 'draft',
      source: `# ${sheetTitle}`,
      html: `<h1>${sheetTitle}</h1>`,
      title: sheetTitle,
      dueAt,
      valid: true,
    })
    .$returningId()
  await db
    .update(modules)
    .set({ currentVersionId: v!.id, publishedVersionId: status === 'published' ? v!.id : null })
    .where(eq(modules.id, m!.id))
}

beforeAll(async () => {
  app = await serveApp()
  const db = app.db.db
  const [u] = await db
    .insert(users)
    .values({ email: student.email, displayName: student.name, passwordHash: await hashPassword(PASSWORD) })
    .$returningId()
  student.id = u!.id
  const [c] = await db
    .insert(courses)
    .values({ code, title, term: 'Test term', institution: 'Test University (fictional)', timeZone: 'America/Denver' })
    .$returningId()
  courseId = c!.id
  const [s] = await db.insert(sections).values({ courseId, name: 'Bay 1' }).$returningId()
  await db.insert(enrollments).values({ userId: student.id, courseId, role: 'student', sectionId: s!.id })
  await issueSheet('thrust-stand', 'Thrust stand calibration', DUE, 'published')
  await issueSheet('not-yet', 'Not issued yet', DUE, 'draft')
  chrome = await launchBrowser()
  browser = chrome.browser
}, 120_000)
afterAll(async () => {
  await chrome?.close()
  await app?.close()
})

describe('the calendar feed in the browser', () => {
  it('a student makes their feed address, copies it, and the address serves their due dates', async () => {
    const ctx = await browser.newContext({ viewport: { width: 1280, height: 900 } })
    await ctx.grantPermissions(['clipboard-read', 'clipboard-write'], { origin: app.url })
    const page = await ctx.newPage()
    await signIn(page, app.url, student.email, PASSWORD)
    await page.getByRole('link', { name: title }).click()
    const panel = page.getByTestId('calendar-feed')
    await panel.getByRole('heading', { name: 'Calendar feed' }).waitFor()
    expect(await panel.innerText()).toContain('Anyone with the address can read these dates.')

    await panel.getByRole('button', { name: 'Make a calendar address' }).click()
    const field = panel.getByLabel('Your calendar address (shown only now)')
    await field.waitFor()
    const shown = await field.inputValue()
    expect(shown).toMatch(new RegExp(`^${app.url}/api/calendar/[A-Za-z0-9_-]{43}\\.ics$`))

    // Copy with the keyboard; the polite live region says so.
    await panel.getByRole('button', { name: 'Copy address' }).focus()
    await page.keyboard.press('Enter')
    await expect.poll(() => page.getByTestId('calendar-feed-copied').innerText()).toBe('Copied')
    expect(await page.getByTestId('calendar-feed-copied').getAttribute('aria-live')).toBe('polite')
    const copied = await page.evaluate(() => navigator.clipboard.readText())
    expect(copied).toBe(shown)

    await page.screenshot({ path: screenshotPath('calendar-feed-desktop'), fullPage: true })
    await page.setViewportSize({ width: 375, height: 812 })
    await noSideways(page)
    await page.setViewportSize({ width: 1280, height: 900 })

    // A calendar app fetching the copied address (no session) gets the student's due dates.
    const res = await fetch(copied)
    expect(res.status).toBe(200)
    expect(res.headers.get('content-type')).toBe('text/calendar; charset=utf-8')
    const cal = new ICAL.Component(ICAL.parse(await res.text()))
    const events = cal.getAllSubcomponents('vevent').map((v) => new ICAL.Event(v))
    expect(events.map((e) => e.summary)).toEqual([`${code}: Thrust stand calibration due`])
    expect(events[0]!.startDate.toJSDate().toISOString()).toBe(DUE.toISOString())

    // A new address, confirmed in plain words, retires the copied one.
    await panel.getByRole('button', { name: 'Make a new address' }).click()
    expect(await panel.innerText()).toContain('The old one stops working at once')
    await panel.getByRole('button', { name: 'Yes, make a new address' }).click()
    await expect.poll(() => field.inputValue()).not.toBe(shown)
    expect((await fetch(copied)).status).toBe(404)
    expect((await fetch(await field.inputValue())).status).toBe(200)
    await ctx.close()
  })
})

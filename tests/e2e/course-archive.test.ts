import { readFileSync } from 'node:fs'
import { eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser } from 'playwright-core'
import { hashPassword } from '../../server/auth/password'
import { courses, enrollments, sections, users } from '../../server/db/schema'
import type { ArchiveManifest } from '../../server/services/course-archive-service'
import { PASSWORD, uniq } from '../helpers/app'
import { launchBrowser, noSideways, screenshotPath, serveApp, signIn } from '../helpers/browser'
import { readZip } from '../helpers/pdf'

let app: Awaited<ReturnType<typeof serveApp>>
let chrome: Awaited<ReturnType<typeof launchBrowser>>
let browser: Browser
const tag = uniq()
const code = `END${tag.slice(0, 4).toUpperCase()}`
const title = `End-of-term course ${tag}`
const people = {
  instructor: { email: `end-inst.${tag}@test.example`, name: `Ines Instructor ${tag}`, id: 0 },
  student: { email: `end-stud.${tag}@test.example`, name: `Sami Student ${tag}`, id: 0 },
}
let courseId = 0

/** A course of this test's own, so closing it leaves the demo course the other journeys use alone. */
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
    .values({ code, title, term: 'Test term', institution: 'Test University (fictional)', timeZone: 'UTC' })
    .$returningId()
  courseId = c!.id
  const [s] = await db.insert(sections).values({ courseId, name: 'Bay 1' }).$returningId()
  await db.insert(enrollments).values([
    { userId: people.instructor.id, courseId, role: 'instructor' },
    { userId: people.student.id, courseId, role: 'student', sectionId: s!.id },
  ])
  chrome = await launchBrowser()
  browser = chrome.browser
}, 120_000)
afterAll(async () => {
  await chrome?.close()
  await app?.close()
})

const closedAt = async () =>
  (await app.db.db.select({ at: courses.closedAt }).from(courses).where(eq(courses.id, courseId)))[0]!.at

describe('the end of a term in the browser', () => {
  it('the instructor downloads the course archive, closes the course after typing its code, and reopens it', async () => {
    const ctx = await browser.newContext({ viewport: { width: 1280, height: 900 }, acceptDownloads: true })
    const page = await ctx.newPage()
    await signIn(page, app.url, people.instructor.email, PASSWORD)
    await page.getByRole('link', { name: title }).click()
    const panel = page.getByTestId('end-of-term')
    await panel.getByRole('heading', { name: 'End of term' }).waitFor()

    const link = panel.getByRole('link', { name: 'Download the course archive (zip)' })
    const [download] = await Promise.all([page.waitForEvent('download'), link.click()])
    expect(download.suggestedFilename()).toMatch(/^end[a-z0-9]+_test-term_archive-\d{4}-\d{2}-\d{2}\.zip$/)
    const entries = await readZip(readFileSync(await download.path()))
    expect(entries.at(-1)!.name).toBe('manifest.json')
    const manifest = JSON.parse(entries.at(-1)!.bytes.toString('utf8')) as ArchiveManifest
    expect(manifest.course.code).toBe(code)
    expect(manifest.counts.rosterEntries).toBe(2)
    const roster = entries.find((e) => e.name === 'roster.csv')!.bytes.toString('utf8')
    expect(roster).toContain(people.student.email)

    // A wrong code is refused at the field, and the course stays open.
    const confirm = panel.getByLabel(`Type the course code, ${code}, to confirm`)
    await confirm.fill('NOT-IT')
    await panel.getByRole('button', { name: `Close ${code}` }).click()
    await expect.poll(() => panel.getByRole('alert').innerText()).toContain(code)
    expect(await closedAt()).toBeNull()

    await confirm.fill(code)
    await panel.getByRole('button', { name: `Close ${code}` }).click()
    await page.getByTestId('course-closed-note').waitFor()
    await page.getByTestId('course-closed-tag').waitFor()
    expect(await closedAt()).not.toBeNull()
    await page.screenshot({ path: screenshotPath('course-closed-desktop'), fullPage: true })
    await page.setViewportSize({ width: 375, height: 812 })
    await noSideways(page)
    await page.setViewportSize({ width: 1280, height: 900 })

    // Staff still list it, marked closed.
    await page.goto(`${app.url}/courses`)
    const card = page.getByTestId('course-list').getByRole('listitem').filter({ hasText: title })
    await expect.poll(() => card.innerText()).toContain('Closed')

    // The student no longer sees it.
    const sctx = await browser.newContext({ viewport: { width: 1280, height: 900 } })
    const spage = await sctx.newPage()
    await signIn(spage, app.url, people.student.email, PASSWORD)
    // Their only course is closed: the list, once loaded, is empty.
    await spage.getByText('You are not enrolled in any course yet.').waitFor()
    expect(await spage.locator('main').innerText()).not.toContain(title)
    await sctx.close()

    // Reopening brings the form back.
    await card.getByRole('link', { name: title }).click()
    await panel.getByRole('button', { name: 'Reopen the course' }).click()
    await panel.getByLabel(`Type the course code, ${code}, to confirm`).waitFor()
    expect(await closedAt()).toBeNull()
    await ctx.close()
  }, 120_000)
})

import { readFileSync } from 'node:fs'
import Papa from 'papaparse'
import type { Browser, Page } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { seedDemo } from '../../scripts/demo/seed-demo'
import { DEMO_COURSE, DEMO_INSTRUCTOR, DEMO_SECTIONS, DEMO_STUDENTS } from '../../scripts/demo/scenario'
import type { Gradebook } from '../../shared/schemas/grades'
import { launchBrowser, noSideways, openCourse, screenshotPath, serveApp, signIn } from '../helpers/browser'

let app: Awaited<ReturnType<typeof serveApp>>
let chrome: Awaited<ReturnType<typeof launchBrowser>>
let browser: Browser
const COLD_FLOW = 'Cold-flow characterisation of a converging–diverging nozzle'

beforeAll(async () => {
  app = await serveApp()
  await seedDemo(app.db.db)
  chrome = await launchBrowser()
  browser = chrome.browser
}, 120_000)
afterAll(async () => {
  await chrome?.close()
  await app?.close()
})

/** A GET through the page, with the signed-in person's cookies. */
async function api<T>(page: Page, url: string): Promise<{ status: number; body: T }> {
  return page.evaluate(async (u) => {
    const res = await fetch(u, { headers: { Accept: 'application/json' } })
    return { status: res.status, body: (await res.json()) as T }
  }, url)
}

describe('the instructor’s gradebook', () => {
  it('shows the statistics, releases the cold-flow grades after a confirmation, and downloads one CSV row per student', async () => {
    const ctx = await browser.newContext({ viewport: { width: 1366, height: 900 }, acceptDownloads: true })
    const page = await ctx.newPage()
    await signIn(page, app.url, DEMO_INSTRUCTOR.email)
    await page.getByRole('link', { name: DEMO_COURSE.title }).click()
    await page.getByRole('navigation', { name: 'Course' }).getByRole('link', { name: 'Marks', exact: true }).click()
    await page.getByRole('heading', { level: 1, name: 'Marks' }).waitFor()
    expect(new URL(page.url()).pathname).toMatch(/^\/c\/prl-341-[a-z]+-\d{4}\/marks$/)
    const { courseId } = await openCourse(page)
    expect(courseId).toBeGreaterThan(0)
    await expect.poll(() => page.getByTestId('counting-rule').innerText()).toContain('latest graded attempt')

    const book = await api<Gradebook>(page, `/api/courses/${courseId}/gradebook`)
    expect(book.status).toBe(200)
    const table = page.getByTestId('gradebook-table')
    await expect.poll(() => table.locator('tbody tr').count()).toBe(book.body.students.length)
    for (const s of DEMO_STUDENTS.slice(0, 3)) expect(await table.innerText()).toContain(s.displayName)

    // The cold-flow module's figures, as the server computed them, with the histogram drawn.
    const mod = book.body.modules.find((m) => m.title === COLD_FLOW)!
    const stats = book.body.stats.find((s) => s.moduleId === mod.id)!
    expect(stats.n).toBeGreaterThan(0)
    const panel = page.locator(`[data-testid="gradebook-module"][data-module-id="${mod.id}"]`)
    expect(await panel.getByTestId('stat-n').innerText()).toBe(String(stats.n))
    expect(await panel.getByTestId('stat-mean').innerText()).toBe(`${stats.meanPercent!.toFixed(1)} %`)
    await panel.getByTestId('gradebook-histogram').waitFor()
    await page.screenshot({ path: screenshotPath('gradebook-desktop'), fullPage: true })

    // Another test may have made them final already: reopen first, so this one makes them final.
    const state = panel.getByTestId(`release-state-${mod.id}`)
    if ((await state.innerText()) === 'final') {
      await panel.getByRole('button', { name: 'Reopen the marks' }).click()
      await page.getByRole('alertdialog').getByRole('button', { name: 'Reopen' }).click()
      await expect.poll(() => state.innerText()).toBe('not final yet')
    }
    await panel.getByRole('button', { name: 'Make marks final' }).click()
    const dialog = page.getByRole('alertdialog')
    await expect
      .poll(() => dialog.innerText())
      .toContain(`${book.body.enrolledStudents} students of the course will be e-mailed`)
    await dialog.getByRole('button', { name: `Make final and e-mail ${book.body.enrolledStudents}` }).click()
    await expect.poll(() => state.innerText()).toBe('final')
    const after = await api<Gradebook>(page, `/api/courses/${courseId}/gradebook`)
    expect(after.body.modules.find((m) => m.id === mod.id)!.releasedAt).not.toBeNull()

    const [download] = await Promise.all([page.waitForEvent('download'), page.getByTestId('gradebook-csv').click()])
    expect(download.suggestedFilename()).toMatch(/^gradebook-.+\.csv$/)
    const text = readFileSync((await download.path())!, 'utf8').replace(/^\uFEFF/, '')
    const [header, ...rows] = Papa.parse<string[]>(text, { skipEmptyLines: true }).data
    expect(header!.slice(0, 4)).toEqual(['email', 'name', 'section', 'group'])
    expect(rows).toHaveLength(book.body.students.length)
    for (const s of DEMO_STUDENTS)
      expect(
        rows.filter((r) => r[0] === s.email),
        s.email,
      ).toHaveLength(1)

    await page.setViewportSize({ width: 375, height: 812 })
    await noSideways(page)
    // The toast area (fixed, so it never makes the page scroll) fits the phone's width.
    const toast = await page.evaluate(() => {
      const r = document.querySelector('.p-toast')?.getBoundingClientRect()
      return r ? { left: r.left, right: r.right } : null
    })
    expect(toast).not.toBeNull()
    expect(toast!.left).toBeGreaterThanOrEqual(0)
    expect(toast!.right).toBeLessThanOrEqual(375)
    await page.screenshot({ path: screenshotPath('gradebook-375'), fullPage: true })
    await ctx.close()
  }, 120_000)

  it('a student reads My marks, opens the final result and asks for a re-check', async () => {
    // Group A3's demo hand-in is already flagged for review, so a re-check changes no other test's queue.
    const who = DEMO_STUDENTS.find((p) => p.labGroup === 'A3')!
    const ctx = await browser.newContext({ viewport: { width: 375, height: 812 } })
    const page = await ctx.newPage()
    await signIn(page, app.url, who.email)
    await page.getByRole('link', { name: DEMO_COURSE.title }).click()
    await page.getByRole('navigation', { name: 'Course' }).getByRole('link', { name: 'My marks', exact: true }).click()
    await page.getByRole('heading', { level: 1, name: 'My marks' }).waitFor()
    expect(new URL(page.url()).pathname).toMatch(/^\/c\/prl-341-[a-z]+-\d{4}\/my-marks$/)
    const row = page.getByTestId('my-grades-table').locator('tbody tr').filter({ hasText: COLD_FLOW })
    await expect.poll(() => row.getAttribute('data-state')).toBe('released')
    await noSideways(page)
    await page.screenshot({ path: screenshotPath('my-grades-375'), fullPage: true })

    await row.getByRole('link', { name: /^See the result/ }).click()
    await page.getByRole('heading', { level: 2, name: 'Re-check' }).waitFor()
    const recheck = page.getByTestId('recheck')
    if ((await recheck.getByRole('button', { name: 'Ask for a re-check' }).count()) > 0) {
      await recheck.getByRole('button', { name: 'Ask for a re-check' }).click()
      await expect.poll(() => page.locator('#recheck-message-error').innerText()).toContain('look at again')
      const message = `Our peak thrust was read after the load cell was re-zeroed (${Date.now()}).`
      await page.getByLabel('What should the staff look at again?').fill(message)
      await recheck.getByRole('button', { name: 'Ask for a re-check' }).click()
      await expect.poll(() => recheck.locator('li.open').filter({ hasText: message }).count()).toBe(1)
    }
    expect(await recheck.locator('li.open').count()).toBe(1)
    await noSideways(page)
    await page.screenshot({ path: screenshotPath('submission-recheck-375'), fullPage: true })
    const submissionId = Number(/\/hand-ins\/(\d+)$/.exec(page.url())?.[1])
    const { courseSlug } = await openCourse(page)
    await ctx.close()

    // The section's TA answers it from the review page; the request then reads as answered.
    const staff = await browser.newContext({ viewport: { width: 1280, height: 900 } })
    const tp = await staff.newPage()
    await signIn(tp, app.url, DEMO_SECTIONS[0].ta.email)
    await tp.goto(`${app.url}/c/${courseSlug}/review/${submissionId}`)
    const answers = tp.getByTestId('recheck-review')
    await answers.locator('li.open').waitFor()
    const answer = `We checked the zero: the **peak stands** (${Date.now()}).`
    await answers.getByLabel('Answer to the student (Markdown)').fill(answer)
    await answers.getByRole('button', { name: 'Send answer' }).click()
    await expect.poll(() => answers.locator('li.answered').filter({ hasText: 'peak stands' }).count()).toBe(1)
    expect(await answers.locator('li.answered strong', { hasText: 'peak stands' }).count()).toBe(1)
    await staff.close()
  }, 120_000)
})

import { readFileSync } from 'node:fs'
import type { Browser } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { seedDemo } from '../../scripts/demo/seed-demo'
import {
  DEMO_COURSE,
  DEMO_GROUP_WITHOUT_HAND_IN,
  DEMO_INSTRUCTOR,
  DEMO_SECTIONS,
  DEMO_STUDENTS,
} from '../../scripts/demo/scenario'
import type { MySubmissions } from '../../shared/schemas/submissions'
import { apiSignIn, launchBrowser, noSideways, screenshotPath, serveApp, signIn } from '../helpers/browser'
import { readPdf, readZip, squash } from '../helpers/pdf'

let app: Awaited<ReturnType<typeof serveApp>>
let chrome: Awaited<ReturnType<typeof launchBrowser>>
let browser: Browser
let courseId: number

/** A4's run is clean (no flags), so no other test file works its hand-in in the review queue. */
const GROUP = 'A4'
const student = DEMO_STUDENTS.find((s) => s.labGroup === GROUP)!
const ta = DEMO_SECTIONS[0].ta
const COLD_FLOW_TITLE = /^Cold-flow characterisation/

/** A signed-in API client on the served app (cookies kept, CSRF token at hand). */

/** The instructor releases the module's grades (the same call the gradebook's release button makes). */
async function releaseGrades(moduleId: number): Promise<void> {
  const instructor = await apiAs(DEMO_INSTRUCTOR.email)
  const res = await instructor.agent
    .post(`/api/courses/${courseId}/gradebook/modules/${moduleId}/release`)
    .set('x-csrf-token', instructor.csrf)
    .expect(200)
  expect(res.body.moduleId).toBe(moduleId)
  expect(Number.isNaN(Date.parse(res.body.releasedAt))).toBe(false)
}

beforeAll(async () => {
  app = await serveApp()
  courseId = (await seedDemo(app.db.db)).courseId
  chrome = await launchBrowser()
  browser = chrome.browser
}, 120_000)
afterAll(async () => {
  await chrome?.close()
  await app?.close()
})

describe('journey 4: a student downloads the graded feedback report', () => {
  it('sees the staff comment on the result page and downloads a PDF with the same score and the comment', async () => {
    // The TA of section A comments on the group's latest hand-in through the review API.
    const taApi = await apiAs(ta.email)
    const modules = (await taApi.agent.get(`/api/courses/${courseId}/modules`).expect(200)).body as {
      id: number
      title: string
    }[]
    const coldFlow = modules.find((m) => COLD_FLOW_TITLE.test(m.title))!
    expect(coldFlow).toBeDefined()
    const studentApi = await apiAs(student.email)
    const mine = (
      await studentApi.agent.get(`/api/courses/${courseId}/modules/${coldFlow.id}/submissions/mine`).expect(200)
    ).body as MySubmissions
    const latest = mine.submissions[0]!
    expect(latest.status).toBe('graded')
    const comment = `Clean run, ${student.displayName.split(' ')[0]}: repeat it with the larger nozzle next week (${Date.now()}).`
    const rev = (await taApi.agent.get(`/api/courses/${courseId}/submissions/${latest.id}/review`).expect(200)).body
      .revision as number
    await taApi.agent
      .post(`/api/courses/${courseId}/submissions/${latest.id}/comments`)
      .set('x-csrf-token', taApi.csrf)
      .send({ body: `_${comment}_`, revision: rev })
      .expect(201)

    await releaseGrades(coldFlow.id)

    const ctx = await browser.newContext({ viewport: { width: 1280, height: 900 }, acceptDownloads: true })
    const page = await ctx.newPage()
    await signIn(page, app.url, student.email)
    await page.getByRole('link', { name: DEMO_COURSE.title }).click()
    // My marks shows the module's marks as final and leads to the counted result.
    await page.getByRole('navigation', { name: 'Course' }).getByRole('link', { name: 'My marks' }).click()
    const row = page
      .getByTestId('my-grades-table')
      .locator('tr', { has: page.getByRole('rowheader', { name: COLD_FLOW_TITLE }) })
    await expect.poll(() => row.getAttribute('data-state')).toBe('released')
    await row.getByRole('link', { name: /See the result/ }).click()
    await page.getByRole('heading', { level: 1, name: new RegExp(`^Attempt ${latest.attempt}:`) }).waitFor()

    // The comment, as the student reads it (Markdown emphasis rendered).
    await expect.poll(() => page.getByTestId('comments').innerText()).toContain(comment)
    const score = squash(await page.getByTestId('score').innerText())
    expect(score).toMatch(/^[\d.]+ of [\d.]+ points$/)

    const link = page.getByRole('link', { name: 'Download feedback report (PDF)' })
    await link.focus()
    await page.screenshot({ path: screenshotPath('feedback-report-link-desktop'), fullPage: true })
    const [download] = await Promise.all([page.waitForEvent('download'), link.click()])
    expect(download.suggestedFilename()).toMatch(/^cold-flow-characterisation_group-a4_attempt-\d+\.pdf$/)
    const file = await download.path()
    // Kept with the screenshots, for a person to look at.
    await download.saveAs(screenshotPath('feedback-report-a4').replace(/\.png$/, '.pdf'))
    const pdf = await readPdf(readFileSync(file))
    expect(pdf.text).toContain(score)
    expect(pdf.text).toContain(comment)
    expect(pdf.text).toContain(DEMO_COURSE.code)
    expect(pdf.text).toContain(student.displayName)

    await page.setViewportSize({ width: 375, height: 812 })
    await noSideways(page)
    await page.screenshot({ path: screenshotPath('feedback-report-link-375'), fullPage: true })
    await ctx.close()
  }, 120_000)

  it('the instructor downloads every lab group’s report of the module as one zip from the module page', async () => {
    const ctx = await browser.newContext({ viewport: { width: 1280, height: 900 }, acceptDownloads: true })
    const page = await ctx.newPage()
    await signIn(page, app.url, DEMO_INSTRUCTOR.email)
    await page.getByRole('link', { name: DEMO_COURSE.title }).click()
    await page.getByRole('link', { name: COLD_FLOW_TITLE }).first().click()
    await page.getByRole('heading', { level: 1, name: COLD_FLOW_TITLE }).waitFor()
    const link = page.getByRole('link', { name: 'Download all reports (zip)' })
    await page.screenshot({ path: screenshotPath('module-reports-zip-desktop') })
    const [download] = await Promise.all([page.waitForEvent('download'), link.click()])
    expect(download.suggestedFilename()).toBe('prl-341_cold-flow-characterisation_feedback-reports.zip')
    const entries = await readZip(readFileSync(await download.path()))
    const groups = entries.map((e) => /_group-([a-z]\d)_attempt-\d+\.pdf$/.exec(e.name)?.[1]?.toUpperCase())
    // One report per lab group that handed in (other test files may add B3's hand-in).
    const seeded = [...new Set(DEMO_STUDENTS.map((s) => s.labGroup))].filter((g) => g !== DEMO_GROUP_WITHOUT_HAND_IN)
    expect(new Set(groups).size).toBe(groups.length)
    for (const g of seeded) expect(groups).toContain(g)
    for (const e of entries) expect(e.bytes.subarray(0, 5).toString('latin1')).toBe('%PDF-')
    await page.setViewportSize({ width: 375, height: 812 })
    await noSideways(page)
    await ctx.close()
  }, 120_000)
})

const apiAs = (email: string) => apiSignIn(app.url, email)

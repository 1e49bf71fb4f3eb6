import { eq } from 'drizzle-orm'
import type { Browser } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { seedDemo } from '../../scripts/demo/seed-demo'
import { DEMO_SECTIONS, DEMO_STUDENTS } from '../../scripts/demo/scenario'
import { REGIME_CHOICES } from '../../shared/grading/regime'
import { dominantInputsText, expectedWithUncertaintyText } from '../../shared/grading/uncertainty-text'
import type { MySubmissions, SubmissionDetail } from '../../shared/schemas/submissions'
import { apiSignIn, launchBrowser, noSideways, screenshotPath, serveApp, signIn } from '../helpers/browser'
import { squash } from '../helpers/pdf'
import { courses } from '../../server/db/schema'

let app: Awaited<ReturnType<typeof serveApp>>
let chrome: Awaited<ReturnType<typeof launchBrowser>>
let browser: Browser
let courseId: number
let courseSlug: string

/** A2 is in section A; only this file reads its hand-in, and it changes nothing. */
const GROUP = 'A2'
const student = DEMO_STUDENTS.find((s) => s.labGroup === GROUP)!
const ta = DEMO_SECTIONS[0].ta

beforeAll(async () => {
  app = await serveApp()
  courseId = (await seedDemo(app.db.db)).courseId
  const [keyed] = await app.db.db.select({ slug: courses.slug }).from(courses).where(eq(courses.id, courseId))
  courseSlug = keyed!.slug!
  chrome = await launchBrowser()
  browser = chrome.browser
}, 120_000)
afterAll(async () => {
  await chrome?.close()
  await app?.close()
})

describe('the uncertainty of the expected values on the result pages', () => {
  it('the student sees which inputs dominate each uncertainty (no figures: the module hides expected values); staff see expected ± U (k = 2)', async () => {
    const studentApi = await apiAs(student.email)
    const modules = (await studentApi.get(`/api/courses/${courseId}/modules`).expect(200)).body as {
      id: number
      title: string
    }[]
    const coldFlow = modules.find((m) => /^Cold-flow characterisation/.test(m.title))!
    const mine = (await studentApi.get(`/api/courses/${courseId}/modules/${coldFlow.id}/submissions/mine`).expect(200))
      .body as MySubmissions
    const id = mine.submissions[0]!.id
    // What the pages should say, from the API's numbers (each side's own view).
    const asStudent = (await studentApi.get(`/api/courses/${courseId}/submissions/${id}`).expect(200))
      .body as SubmissionDetail
    const asTa = (await (await apiAs(ta.email)).get(`/api/courses/${courseId}/submissions/${id}`).expect(200))
      .body as SubmissionDetail
    const worded = asStudent.checks.filter((c) => c.uncertainty && dominantInputsText(c.uncertainty.contributions))
    expect(worded.length).toBeGreaterThan(0)

    // The student's result page.
    const ctx = await browser.newContext({ viewport: { width: 1280, height: 900 } })
    const page = await ctx.newPage()
    await signIn(page, app.url, student.email)
    await page.goto(`${app.url}/c/${courseSlug}/hand-ins/${id}`)
    const sources = page.getByTestId('uncertainty-sources')
    await sources.waitFor()
    expect(await sources.getByRole('heading', { name: 'Where the uncertainty comes from' }).count()).toBe(1)
    for (const c of worded) {
      const item = sources.locator(`li[data-check="${c.key}"]`)
      expect(squash(await item.innerText())).toBe(
        squash(`${c.label}: ${dominantInputsText(c.uncertainty!.contributions)}`),
      )
    }
    // Nothing that gives the expected value away: no expected column, no ± U, no k.
    expect(await page.getByTestId('checks').locator('thead th').allInnerTexts()).not.toContain('Expected')
    expect(await page.getByTestId('checks').innerText()).not.toContain('k = 2')
    expect(await sources.innerText()).not.toContain('k = 2')
    await page.screenshot({ path: screenshotPath('uncertainty-student-desktop'), fullPage: true })
    await page.setViewportSize({ width: 375, height: 812 })
    await noSideways(page)
    await page.screenshot({ path: screenshotPath('uncertainty-student-375'), fullPage: true })
    await ctx.close()

    // The staff review page of the same hand-in: expected ± U (k = 2) and the same words.
    const staff = await browser.newContext({ viewport: { width: 1280, height: 900 } })
    const review = await staff.newPage()
    await signIn(review, app.url, ta.email)
    await review.goto(`${app.url}/c/${courseSlug}/review/${id}`)
    const checks = review.getByTestId('checks')
    await checks.waitFor()
    let withU = 0
    for (const c of asTa.checks) {
      const cell = checks.locator(`tr[data-check="${c.key}"] td[data-label="Expected"]`)
      // A regime code is shown by its name, as on the student's page.
      const regime = c.regime ? REGIME_CHOICES.find((r) => r.code === c.expected) : undefined
      const text = regime
        ? `${regime.label} (${regime.code})`
        : expectedWithUncertaintyText(
            c.expected,
            c.uncertainty?.expanded ?? null,
            c.uncertainty?.coverage ?? null,
            c.unit,
          )
      expect(squash(await cell.innerText()), c.key).toBe(squash(text))
      if (text.includes('(k = 2)')) withU++
    }
    expect(withU).toBeGreaterThan(0)
    const staffSources = review.getByTestId('uncertainty-sources')
    expect(await staffSources.innerText()).toContain('± U')
    for (const c of worded) {
      expect(squash(await staffSources.locator(`li[data-check="${c.key}"]`).innerText())).toBe(
        squash(`${c.label}: ${dominantInputsText(c.uncertainty!.contributions)}`),
      )
    }
    await review.screenshot({ path: screenshotPath('uncertainty-review-desktop'), fullPage: true })
    await staff.close()
  }, 120_000)
})

const apiAs = async (email: string) => (await apiSignIn(app.url, email)).agent

import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, Page } from 'playwright-core'
import { seedDemo } from '../../scripts/demo/seed-demo'
import { DEMO_COURSE, DEMO_SECTIONS } from '../../scripts/demo/scenario'
import { REGIME_CHOICES } from '../../shared/grading/regime'
import type { ReviewPage } from '../../shared/schemas/review'
import type { SubmissionDetail } from '../../shared/schemas/submissions'
import { formatInZone } from '../../shared/time'
import { choose, launchBrowser, noSideways, openCourse, screenshotPath, serveApp, signIn } from '../helpers/browser'

let app: Awaited<ReturnType<typeof serveApp>>
let chrome: Awaited<ReturnType<typeof launchBrowser>>
let browser: Browser

const ta = DEMO_SECTIONS[1]!.ta
/** B4's load cell reads 1.6 times too high: the demo flags its thrust as above the ideal nozzle's. */
const GROUP = 'B4'
/** The lab group's name as the seed stores it. */
const GROUP_NAME = `Group ${GROUP}`
const FLAG = 'thrust-above-ideal'

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

/** Picks an option in a PrimeVue select found by its accessible name. */

/** A GET through the page, with the signed-in person's cookies. */
async function api<T>(page: Page, url: string): Promise<{ status: number; body: T }> {
  return page.evaluate(async (u) => {
    const res = await fetch(u, { headers: { Accept: 'application/json' } })
    return { status: res.status, body: (await res.json()) as T }
  }, url)
}

/** The table's loading mask and the picker's list are gone, for a clean screenshot. */
async function settled(page: Page) {
  await expect.poll(() => page.locator('.p-datatable-mask, .p-select-overlay').count()).toBe(0)
}

describe('journey 3: a teaching assistant reviews a flagged submission', () => {
  it('sees only their section in the queue, overrides the total and one check with reasons, comments, resolves the flag and marks the hand-in resolved', async () => {
    const ctx = await browser.newContext({ viewport: { width: 1366, height: 900 } })
    const page = await ctx.newPage()
    await signIn(page, app.url, ta.email)
    await page.getByRole('link', { name: DEMO_COURSE.title }).click()
    await page.getByRole('navigation', { name: 'Course' }).getByRole('link', { name: 'Review', exact: true }).click()
    await page.getByRole('heading', { level: 1, name: 'Review queue' }).waitFor()
    const { courseId, courseSlug } = await openCourse(page)
    expect(courseId).toBeGreaterThan(0)

    // Other test files share the database and may have worked the demo submissions: show every status.
    await choose(page, 'Review status', 'All')
    const table = page.getByTestId('review-table')
    const rows = table.locator('tbody tr')
    await expect.poll(() => rows.filter({ hasText: GROUP_NAME }).count()).toBeGreaterThan(0)
    const sections = await rows.evaluateAll((trs) =>
      trs.map((tr) => (tr as HTMLTableRowElement).cells[2]?.textContent?.trim()),
    )
    expect(sections.length).toBeGreaterThan(0)
    expect(new Set(sections)).toEqual(new Set(['Section B']))
    expect(await table.innerText()).not.toContain('Group A3')
    expect(await table.innerText()).not.toContain('Group Group')

    // The queue on the server agrees: only Section B, and B4's hand-in carries the thrust flag.
    const queue = await api<ReviewPage>(page, `/api/courses/${courseId}/review?status=all&pageSize=100`)
    expect(queue.status).toBe(200)
    expect(queue.body.rows.every((r) => r.sectionName === 'Section B')).toBe(true)
    const row = queue.body.rows.find((r) => r.labGroupName === GROUP_NAME && r.flagCodes.includes(FLAG))
    expect(
      row,
      `a flagged hand-in of ${GROUP_NAME} among ${JSON.stringify(queue.body.rows.map((r) => [r.labGroupName, r.flagCodes]))}`,
    ).toBeDefined()
    // Times are in the course's zone, named, not the browser's (UTC here).
    const handedIn = formatInZone(new Date(row!.submittedAt), DEMO_COURSE.timeZone)
    expect(handedIn).not.toContain('UTC')
    await expect.poll(() => table.innerText()).toContain(handedIn)
    await settled(page)
    await page.screenshot({ path: screenshotPath('review-queue-desktop'), fullPage: true })

    // The group has a hot-fire hand-in in the queue too: open the row of this one's module.
    await rows
      .filter({ hasText: GROUP_NAME })
      .filter({ hasText: row!.moduleTitle })
      .first()
      .getByRole('link', { name: GROUP_NAME })
      .click()
    await page.getByRole('heading', { level: 1, name: new RegExp(`^Review: ${GROUP_NAME},`) }).waitFor()
    expect(page.url()).toContain(`/c/${courseSlug}/review/${row!.submissionId}`)

    const before = await api<SubmissionDetail>(page, `/api/courses/${courseId}/submissions/${row!.submissionId}`)
    const max = before.body.maxScore!
    await expect.poll(() => page.locator('main').innerText()).toContain(`${handedIn} by`)
    expect(max).toBeGreaterThan(0)

    // The regime the group reported is shown by its name, as on the student's page, not as a bare code.
    const regimeChecks = before.body.checks.filter((c) => c.regime)
    expect(regimeChecks.map((c) => c.key)).toEqual(['regime'])
    for (const c of regimeChecks) {
      const choice = REGIME_CHOICES.find((x) => x.code === c.reported)!
      expect(
        await page.getByTestId('checks').locator(`tr[data-check="${c.key}"] td[data-label="Your value"]`).innerText(),
      ).toBe(`${choice.label} (${choice.code})`)
    }
    // A new total the submission does not have yet, inside the allowed range.
    const points =
      before.body.score === Math.round(max * 40) / 100 ? Math.round(max * 60) / 100 : Math.round(max * 40) / 100
    const reason = `Load cell calibration factor 1.6 too large; thrust rescaled by hand (${Date.now()}).`

    // A reason is required: refused at the field, nothing saved.
    await page.getByLabel(/^New total/).fill(String(points))
    await page.getByRole('button', { name: 'Save override' }).click()
    await expect.poll(() => page.locator('#override-reason-error').innerText()).toContain('reason')
    expect(await page.getByLabel(/^Reason/).getAttribute('aria-invalid')).toBe('true')

    await page.getByLabel(/^Reason/).fill(reason)
    await page.getByRole('button', { name: 'Save override' }).click()
    const audit = page.getByTestId('audit-trail')
    await expect.poll(() => audit.locator('tbody tr').filter({ hasText: reason }).count()).toBe(1)
    const entry = await audit.locator('tbody tr').filter({ hasText: reason }).innerText()
    expect(entry).toContain(ta.displayName)
    expect(entry).toContain('total')
    expect(entry).toContain(`→ ${points}`)
    // The audit trail's time is in the course's zone, named.
    const zoneName = formatInZone(new Date(), DEMO_COURSE.timeZone).split(' ').pop()!
    expect(entry).toContain(` ${zoneName}`)
    expect(entry).not.toContain('UTC')
    await expect.poll(() => page.getByTestId('score').innerText()).toContain(`${points}`)
    expect(await page.getByTestId('score').innerText()).toContain(`of ${max} points`)
    await expect.poll(() => page.getByTestId('review-status').innerText()).toBe('in review')

    // One check: the peak thrust, taken to 0 points because the load cell read 1.6 times high.
    await page.getByLabel('What to change').click()
    await page.getByRole('option', { name: /^Peak thrust/ }).click()
    const checkPoints = page.getByLabel(/^New points for Peak thrust/)
    await checkPoints.fill('0')
    const checkReason = `Peak thrust comes from a miscalibrated load cell (${Date.now()}).`
    await page.getByLabel(/^Reason/).fill(checkReason)
    await page.getByRole('button', { name: 'Save override' }).click()
    await expect.poll(() => audit.locator('tbody tr').filter({ hasText: checkReason }).count()).toBe(1)
    const checkEntry = await audit.locator('tbody tr').filter({ hasText: checkReason }).innerText()
    expect(checkEntry).toContain('Peak thrust')
    expect(checkEntry).toContain('→ 0')

    const comment = `Your load cell reads high; recalibrate before the next run (${Date.now()}).`
    await page.getByLabel('Comment to the student (Markdown)').fill(`**${comment}**`)
    await page.getByRole('button', { name: 'Add comment' }).click()
    await expect
      .poll(() => page.locator('#comments-h').locator('..').locator('strong').filter({ hasText: comment }).count())
      .toBe(1)
    await expect.poll(() => page.getByLabel('Comment to the student (Markdown)').inputValue()).toBe('')

    const flag = page.getByTestId('review-flags').locator(`li[data-flag="${FLAG}"]`)
    if ((await flag.getAttribute('class'))?.includes('resolved')) {
      await flag.getByRole('button', { name: /^Re-open/ }).click()
      await expect.poll(() => flag.getAttribute('class')).toContain('open')
    }
    await flag.getByRole('button', { name: /^Resolve/ }).click()
    await expect.poll(() => flag.getAttribute('class')).toContain('resolved')
    await flag.getByRole('button', { name: /^Re-open/ }).waitFor()

    await page.getByRole('button', { name: 'Mark resolved' }).click()
    await expect.poll(() => page.getByTestId('review-status').innerText()).toBe('resolved')
    expect(await page.getByRole('button', { name: 'Mark resolved' }).isDisabled()).toBe(true)

    await page.screenshot({ path: screenshotPath('review-detail-desktop'), fullPage: true })
    await page.setViewportSize({ width: 375, height: 812 })
    await noSideways(page)
    await page.screenshot({ path: screenshotPath('review-detail-375'), fullPage: true })

    // Stored: a fresh read from the server has the new total, the audit entry, the comment, the flag and the status.
    const after = await api<SubmissionDetail>(page, `/api/courses/${courseId}/submissions/${row!.submissionId}`)
    expect(after.body.score).toBe(points)
    expect(after.body.flags.find((f) => f.code === FLAG)?.status).toBe('resolved')
    const extras = await api<{
      reviewStatus: string
      scoreOverride: number | null
      gradeChanges: { reason: string; newPoints: number; changedBy: string }[]
      comments: { html: string }[]
    }>(page, `/api/courses/${courseId}/submissions/${row!.submissionId}/review`)
    expect(extras.body.reviewStatus).toBe('resolved')
    expect(extras.body.scoreOverride).toBe(points)
    expect(extras.body.gradeChanges.find((c) => c.reason === reason)).toMatchObject({
      newPoints: points,
      changedBy: ta.displayName,
    })
    const peak = after.body.checks.find((c) => c.key === 'peak_thrust')!
    expect(peak.pointsAwarded).toBe(0)
    expect(extras.body.comments.some((c) => c.html.includes(`<strong>${comment}</strong>`))).toBe(true)

    // The queue at 375 px: the hand-in now shows as resolved, with the new score.
    await page.getByRole('link', { name: 'Review queue' }).click()
    await page.getByRole('heading', { level: 1, name: 'Review queue' }).waitFor()
    await choose(page, 'Review status', 'Resolved')
    await expect
      .poll(() =>
        page
          .getByTestId('review-table')
          .locator('tbody tr')
          .filter({ hasText: GROUP_NAME })
          .filter({ hasText: 'resolved' })
          .count(),
      )
      .toBeGreaterThan(0)
    await noSideways(page)
    await settled(page)
    await page.screenshot({ path: screenshotPath('review-queue-375'), fullPage: true })
    await ctx.close()
  }, 120_000)
})

import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser } from 'playwright-core'
import { seedDemo } from '../../scripts/demo/seed-demo'
import { DEMO_INSTRUCTOR } from '../../scripts/demo/scenario'
import { launchBrowser, serveApp, signIn } from '../helpers/browser'

/**
 * The editor's preview is checked and rendered on the server as the author types; what arrives is
 * sanitised again in the page, and the preview's calculators are made when scrolled into view.
 */

let app: Awaited<ReturnType<typeof serveApp>>
let chrome: Awaited<ReturnType<typeof launchBrowser>>
let browser: Browser

beforeAll(async () => {
  app = await serveApp()
  await seedDemo(app.db.db)
  chrome = await launchBrowser()
  browser = chrome.browser
})
afterAll(async () => {
  await chrome?.close()
  await app?.close()
})

describe('the module editor preview', () => {
  it('shows problems and text as typed, keeps raw HTML as text, and makes a calculator when it comes into view', async () => {
    const page = await browser.newPage({ viewport: { width: 1400, height: 900 } })
    await signIn(page, app.url, DEMO_INSTRUCTOR.email)
    const courses = (await (await page.request.get(`${app.url}/api/courses`)).json()) as { id: number }[]
    const courseId = courses[0]!.id
    const modules = (await (await page.request.get(`${app.url}/api/courses/${courseId}/modules`)).json()) as {
      id: number
      status: string
    }[]
    const moduleId = modules.find((m) => m.status === 'published')!.id
    const previews: string[] = []
    page.on('request', (r) => {
      if (r.method() === 'POST' && r.url().endsWith(`/modules/${moduleId}/preview`)) previews.push(r.url())
    })
    await page.goto(`${app.url}/courses/${courseId}/modules/${moduleId}/edit`)
    const preview = page.getByTestId('module-preview')
    await preview.locator('.katex').first().waitFor()
    // The saved text's preview is what the server stored with it, then the server's line-marked
    // preview of the same text (one request, for the cursor to follow).
    await preview.locator('[data-source-line]').first().waitFor()
    expect(previews).toHaveLength(1)

    const source = page.getByLabel('Markdown with YAML front matter')
    await source.press('ControlOrMeta+End')
    await source.pressSequentially('\n\nRaw <img src=x onerror=alert(1)> and $\\frac{1}{$ here.\n', {
      delay: 2,
    })
    await preview.getByText('Raw <img src=x onerror=alert(1)> and').waitFor()
    expect(await preview.locator('img').count()).toBe(0)
    await page
      .getByTestId('module-issues')
      .getByText(/TeX error/)
      .waitFor()
    expect(previews.length).toBeGreaterThan(0)

    // The last calculator in the preview is made once it is scrolled to.
    const hosts = preview.locator('.isentrope-calculator')
    const last = hosts.last()
    expect(await hosts.count()).toBeGreaterThanOrEqual(3)
    await last.scrollIntoViewIfNeeded()
    await last.locator('input').first().waitFor()
    await page.close()
  }, 90_000)
})

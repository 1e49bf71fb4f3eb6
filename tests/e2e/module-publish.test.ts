import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser } from 'playwright-core'
import { seedDemo } from '../../scripts/demo/seed-demo'
import { DEMO_COURSE, DEMO_INSTRUCTOR, DEMO_STUDENTS } from '../../scripts/demo/scenario'
import { launchBrowser, openCourse, screenshotPath, serveApp, signIn } from '../helpers/browser'
import { waitForMail } from '../helpers/maildev'

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

describe('journey 1: an instructor publishes a module and students are e-mailed', () => {
  it('edits a draft, sees the equation in the preview, publishes, and a student opens it from the e-mail', async () => {
    const page = await browser.newPage({ viewport: { width: 1400, height: 900 } })
    await signIn(page, app.url, DEMO_INSTRUCTOR.email)
    await page.getByRole('link', { name: DEMO_COURSE.title }).click()
    const list = page.getByTestId('module-list')
    await list.waitFor()
    // The first draft module in the list.
    const draft = list.locator('li').filter({ hasText: 'Being prepared' }).first()
    const title = (await draft.locator('a.title').innerText()).trim()
    await draft.getByRole('link', { name: /^Edit/ }).click()
    await page.getByLabel('Markdown with YAML front matter').waitFor()

    const preview = page.getByTestId('module-preview')
    await preview.locator('.katex').first().waitFor()
    const before = await preview.locator('.katex').count()
    const marker = `Added in the browser check ${Date.now()}`
    const source = page.getByLabel('Markdown with YAML front matter')
    await source.press('ControlOrMeta+End')
    await source.pressSequentially(`\n\n${marker}: $c^* = p_0 A_t / \\dot m$.\n`, { delay: 2 })
    // The preview renders the new equation (KaTeX output) as the text changes.
    await preview.getByText(marker).waitFor()
    await expect.poll(() => preview.locator('.katex').count()).toBe(before + 1)

    await page.getByRole('button', { name: 'Save draft' }).click()
    await page.getByText(/Saved as version \d+ \(being prepared\)/).waitFor()
    await page.getByRole('button', { name: 'Issue to the class…' }).click()
    const dialog = page.getByRole('alertdialog').or(page.getByRole('dialog'))
    await dialog.getByText(/24 enrolled students will get an e-mail/).waitFor()
    await dialog.getByRole('button', { name: 'Issue and e-mail 24' }).click()
    await page.getByText('E-mail queued for 24 students.').waitFor()
    await page.getByTestId('sheet-state').getByText('Issued to the class').waitFor()
    await page.screenshot({ path: screenshotPath('module-editor-published'), fullPage: false })
    await page.close()

    // Every student of the course gets the mail; read one back from the catcher.
    const student = DEMO_STUDENTS[5]!
    const all = await waitForMail((m) => m.filter((x) => x.subject.includes(title)).length >= 24, 20_000)
    const mine = all.find((m) => m.subject.includes(title) && m.to.some((t) => t.address === student.email))
    expect(mine).toBeDefined()
    expect(mine!.text).toContain(DEMO_COURSE.code)
    expect(mine!.html).toContain(title.replace(/&/g, '&amp;'))
    const link = /Read it here: (\S+)/.exec(mine!.text)?.[1]
    // Readable addresses: the course by its code and term, the sheet by its own slug.
    expect(link).toMatch(new RegExp(`^${app.url}/c/prl-341-[a-z]+-\\d{4}/sheets/[a-z0-9-]+$`))

    const ctx = await browser.newContext({ viewport: { width: 390, height: 844 } })
    const sp = await ctx.newPage()
    await signIn(sp, app.url, student.email)
    await sp.goto(link!)
    await sp.getByRole('heading', { level: 1, name: title }).waitFor()
    await sp.getByText(marker).waitFor()
    expect(await sp.locator('.module-content .katex').count()).toBeGreaterThan(0)
    const overflow = await sp.evaluate(() => document.documentElement.scrollWidth - window.innerWidth)
    expect(overflow).toBeLessThanOrEqual(0)
    await sp.screenshot({ path: screenshotPath('student-reads-module-390'), fullPage: false })

    // An old numeric address (from an e-mail sent before the readable ones) lands on the same page.
    const { courseId, courseSlug } = await openCourse(sp)
    const sheetSlug = link!.split('/').pop()!
    const sheets = await sp.evaluate(async (s) => {
      const keys = (await (await fetch(`/api/course-keys/${s}`)).json()) as { sheets: { id: number; slug: string }[] }
      return keys.sheets
    }, courseSlug)
    const sheet = sheets.find((s) => s.slug === sheetSlug)!
    await sp.goto(`${app.url}/courses/${courseId}/modules/${sheet.id}`)
    await sp.waitForURL(link!)
    await sp.getByRole('heading', { level: 1, name: title }).waitFor()
    await ctx.close()
  }, 120_000)

  it('the published demo module renders its equations and live calculators for a student', async () => {
    const page = await browser.newPage({ viewport: { width: 1280, height: 900 } })
    await signIn(page, app.url, DEMO_STUDENTS[0]!.email)
    await page.getByRole('link', { name: DEMO_COURSE.title }).click()
    const list = page.getByTestId('module-list')
    await list.waitFor()
    await list.locator('a.title').first().click()
    const content = page.locator('.module-content')
    await content.locator('.katex').first().waitFor()
    expect(await content.locator('.katex').count()).toBeGreaterThan(5)
    // Each calculator placeholder became a live component with labelled inputs.
    const hosts = content.locator('.isentrope-calculator')
    expect(await hosts.count()).toBeGreaterThanOrEqual(3)
    await content.getByRole('form', { name: 'Nozzle inputs' }).waitFor()
    await content.getByRole('heading', { name: 'Regime boundaries' }).waitFor()
    await page.close()
  })
})

import { readFileSync } from 'node:fs'
import { eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, Page } from 'playwright-core'
import { seedDemo } from '../../scripts/demo/seed-demo'
import { users } from '../../server/db/schema'
import { insertModuleWithVersion } from '../../server/repositories/modules'
import { toVersion } from '../../server/services/module-service'
import { DEMO_COURSE, DEMO_INSTRUCTOR, DEMO_STUDENTS } from '../../scripts/demo/scenario'
import { launchBrowser, noSideways, openCourse, screenshotPath, serveApp, signIn } from '../helpers/browser'
import { waitForMail } from '../helpers/maildev'

let app: Awaited<ReturnType<typeof serveApp>>
let chrome: Awaited<ReturnType<typeof launchBrowser>>
let browser: Browser

beforeAll(async () => {
  app = await serveApp()
  const { courseId } = await seedDemo(app.db.db)
  // The demo issues all its sheets; the journey needs one being prepared: a second reading sheet.
  const tag = Date.now().toString(36)
  const [inst] = await app.db.db.select({ id: users.id }).from(users).where(eq(users.email, DEMO_INSTRUCTOR.email))
  const reading = readFileSync(new URL('../../content/01-nozzle-flow-fundamentals.md', import.meta.url), 'utf8')
  await insertModuleWithVersion(
    app.db.db,
    { courseId, slug: `nozzle-flow-revision-${tag}`, position: 9, createdBy: inst!.id },
    toVersion(
      reading.replace('title: Nozzle flow fundamentals', `title: Nozzle flow revision ${tag}`),
      'r',
      DEMO_COURSE.timeZone,
    ),
  )
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
    await page.getByRole('textbox', { name: 'Markdown with YAML front matter' }).waitFor()

    const preview = page.getByTestId('module-preview')
    await preview.locator('.katex').first().waitFor()
    const before = await preview.locator('.katex').count()
    const marker = `Added in the browser check ${Date.now()}`
    // The source is a code editor: click into it, go to the end, type.
    const source = page.getByRole('textbox', { name: 'Markdown with YAML front matter' })
    await source.click()
    await page.keyboard.press('ControlOrMeta+End')
    await page.keyboard.type(`\n\n${marker}: $c^* = p_0 A_t / \\dot m$.\n`, { delay: 2 })
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

const SOURCE_LABEL = 'Markdown with YAML front matter'

/** Signs in as the instructor and opens the first module of the demo course in the editor. */
async function openEditor(page: Page) {
  await signIn(page, app.url, DEMO_INSTRUCTOR.email)
  await page.getByRole('link', { name: DEMO_COURSE.title }).click()
  const list = page.getByTestId('module-list')
  await list.waitFor()
  await list.getByRole('link', { name: /^Edit/ }).first().click()
  const source = page.getByRole('textbox', { name: SOURCE_LABEL })
  await source.waitFor()
  return { source, editor: page.getByTestId('module-source-editor'), preview: page.getByTestId('module-preview') }
}

/** The 1-based line the editor's cursor is on, read from the highlighted line number. */
async function cursorLine(page: Page): Promise<number> {
  return Number(await page.locator('.cm-lineNumbers .cm-activeLineGutter').innerText())
}

describe('the module source editor', () => {
  it('marks a publish-blocking problem on its line, explains it on hover, and the problem list jumps to it', async () => {
    const page = await browser.newPage({ viewport: { width: 1280, height: 900 } })
    const { source, editor } = await openEditor(page)

    // Replace the whole text, as a person pasting a module would; line 3 breaks a front-matter rule.
    await source.click()
    await page.keyboard.press('ControlOrMeta+A')
    await page.keyboard.insertText(
      ['---', 'title: Marker check', 'attempts: -1', '---', '', '# Marker check', '', 'Some text.'].join('\n'),
    )
    const problems = page.getByTestId('module-issues')
    await problems.getByRole('button', { name: 'line 3' }).waitFor()
    const marker = editor.locator('.cm-lint-marker-error')
    await marker.waitFor()
    expect(await marker.count()).toBe(1)

    // The marker is level with line number 3, and the text of line 3 is the one underlined.
    const markerBox = (await marker.boundingBox())!
    const line3 = (await editor.locator('.cm-lineNumbers .cm-gutterElement').filter({ hasText: /^3$/ }).boundingBox())!
    expect(Math.abs(markerBox.y + markerBox.height / 2 - (line3.y + line3.height / 2))).toBeLessThan(line3.height / 2)
    expect((await editor.locator('.cm-lintRange-error').allInnerTexts()).join('')).toBe('attempts: -1')

    // Hovering the marker shows the same message as the problem list.
    const message = 'attempts: must be at least 1'
    expect(await problems.locator('li').first().innerText()).toContain(message)
    await marker.hover()
    await page.locator('.cm-tooltip-lint').getByText(message).waitFor()

    // From the end of the text, the problem list's line link puts the cursor on line 3, in the editor.
    await source.click()
    await page.keyboard.press('ControlOrMeta+End')
    expect(await cursorLine(page)).toBe(8)
    await problems.getByRole('button', { name: 'line 3' }).click()
    await expect.poll(() => cursorLine(page)).toBe(3)
    expect(await page.evaluate(() => document.activeElement?.classList.contains('cm-content'))).toBe(true)

    // Tab leaves the editor (no keyboard trap) instead of inserting a tab.
    await page.keyboard.press('Tab')
    expect(await page.evaluate(() => !!document.activeElement?.closest('.cm-editor'))).toBe(false)
    expect(await page.locator('.cm-line').nth(2).innerText()).toBe('attempts: -1')

    // Without the mouse: F8 goes from the end of the text to the (only) problem.
    await source.focus()
    await page.keyboard.press('ControlOrMeta+End')
    await expect.poll(() => cursorLine(page)).toBe(8)
    await page.keyboard.press('F8')
    await expect.poll(() => cursorLine(page)).toBe(3)
    await page.screenshot({ path: screenshotPath('module-editor-problem-marker'), fullPage: false })

    // At 375 px the editor fits the width and still marks the problem.
    await page.setViewportSize({ width: 375, height: 812 })
    await noSideways(page)
    await marker.waitFor()
    await source.scrollIntoViewIfNeeded()
    await page.screenshot({ path: screenshotPath('module-editor-375'), fullPage: false })
    await page.close()
  }, 60_000)

  it('falls back to a plain text box, still labelled and editable, when the editor cannot be loaded', async () => {
    const page = await browser.newPage({ viewport: { width: 1280, height: 900 } })
    await page.route(/module-source-codemirror-[^/]*\.js$/, (route) => route.abort())
    await signIn(page, app.url, DEMO_INSTRUCTOR.email)
    await page.getByRole('link', { name: DEMO_COURSE.title }).click()
    await page.getByTestId('module-list').getByRole('link', { name: /^Edit/ }).first().click()
    await page.getByText('The code editor could not be loaded').waitFor()
    const text = page.getByRole('textbox', { name: SOURCE_LABEL })
    expect(await text.evaluate((el) => el.tagName)).toBe('TEXTAREA')
    expect(await text.inputValue()).toMatch(/^---\n[^]*\ntitle: /)
    const save = page.getByRole('button', { name: 'Save draft' })
    expect(await save.isDisabled()).toBe(true)
    await text.press('ControlOrMeta+End')
    await text.pressSequentially('\nOne more line.')
    await expect.poll(() => save.isDisabled()).toBe(false)
    await page.close()
  })

  it('scrolls the preview to the part rendered from the line the cursor is on', async () => {
    const page = await browser.newPage({ viewport: { width: 1280, height: 900 } })
    const { source, preview } = await openEditor(page)
    await preview.locator('[data-source-line]').first().waitFor()
    // Calculators mount as they are scrolled into view and change the height as they do: every
    // check below polls until the preview has settled.
    const scrollTop = () => preview.evaluate((el) => el.scrollTop)
    expect(await scrollTop()).toBe(0)
    expect(await preview.evaluate((el) => el.scrollHeight > el.clientHeight)).toBe(true)

    /** Whether the preview block that starts last at or before this source line is in the preview's view. */
    const blockInView = (line: number) =>
      preview.evaluate((el, at) => {
        const blocks = Array.from(el.querySelectorAll<HTMLElement>('[data-source-line]'))
        const starts = blocks.map((b) => Number(b.dataset.sourceLine)).filter((n) => n <= at)
        if (starts.length === 0) return false
        const block = blocks.find((b) => Number(b.dataset.sourceLine) === Math.max(...starts))!
        const r = block.getBoundingClientRect()
        const box = el.getBoundingClientRect()
        return r.top >= box.top - 1 && r.top < box.bottom
      }, line)

    await source.click()
    await page.keyboard.press('ControlOrMeta+End')
    await expect.poll(scrollTop).toBeGreaterThan(0)
    const last = await cursorLine(page)
    await expect.poll(() => blockInView(last)).toBe(true)

    // Back to the front matter: the preview returns to its top.
    await page.keyboard.press('ControlOrMeta+Home')
    await expect.poll(scrollTop).toBe(0)

    // A page further down, into the body: the preview shows that part.
    await page.keyboard.press('PageDown')
    await page.keyboard.press('PageDown')
    const line = await cursorLine(page)
    expect(line).toBeGreaterThan(20)
    await expect.poll(() => blockInView(line)).toBe(true)
    await page.screenshot({ path: screenshotPath('module-editor-preview-follows'), fullPage: false })
    await page.close()
  }, 60_000)
})

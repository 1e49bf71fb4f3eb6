import { mkdtempSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import path from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, Locator } from 'playwright-core'
import { coldFlowAssignment, demoRuns } from '../../scripts/demo/demo-runs'
import { seedDemo } from '../../scripts/demo/seed-demo'
import { DEMO_COURSE, DEMO_GROUP_WITHOUT_HAND_IN, DEMO_INSTRUCTOR, DEMO_STUDENTS } from '../../scripts/demo/scenario'
import { parseLog } from '../../shared/grading/csv'
import type { ColumnMapping } from '../../shared/grading/csv'
import { gradeSubmission } from '../../shared/grading/grade'
import { REGIME_CHOICES } from '../../shared/grading/regime'
import { valueToSI } from '../../shared/modules/quantities'
import { PSI } from '../../shared/physics/constants'
import { choose, launchBrowser, noSideways, screenshotPath, serveApp, signIn } from '../helpers/browser'

let app: Awaited<ReturnType<typeof serveApp>>
let chrome: Awaited<ReturnType<typeof launchBrowser>>
let browser: Browser

const MODULE_TITLE = 'Cold-flow characterisation of a converging–diverging nozzle'
// A member of the one demo group the seed leaves without a cold-flow hand-in.
const student = DEMO_STUDENTS.find((s) => s.labGroup === DEMO_GROUP_WITHOUT_HAND_IN)!
const assignment = coldFlowAssignment()
const table = assignment.tables[0]!
const run = demoRuns(assignment).find((r) => r.group === DEMO_GROUP_WITHOUT_HAND_IN)!

/**
 * The group's run as another logger would write it: units in the headers, and the chamber
 * transducer in psi gauge, so the page has to suggest a mapping with a unit other than the module's.
 */
const HEADERS = ['time (s)', 'thrust [N]', 'p_receiver (kPa)', 'pc (psig)'] as const
const lines = run.csv.trim().split('\n').slice(1)
const csv = `${[
  HEADERS.join(','),
  ...lines.map((l) => {
    const [t, f, pr, pc] = l.split(',')
    return `${t},${f},${pr},${((Number(pc) * 1000) / PSI).toFixed(4)}`
  }),
].join('\n')}\n`
/** The mapping the page should propose for that file (written out here, not asked of the page). */
const MAPPING: ColumnMapping = {
  t: { header: 'time (s)', unit: 's' },
  thrust: { header: 'thrust [N]', unit: 'N' },
  p_receiver: { header: 'p_receiver (kPa)', unit: 'kPa', pressure: 'gauge' },
  p_chamber: { header: 'pc (psig)', unit: 'psi', pressure: 'gauge' },
}

/** What the student types: the module's units, except the charge pressure read off a psi gauge. */
const typed: Record<string, { text: string; unit: string }> = Object.fromEntries(
  assignment.measurements.map((m) => [m.key, { text: String(run.measurements[m.key]), unit: m.unit }]),
)
typed.p_initial = { text: (((run.measurements.p_initial as number) * 1000) / PSI).toFixed(3), unit: 'psi' }

/** Expected values from the shared grading engine over exactly the data the page will send. */
function engine(reported: Record<string, number>) {
  const parsed = parseLog(csv, table, MAPPING)
  if (!parsed.ok) throw new Error(`test log does not parse: ${parsed.errors.map((e) => e.message).join('; ')}`)
  const measurements = Object.fromEntries(Object.entries(typed).map(([k, v]) => [k, valueToSI(Number(v.text), v.unit)]))
  return gradeSubmission({
    assignment,
    data: { tables: { [table.key]: parsed.columns }, measurements, pressures: parsed.pressures },
    reported,
  })
}
const expected = Object.fromEntries(engine({}).checks.map((c) => [c.key, c.expected]))
/** The one result reported out of tolerance on purpose: peak thrust 25 % high (2 % tolerance, no partial credit). */
const WRONG = 'peak_thrust'
const reported: Record<string, number> = Object.fromEntries(
  assignment.results.map((r) => {
    const e = expected[r.key]
    if (e === null || e === undefined) throw new Error(`no expected value for ${r.key}`)
    return [r.key, r.key === WRONG ? Number((e * 1.25).toPrecision(6)) : Number(e.toPrecision(6))]
  }),
)
const graded = engine(reported)

let logFile = ''
let badLogFile = ''
let handInUrl = ''

beforeAll(async () => {
  app = await serveApp()
  await seedDemo(app.db.db)
  chrome = await launchBrowser()
  browser = chrome.browser
  const dir = mkdtempSync(path.join(tmpdir(), 'isentrope-hand-in-'))
  logFile = path.join(dir, 'b3-cold-flow.csv')
  writeFileSync(logFile, csv)
  // Text in a number column: the thrust of the file's row 6 (header = row 1).
  const bad = csv.split('\n')
  bad[5] = bad[5]!.replace(/^([^,]*),[^,]*,/, '$1,n/a,')
  badLogFile = path.join(dir, 'b3-cold-flow-bad.csv')
  writeFileSync(badLogFile, bad.join('\n'))
}, 120_000)
afterAll(async () => {
  await chrome?.close()
  await app?.close()
})

/** Picks an option in a PrimeVue select found by its accessible name. */

/** No sideways scrolling, once charts have followed a viewport change (chart.js resizes on the next frames). */

/** How many pixels of a canvas have been painted. */
async function paintedPixels(canvas: Locator): Promise<number> {
  return canvas.evaluate((el) => {
    const c = el as HTMLCanvasElement
    const data = c.getContext('2d')!.getImageData(0, 0, c.width, c.height).data
    let n = 0
    for (let i = 3; i < data.length; i += 4) if (data[i]! > 0) n++
    return n
  })
}

describe('journey 2: a student hands in a cold-flow run and sees the auto-check at once', () => {
  it('uploads the log, keeps the suggested mapping, types values in their own units, and sees the score, the failed check and the chart', async () => {
    const ctx = await browser.newContext({ viewport: { width: 1366, height: 900 } })
    const page = await ctx.newPage()
    await signIn(page, app.url, student.email)
    await page.getByRole('link', { name: DEMO_COURSE.title }).click()
    await page.getByTestId('module-list').getByRole('link', { name: MODULE_TITLE, exact: true }).click()
    await page.getByRole('heading', { level: 1, name: MODULE_TITLE }).waitFor()

    const panel = page.getByTestId('hand-in-panel')
    await expect.poll(() => panel.getByTestId('attempts').innerText()).toBe('0 of 3 attempts used')
    await panel.getByRole('link', { name: 'Hand in' }).click()
    await page.getByRole('heading', { level: 1, name: `Hand in: ${MODULE_TITLE}` }).waitFor()
    handInUrl = page.url()
    expect(await page.getByTestId('hand-in-group').innerText()).toContain(`Group ${DEMO_GROUP_WITHOUT_HAND_IN}`)
    expect(await page.getByTestId('attempts').innerText()).toBe('0 of 3 used')

    // The log: read in the browser, first rows shown, mapping suggested from the headers.
    await page.getByLabel('Log file (CSV or text, comma-separated)').setInputFiles(logFile)
    const preview = page.getByTestId('log-preview')
    await preview.waitFor()
    expect(await preview.locator('thead th').allInnerTexts()).toEqual(['row', ...HEADERS])
    expect(await preview.locator('tbody tr').count()).toBe(8)
    const rows = csv.split('\n')
    expect(await preview.locator('tbody tr').first().locator('td').allInnerTexts()).toEqual([
      '2',
      ...rows[1]!.split(','),
    ])
    for (const c of table.columns) {
      const m = MAPPING[c.key]!
      expect(await page.getByRole('combobox', { name: `${c.label} column in the file`, exact: true }).innerText()).toBe(
        m.header,
      )
      expect(await page.getByRole('combobox', { name: `${c.label} unit in the file`, exact: true }).innerText()).toBe(
        m.unit,
      )
      if (m.pressure)
        expect(await page.getByRole('combobox', { name: `${c.label} read as`, exact: true }).innerText()).toBe(
          m.pressure,
        )
    }
    expect(await page.locator('.log-upload .tag.suggested').count()).toBe(table.columns.length)
    expect(await page.getByTestId('file-issues').count()).toBe(0)
    await page.getByText(`${lines.length} data rows read`).waitFor()
    const previewChart = page.locator('.log-upload canvas[role="img"]')
    await previewChart.waitFor()
    await expect.poll(() => paintedPixels(previewChart)).toBeGreaterThan(500)

    await page.screenshot({ path: screenshotPath('hand-in-log-mapped-desktop'), fullPage: true })

    // Measurements, the charge pressure in psi (the page must send psi, not the module's kPa).
    for (const m of assignment.measurements) {
      await page.getByRole('textbox', { name: m.label, exact: true }).fill(typed[m.key]!.text)
    }
    await choose(page, 'Receiver pressure before the run unit', 'psi')
    // A unit of the wrong kind is not offered.
    const unitPicker = page.getByRole('combobox', { name: 'Receiver pressure before the run unit', exact: true })
    await unitPicker.click()
    const offered = await page
      .locator(`[id="${await unitPicker.getAttribute('aria-controls')}"]`)
      .getByRole('option')
      .allInnerTexts()
    await page.keyboard.press('Escape')
    expect(offered).toContain('bar')
    expect(offered).not.toContain('N')
    expect(offered).not.toContain('mm')

    for (const r of assignment.results) {
      if (!r.regime) {
        await page.getByRole('textbox', { name: r.label, exact: true }).fill(String(reported[r.key]))
        continue
      }
      // The regime is offered in words, not as a number to type; the page sends its code.
      expect(await page.getByRole('textbox', { name: r.label }).count()).toBe(0)
      const group = page.getByRole('group', { name: r.label })
      const offeredRegimes = await group
        .getByRole('radio')
        .evaluateAll((els) => els.map((e) => e.closest('label')?.querySelector('.name')?.textContent?.trim()))
      expect(offeredRegimes).toEqual(REGIME_CHOICES.map((c) => c.label))
      const choice = REGIME_CHOICES.find((c) => c.code === reported[r.key])!
      await group.getByRole('radio', { name: new RegExp(`^${choice.label}`) }).check()
    }

    // Record every state the progress area goes through, since the upload is quick on loopback.
    await page.evaluate(() => {
      const seen: string[] = []
      ;(window as unknown as { progressSeen: string[] }).progressSeen = seen
      const note = () => {
        const el = document.querySelector('[data-testid="hand-in-progress"]')
        const state = el?.getAttribute('data-state') ?? 'none'
        const bar = el?.querySelector('[role="progressbar"]') ? 'bar' : 'no-bar'
        const entry = `${state}:${bar}:${el?.textContent?.trim().slice(0, 20)}`
        if (seen[seen.length - 1] !== entry) seen.push(entry)
      }
      new MutationObserver(note).observe(document.body, {
        subtree: true,
        childList: true,
        attributes: true,
        characterData: true,
      })
    })
    // A slow link (DevTools network emulation), so the upload and grading states stay on screen long enough to see.
    const cdp = await ctx.newCDPSession(page)
    await cdp.send('Network.enable')
    await cdp.send('Network.emulateNetworkConditions', {
      offline: false,
      latency: 1500,
      downloadThroughput: -1,
      uploadThroughput: 48 * 1024,
    })
    await page.getByRole('button', { name: 'Hand in attempt 1 of 3' }).click()
    const progress = page.getByTestId('hand-in-progress')
    await progress.getByText(/Uploading… \d+ %/).waitFor()
    await progress.evaluate((el) => el.scrollIntoView({ block: 'center' }))
    await page.screenshot({ path: screenshotPath('hand-in-uploading'), fullPage: false })
    await progress.getByText('Grading…', { exact: false }).waitFor()

    // The result page.
    await page.getByRole('heading', { level: 1, name: `Attempt 1: ${MODULE_TITLE}` }).waitFor({ timeout: 30_000 })
    await cdp.send('Network.emulateNetworkConditions', {
      offline: false,
      latency: 0,
      downloadThroughput: -1,
      uploadThroughput: -1,
    })
    const seen = await page.evaluate(() => (window as unknown as { progressSeen: string[] }).progressSeen)
    // A determinate bar that moved (some percentage below 100), then the indeterminate grading bar.
    const uploading = seen.findIndex((e) => /^uploading:bar:Uploading… [1-9]\d? %/.test(e))
    const grading = seen.findIndex((e) => e.startsWith('grading:bar:Grading…'))
    expect(uploading, seen.join(' | ')).toBeGreaterThanOrEqual(0)
    expect(grading, seen.join(' | ')).toBeGreaterThan(uploading)

    const scoreText = await page.getByTestId('score').innerText()
    const score = /([\d.]+)\s*of\s*([\d.]+) points/.exec(scoreText.replace(/\s+/g, ' '))
    expect(score, scoreText).not.toBeNull()
    expect(Number(score![1])).toBeCloseTo(graded.score, 6)
    expect(Number(score![2])).toBe(graded.maxScore)
    expect(graded.score).toBeLessThan(graded.maxScore)

    const checks = page.getByTestId('checks')
    for (const c of graded.checks) {
      const row = checks.locator(`tr[data-check="${c.key}"]`)
      expect(await row.getAttribute('data-outcome'), c.key).toBe(c.outcome)
    }
    // The regime the student chose is shown by its name on the result page too, not as a bare code.
    for (const r of assignment.results.filter((x) => x.regime)) {
      const choice = REGIME_CHOICES.find((c) => c.code === reported[r.key])!
      expect(await checks.locator(`tr[data-check="${r.key}"] td[data-label="Your value"]`).innerText()).toBe(
        `${choice.label} (${choice.code})`,
      )
    }
    const wrongRow = checks.locator(`tr[data-check="${WRONG}"]`)
    expect(await wrongRow.getAttribute('data-outcome')).toBe('fail')
    expect(await wrongRow.innerText()).toContain('Failed')
    expect(await wrongRow.locator('.pi-times-circle').count()).toBe(1)
    expect(await checks.locator('tr[data-outcome="pass"]').count()).toBe(assignment.results.length - 1)
    // The module hides expected values from students.
    expect(await checks.locator('thead th').allInnerTexts()).not.toContain('Expected')

    // Notes on the data: exactly what the engine raises for these data (none for a sound run).
    const flagCodes = await page
      .locator('[data-testid="flags"] li')
      .evaluateAll((els) => els.map((e) => e.getAttribute('data-flag')))
    expect(flagCodes.sort()).toEqual(graded.flags.map((f) => f.code).sort())

    // The chart: an image with a name, painted, with a text summary.
    const chart = page.getByTestId('thrust-chart')
    await chart.waitFor()
    expect(await chart.getAttribute('role')).toBe('img')
    expect(await chart.getAttribute('aria-label')).toContain('thrust')
    await expect.poll(() => paintedPixels(chart)).toBeGreaterThan(2000)
    expect(await page.locator('#thrust-chart-summary').innerText()).toContain('supersonic')

    // The psi value was kept as typed, and the uploaded file downloads byte for byte.
    expect(await page.getByRole('definition').filter({ hasText: 'psi' }).innerText()).toBe(
      `${Number(typed.p_initial!.text)} psi gauge`,
    )
    const download = page.getByTestId('files').getByRole('link', { name: 'b3-cold-flow.csv' })
    const res = await page.request.get(new URL((await download.getAttribute('href'))!, app.url).toString())
    expect(res.status()).toBe(200)
    expect(await res.text()).toBe(csv)
    await page.getByTestId('attempt-list').getByText('Attempt 1 (this one)').waitFor()

    await page.screenshot({ path: screenshotPath('hand-in-result-desktop'), fullPage: true })
    await page.setViewportSize({ width: 375, height: 812 })
    await page.getByTestId('thrust-chart').waitFor()
    await noSideways(page)
    await page.screenshot({ path: screenshotPath('hand-in-result-375'), fullPage: true })

    // Back on the module page, the attempt is listed with its score.
    await page.setViewportSize({ width: 1366, height: 900 })
    await page
      .getByRole('navigation', { name: 'Breadcrumb' })
      .getByRole('link', { name: MODULE_TITLE, exact: true })
      .click()
    await expect
      .poll(() => page.getByTestId('hand-in-panel').getByTestId('attempts').innerText())
      .toBe('1 of 3 attempts used')
    const listed = page.getByTestId('hand-in-panel').getByTestId('attempt-list')
    expect(await listed.innerText()).toContain(`${Number(score![1])} of ${graded.maxScore}`)
    await page.getByTestId('hand-in-panel').screenshot({ path: screenshotPath('module-hand-in-panel') })
    await ctx.close()
  }, 180_000)

  it('a log with text in a number column shows the row and column at the upload, and nothing is sent', async () => {
    expect(handInUrl).not.toBe('')
    const ctx = await browser.newContext({ viewport: { width: 375, height: 812 } })
    const page = await ctx.newPage()
    await signIn(page, app.url, student.email)
    let posted = 0
    page.on('request', (r) => {
      if (r.method() === 'POST' && r.url().endsWith('/submissions')) posted++
    })
    await page.goto(handInUrl)
    await page.getByRole('heading', { level: 1, name: `Hand in: ${MODULE_TITLE}` }).waitFor()
    await page.getByLabel('Log file (CSV or text, comma-separated)').setInputFiles(badLogFile)

    const issues = page.getByTestId('file-issues')
    await issues.waitFor()
    const item = issues.locator('li[data-row="6"][data-column="thrust [N]"]')
    expect(await item.count()).toBe(1)
    expect(await item.innerText()).toContain('Row 6')
    expect(await item.innerText()).toContain('thrust [N]')
    expect(await item.innerText()).toContain('n/a')
    // The preview outlines the cell.
    expect(await page.getByTestId('log-preview').locator('td.bad-cell').allInnerTexts()).toEqual(['n/a'])
    // The upload's control is described by the list, so a screen reader hears it there too.
    const describedBy =
      (await page.getByLabel('Log file (CSV or text, comma-separated)').getAttribute('aria-describedby')) ?? ''
    expect(describedBy.split(' ')).toContain(await issues.locator('ul').getAttribute('id'))

    await page.getByRole('button', { name: /^Hand in attempt 2 of 3/ }).click()
    const summary = page.getByTestId('error-summary')
    await summary.waitFor()
    await expect
      .poll(() => page.evaluate(() => document.activeElement?.getAttribute('data-testid')))
      .toBe('error-summary')
    expect(await summary.getByRole('link', { name: /the file has a problem/ }).count()).toBe(1)
    await noSideways(page)
    await page.screenshot({ path: screenshotPath('hand-in-bad-file-375'), fullPage: true })
    expect(posted).toBe(0)
    await ctx.close()
  }, 120_000)

  it('the log upload takes a file dropped on its zone, and one chosen from the keyboard', async () => {
    expect(handInUrl).not.toBe('')
    const ctx = await browser.newContext({ viewport: { width: 375, height: 812 } })
    const page = await ctx.newPage()
    await signIn(page, app.url, student.email)
    await page.goto(handInUrl)
    await page.getByRole('heading', { level: 1, name: `Hand in: ${MODULE_TITLE}` }).waitFor()
    const zone = page.getByTestId('log-drop-zone')
    const input = page.getByLabel('Log file (CSV or text, comma-separated)')

    // A file dragged over the zone: the zone says so, in words a screen reader hears too.
    const dropped = await page.evaluateHandle((text) => {
      const dt = new DataTransfer()
      dt.items.add(new File([text], 'dropped-run.csv', { type: 'text/csv' }))
      return dt
    }, csv)
    await zone.dispatchEvent('dragenter', { dataTransfer: dropped })
    await zone.dispatchEvent('dragover', { dataTransfer: dropped })
    expect(await zone.getAttribute('class')).toContain('dragging')
    expect(await page.getByRole('status').filter({ hasText: 'Drop the file to read it' }).count()).toBe(1)
    await zone.dispatchEvent('drop', { dataTransfer: dropped })

    // Dropped: read like a chosen file (preview, mapping, row count), and the input names it.
    const preview = page.getByTestId('log-preview')
    await preview.waitFor()
    expect(await preview.locator('thead th').allInnerTexts()).toEqual(['row', ...HEADERS])
    await page.getByText(`${lines.length} data rows read`).waitFor()
    expect(await input.evaluate((el) => (el as HTMLInputElement).files?.[0]?.name)).toBe('dropped-run.csv')
    expect(await zone.getAttribute('class')).not.toContain('dragging')
    await noSideways(page)
    await page.screenshot({ path: screenshotPath('hand-in-drop-375'), fullPage: true })

    // From the keyboard: Tab reaches the file control, its focus is visible, and Enter opens the chooser.
    await page.goto(handInUrl)
    await page.getByRole('heading', { level: 1, name: `Hand in: ${MODULE_TITLE}` }).waitFor()
    // Every request of the page answered, so nothing re-renders the form under the keyboard's focus.
    await page.waitForLoadState('networkidle')
    // Listening before the key is pressed: playwright turns on its catching of the browser's file
    // dialog when the first listener is added, and a dialog opened before that is never reported.
    const chooser = page.waitForEvent('filechooser')
    const inputId = await input.getAttribute('id')
    let reached = false
    for (let i = 0; i < 60 && !reached; i++) {
      await page.keyboard.press('Tab')
      reached = await page.evaluate((id) => document.activeElement?.id === id, inputId)
    }
    expect(reached).toBe(true)
    expect(await input.evaluate((el) => getComputedStyle(el).outlineStyle)).not.toBe('none')
    expect(await page.evaluate(() => document.activeElement?.id)).toBe(inputId)
    await page.keyboard.press('Enter')
    await (await chooser).setFiles(logFile)
    await page.getByTestId('log-preview').waitFor()
    await page.getByText(`${lines.length} data rows read`).waitFor()
    expect(await input.evaluate((el) => (el as HTMLInputElement).files?.[0]?.name)).toBe('b3-cold-flow.csv')
    await ctx.close()
  }, 120_000)

  it('staff see no hand-in panel on the module page', async () => {
    const page = await browser.newPage({ viewport: { width: 1280, height: 900 } })
    await signIn(page, app.url, DEMO_INSTRUCTOR.email)
    await page.getByRole('link', { name: DEMO_COURSE.title }).click()
    await page.getByTestId('module-list').getByRole('link', { name: MODULE_TITLE, exact: true }).click()
    await page.getByRole('heading', { level: 1, name: MODULE_TITLE }).waitFor()
    await page.getByRole('heading', { name: 'What you hand in' }).waitFor()
    await page.waitForLoadState('networkidle')
    expect(await page.getByTestId('hand-in-panel').count()).toBe(0)
    expect(await page.getByRole('link', { name: 'Hand in', exact: true }).count()).toBe(0)
    await page.close()
  }, 60_000)
})

import { mkdtempSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import path from 'node:path'
import sharp from 'sharp'
import type { Browser, Page } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { renderJetPhoto } from '../../scripts/demo/jet-photo'
import { measureJet } from '../../shared/images/jet-marks'
import type { JetMarks, Point } from '../../shared/images/jet-marks'
import { fullyExpandedJet, machDiskDistance, shockCellSpacing } from '../../shared/physics'
import type { MySubmissions, SubmissionDetail } from '../../shared/schemas/submissions'
import type { Fixture, TestContext } from '../helpers/app'
import { PASSWORD, seedFixture } from '../helpers/app'
import { axeFindings, formatFindings } from '../helpers/a11y'
import { apiSignIn, launchBrowser, noSideways, screenshotPath, serveApp, signIn } from '../helpers/browser'

let app: Awaited<ReturnType<typeof serveApp>>
let chrome: Awaited<ReturnType<typeof launchBrowser>>
let browser: Browser
let fx: Fixture
let sheet: { id: number; slug: string }
let photoFile = ''
let svgFile = ''

/**
 * A sheet of our own with one photograph: the exit diameter typed (the scale's default length),
 * 2 to 4 cell ends, the Mach disk when seen, and one plain result so the hand-in is graded.
 */
const SOURCE = `---
title: Reading a jet photograph
due:
  at: "2030-06-01T17:00"
  timeZone: UTC
assignment:
  measurements:
    - { key: d_exit, label: Exit diameter, unit: mm, min: 1, max: 50 }
  images:
    - key: jet
      label: Shadowgraph of the jet
      instructions: Mark the scale across the nozzle exit, the exit plane, each cell end and the Mach disk.
      cells: { min: 2, max: 4 }
      machDisk: optional
      scaleFrom: d_exit
  results:
    - key: exit_area
      label: Exit area
      unit: mm2
      expected: areaFromDiameter(d_exit)
      tolerance: { relative: 0.01 }
      points: 1
---

Invented test sheet.
`
/** π/4 · (8 mm)² = 16π mm², worked by hand. */
const EXIT_AREA_MM2 = (16 * Math.PI).toFixed(3)

// The picture: the demo's invented shadowgraph of an under-expanded jet from an 8 mm exit (40 px at 5000 px/m).
const jet = fullyExpandedJet(0.005, 4.2e5, 98.6e3, 1.4)
const photo = renderJetPhoto({
  exitDiameter: 0.008,
  jetDiameter: jet.diameter,
  cellSpacing: shockCellSpacing(jet.diameter, jet.mach),
  cells: 4,
  machDisk: machDiskDistance(0.008, 4.2e5, 98.6e3),
  width: 480,
  height: 240,
  pixelsPerMetre: 5000,
  seed: 11,
})
const truth = photo.truth

beforeAll(async () => {
  app = await serveApp()
  fx = await seedFixture({ handle: app.db } as TestContext)
  const inst = await apiAs(fx.instructor.email)
  const made = await inst.agent
    .post(`/api/courses/${fx.courseId}/modules`)
    .set('x-csrf-token', inst.csrf)
    .send({ source: SOURCE })
  if (made.status !== 201) throw new Error(`create failed: ${made.status} ${JSON.stringify(made.body)}`)
  sheet = { id: made.body.id, slug: made.body.slug }
  await inst.agent
    .post(`/api/courses/${fx.courseId}/modules/${sheet.id}/publish`)
    .set('x-csrf-token', inst.csrf)
    .send({ versionId: made.body.current.id })
    .expect(200)
  const dir = mkdtempSync(path.join(tmpdir(), 'isentrope-jet-photo-'))
  photoFile = path.join(dir, 'shadowgraph.png')
  writeFileSync(
    photoFile,
    await sharp(Buffer.from(photo.pixels), { raw: { width: photo.width, height: photo.height, channels: 1 } })
      .png()
      .toBuffer(),
  )
  svgFile = path.join(dir, 'drawing.png')
  writeFileSync(svgFile, '<svg xmlns="http://www.w3.org/2000/svg" width="10" height="10"/>')
  chrome = await launchBrowser()
  browser = chrome.browser
}, 120_000)

afterAll(async () => {
  await chrome?.close()
  await app?.close()
})

/** Where an image pixel is on the screen, from the picture's box (the whole picture is in view). */
async function screenAt(page: Page, p: Point): Promise<{ x: number; y: number }> {
  const picture = page.locator('[data-photo="hand-in-p-jet"] .picture svg')
  await picture.scrollIntoViewIfNeeded()
  const box = await picture.boundingBox()
  if (!box) throw new Error('the picture is not on the page')
  return { x: box.x + (p.x * box.width) / photo.width, y: box.y + (p.y * box.height) / photo.height }
}

async function clickAt(page: Page, p: Point) {
  const s = await screenAt(page, p)
  await page.mouse.click(s.x, s.y)
}

const announced = (page: Page) => page.getByTestId('photo-announce').innerText()
const markKeys = (page: Page, scope: string) =>
  page
    .locator(`${scope} [data-testid="photo-marks"] li`)
    .evaluateAll((els) => els.map((e) => e.getAttribute('data-mark')))

/** Arrow presses that take the cross-hair from `from` to `to` (whole pixels): Shift for tens. */
async function moveCross(page: Page, from: Point, to: Point) {
  for (const [d, minus, plus] of [
    [Math.round(to.x) - Math.round(from.x), 'ArrowLeft', 'ArrowRight'],
    [Math.round(to.y) - Math.round(from.y), 'ArrowUp', 'ArrowDown'],
  ] as const) {
    const key = d < 0 ? minus : plus
    const n = Math.abs(d)
    for (let i = 0; i < Math.floor(n / 10); i++) await page.keyboard.press(`Shift+${key}`)
    for (let i = 0; i < n % 10; i++) await page.keyboard.press(key)
  }
}

describe('a photograph of the jet, marked in the browser', () => {
  it('the student marks the photograph (one cell end and the Mach disk by keyboard only), hands it in and sees the marks; the TA sees them on the review page', async () => {
    // bypassCSP: axe is injected into the marked form below (the page's policy allows no inline script).
    const ctx = await browser.newContext({ viewport: { width: 1280, height: 900 }, bypassCSP: true })
    const page = await ctx.newPage()
    await signIn(page, app.url, fx.student.email, PASSWORD)
    await page.goto(`${app.url}/c/${fx.courseSlug}/sheets/${sheet.slug}/hand-in`)
    await page.getByRole('heading', { level: 2, name: 'Photographs' }).waitFor()
    await page.getByRole('textbox', { name: 'Exit diameter', exact: true }).fill('8')
    await page.getByRole('textbox', { name: 'Exit area', exact: true }).fill(EXIT_AREA_MM2)

    // A drawing named like a picture is refused in the form, by what its bytes are.
    const picker = page.getByLabel('Photograph file (PNG or JPEG, up to 10 MB)')
    await picker.setInputFiles(svgFile)
    await expect
      .poll(() => page.locator('[data-photo="jet"] [data-testid="field-error"]').innerText())
      .toContain('drawing.png is an SVG drawing; choose a PNG or JPEG photograph.')

    await picker.setInputFiles(photoFile)
    const tool = page.locator('[data-photo="hand-in-p-jet"]')
    await tool.waitFor()
    expect(await tool.locator('.picture svg').getAttribute('viewBox')).toBe(`0 0 ${photo.width} ${photo.height}`)

    // The scale across the nozzle lips by clicking; the tool moves on to the exit plane by itself.
    await clickAt(page, truth.lips[0])
    await clickAt(page, truth.lips[1])
    await expect.poll(() => tool.locator('button[data-mode="exit-plane"]').getAttribute('aria-pressed')).toBe('true')

    // Sending now is refused, and the form says which mark is missing.
    await page.getByRole('button', { name: /Hand in attempt 1 of/ }).click()
    const summary = page.getByRole('heading', { name: 'The hand-in was not sent' })
    await summary.waitFor()
    expect(await tool.getByTestId('field-error').innerText()).toContain(
      'Exit plane: mark the exit plane (the nozzle’s exit, on the axis).',
    )
    expect(await tool.getByTestId('field-error').innerText()).toContain(
      'Cell ends: mark at least 2 cell ends (0 marked).',
    )

    // The exit plane and two cell ends by clicking.
    await clickAt(page, truth.exitPlane)
    await expect.poll(() => tool.locator('button[data-mode="cell-end"]').getAttribute('aria-pressed')).toBe('true')
    await clickAt(page, truth.cellEnds[0]!)
    await clickAt(page, truth.cellEnds[1]!)
    await expect.poll(() => announced(page)).toMatch(/^Cell end 2 placed at \d+\.\d mm from the exit plane$/)

    // The third cell end by keyboard only: focus the picture, move the cross-hair, Enter.
    const area = page.locator('#hand-in-p-jet-marks')
    await area.focus()
    await page.keyboard.press('Escape') // let go of the mark the last click selected
    let cross: Point = truth.cellEnds[1]!
    await moveCross(page, { x: Math.round(cross.x), y: Math.round(cross.y) }, truth.cellEnds[2]!)
    await expect.poll(() => tool.getByTestId('photo-cursor').count()).toBe(1)
    await page.keyboard.press('Enter')
    await expect.poll(() => announced(page)).toMatch(/^Cell end 3 placed at \d+\.\d mm from the exit plane$/)
    cross = { x: Math.round(truth.cellEnds[2]!.x), y: Math.round(truth.cellEnds[2]!.y) }

    // The Mach disk by keyboard too: its mode button, back to the picture, the cross-hair, Enter.
    await tool.locator('button[data-mode="mach-disk"]').focus()
    await page.keyboard.press('Enter')
    await area.focus()
    await moveCross(page, cross, truth.machDisk!)
    await page.keyboard.press('Enter')
    await expect.poll(() => announced(page)).toMatch(/^Mach disk placed at \d+\.\d{1,2} mm from the exit plane$/)

    // A mark chosen in the list moves with the arrow keys (1 px, Shift 10 px); undo puts it back.
    const list = tool.getByTestId('photo-marks')
    const first = list.locator('button[data-mark="cell-end-1"]')
    const before = await first.innerText()
    await first.focus()
    await page.keyboard.press('Shift+ArrowRight')
    await expect.poll(() => first.getAttribute('aria-pressed')).toBe('true')
    await expect.poll(() => announced(page)).toMatch(/^Cell end 1 moved to /)
    expect(await first.innerText()).not.toBe(before)
    await page.keyboard.press('Control+z')
    await expect.poll(() => first.innerText()).toBe(before)

    // Delete from the list removes a mark; the Undo button brings it back.
    const third = list.locator('button[data-mark="cell-end-3"]')
    await third.focus()
    await page.keyboard.press('Delete')
    await expect.poll(() => announced(page)).toBe('Cell end 3 removed')
    expect(await list.locator('button[data-mark="cell-end-3"]').count()).toBe(0)
    await tool.getByRole('button', { name: 'Undo' }).click()
    await expect.poll(() => list.locator('button[data-mark="cell-end-3"]').count()).toBe(1)

    // A mark dragged with the pointer moves; undo puts it back.
    const exitButton = list.locator('button[data-mark="exit-plane"]')
    const exitBefore = await exitButton.innerText()
    const grip = await screenAt(page, truth.exitPlane)
    await page.mouse.move(grip.x, grip.y)
    await page.mouse.down()
    await page.mouse.move(grip.x + 10, grip.y + 15, { steps: 4 })
    await page.mouse.up()
    await expect.poll(() => announced(page)).toMatch(/^Exit plane moved to \d+, \d+ pixels$/)
    expect(await exitButton.innerText()).not.toBe(exitBefore)
    await tool.getByRole('button', { name: 'Undo' }).click()
    await expect.poll(() => exitButton.innerText()).toBe(exitBefore)

    // Zoom in (the marks keep their places in the picture's pixels), and back to the whole picture.
    const viewBox = () => tool.locator('.picture svg').getAttribute('viewBox')
    await tool.getByRole('button', { name: 'Zoom in' }).click()
    await expect.poll(viewBox).not.toBe(`0 0 ${photo.width} ${photo.height}`)
    expect((await viewBox())!.split(' ').slice(2).map(Number)).toEqual([photo.width / 1.5, photo.height / 1.5])
    await tool.getByRole('button', { name: 'Pan right' }).click()
    await tool.getByRole('button', { name: 'Whole picture' }).click()
    await expect.poll(viewBox).toBe(`0 0 ${photo.width} ${photo.height}`)
    // The wheel zooms about the pointer.
    const middle = await screenAt(page, { x: photo.width / 2, y: photo.height / 2 })
    await page.mouse.move(middle.x, middle.y)
    await page.mouse.wheel(0, -100)
    await expect.poll(viewBox).not.toBe(`0 0 ${photo.width} ${photo.height}`)
    expect(Number((await viewBox())!.split(' ')[2])).toBeCloseTo(photo.width / 1.25, 6)
    await tool.getByRole('button', { name: 'Whole picture' }).click()
    await expect.poll(viewBox).toBe(`0 0 ${photo.width} ${photo.height}`)

    expect(await markKeys(page, '[data-photo="hand-in-p-jet"]')).toEqual([
      'scale-1',
      'scale-2',
      'exit-plane',
      'cell-end-1',
      'cell-end-2',
      'cell-end-3',
      'mach-disk',
    ])
    // The readout: the scale is the typed 8 mm exit diameter.
    const readout = tool.getByTestId('photo-readout')
    expect(await readout.getByTestId('photo-scale').innerText()).toMatch(/^8 mm over \d+\.\d pixels/)
    expect(await readout.locator('tr[data-row="mean"]').count()).toBe(1)
    expect(await readout.locator('tr[data-row="mach-disk"]').count()).toBe(1)
    await page.screenshot({ path: screenshotPath('jet-photo-marked-desktop'), fullPage: true })
    // The marked tool itself (the automatic check after the test sees the form before a picture is chosen).
    const wide = await axeFindings(page, 1280)
    expect(wide, formatFindings(wide)).toEqual([])

    // At phone width the picture fits and nothing scrolls sideways.
    await page.setViewportSize({ width: 375, height: 812 })
    await noSideways(page)
    const pictureBox = await tool.locator('.picture').boundingBox()
    expect(pictureBox!.width).toBeLessThanOrEqual(375)
    const narrow = await axeFindings(page, 375)
    expect(narrow, formatFindings(narrow)).toEqual([])
    await page.screenshot({ path: screenshotPath('jet-photo-marked-phone'), fullPage: true })
    await page.setViewportSize({ width: 1280, height: 900 })

    await page.getByRole('button', { name: /Hand in attempt 1 of/ }).click()
    await page.waitForURL(/\/hand-ins\/\d+$/)
    const submissionId = Number(/\/hand-ins\/(\d+)$/.exec(page.url())![1])

    // What was stored: the keyboard's marks exactly where the cross-hair was, the clicked ones within a pixel.
    const st = await apiAs(fx.student.email)
    const mine = (await st.agent.get(`/api/courses/${fx.courseId}/modules/${sheet.id}/submissions/mine`).expect(200))
      .body as MySubmissions
    expect(mine.submissions.map((s) => s.id)).toEqual([submissionId])
    const detail = (await st.agent.get(`/api/courses/${fx.courseId}/submissions/${submissionId}`).expect(200))
      .body as SubmissionDetail
    expect(detail.images.map((i) => [i.key, i.width, i.height, i.contentType])).toEqual([
      ['jet', photo.width, photo.height, 'image/png'],
    ])
    const stored: JetMarks = detail.images[0]!.marks
    expect(stored.scale).toMatchObject({ length: 8, unit: 'mm' })
    expect(stored.cellEnds[2]).toEqual({ x: Math.round(truth.cellEnds[2]!.x), y: Math.round(truth.cellEnds[2]!.y) })
    expect(stored.machDisk).toEqual({ x: Math.round(truth.machDisk!.x), y: Math.round(truth.machDisk!.y) })
    for (const [got, want] of [
      [stored.scale.from, truth.lips[0]],
      [stored.scale.to, truth.lips[1]],
      [stored.exitPlane, truth.exitPlane],
      [stored.cellEnds[0]!, truth.cellEnds[0]!],
      [stored.cellEnds[1]!, truth.cellEnds[1]!],
    ] as const) {
      expect(Math.hypot(got.x - want.x, got.y - want.y)).toBeLessThan(1.5)
    }
    const measured = measureJet(stored)
    // The readout writes mm with three significant figures below 100 mm (two decimals below 10 mm).
    const mm = measured.meanCellSpacing * 1000
    const meanMm = mm.toFixed(mm < 10 ? 2 : 1)
    expect(mm).toBeLessThan(100)

    // The result page shows the photograph with the same marks and distances.
    await page.getByRole('heading', { level: 2, name: 'Your photographs and marks' }).waitFor()
    const shown = page.locator('[data-photo="photo-jet"]')
    await expect
      .poll(() => markKeys(page, '[data-photo="photo-jet"]'))
      .toEqual(['scale-1', 'scale-2', 'exit-plane', 'cell-end-1', 'cell-end-2', 'cell-end-3', 'mach-disk'])
    expect(await shown.locator('.picture svg g[data-mark]').count()).toBe(7)
    expect(await shown.locator('tr[data-row="mean"] td').first().innerText()).toBe(meanMm)
    const src = `/api/courses/${fx.courseId}/submissions/${submissionId}/images/jet`
    expect(await shown.getByTestId('photo-image').getAttribute('href')).toBe(src)
    const served = await page.evaluate(async (u) => {
      const res = await fetch(u)
      return { status: res.status, type: res.headers.get('content-type') }
    }, src)
    expect(served).toEqual({ status: 200, type: 'image/png' })
    await page.screenshot({ path: screenshotPath('jet-photo-result'), fullPage: true })
    await ctx.close()

    // The TA opens the review page: the same marks over the picture, and the readout.
    const taCtx = await browser.newContext({ viewport: { width: 1280, height: 900 } })
    const ta = await taCtx.newPage()
    await signIn(ta, app.url, fx.ta.email, PASSWORD)
    await ta.goto(`${app.url}/c/${fx.courseSlug}/review/${submissionId}`)
    await ta.getByRole('heading', { level: 2, name: 'Photographs and the student’s marks' }).waitFor()
    const review = ta.locator('[data-photo="photo-jet"]')
    await expect.poll(() => review.locator('.picture svg g[data-mark]').count()).toBe(7)
    expect(await markKeys(ta, '[data-photo="photo-jet"]')).toHaveLength(7)
    expect(await review.locator('tr[data-row="mean"] td').first().innerText()).toBe(meanMm)
    expect(await ta.getByRole('heading', { level: 3, name: 'Shadowgraph of the jet' }).count()).toBe(1)
    // A hand-in of a photograph alone has no log file, and the files panel says where the picture is.
    await ta.getByText('No log files; the photographs are shown with their marks.').waitFor()
    await ta.screenshot({ path: screenshotPath('jet-photo-review'), fullPage: true })
    await taCtx.close()
  }, 180_000)
})

const apiAs = (email: string) => apiSignIn(app.url, email, PASSWORD)

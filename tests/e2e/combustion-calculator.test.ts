import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, Locator, Page } from 'playwright-core'
import { areaFromDiameter, nozzleFlow } from '../../shared/physics'
import { combustion, equivalenceRatioFromMixtureRatio, mixtureRatioFromEquivalenceRatio } from '../../shared/thermo'
import { gaugeToAbsolute, toSI } from '../../shared/units'
import { seedDemo } from '../../scripts/demo/seed-demo'
import { DEFAULT_DEMO_PASSWORD, DEMO_INSTRUCTOR, DEMO_STUDENT } from '../../scripts/demo/scenario'
import { launchBrowser, screenshotPath, serveApp, signIn } from '../helpers/browser'
import { expectPrinted } from '../helpers/printed'

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

async function signInAndOpenCalculators(page: Page) {
  await page.goto(`${app.url}/`)
  await page.getByRole('heading', { name: 'Sign in' }).waitFor()
  await page.getByLabel('E-mail address').fill(DEMO_STUDENT.email)
  await page.getByLabel('Password', { exact: true }).fill(DEFAULT_DEMO_PASSWORD)
  await page.getByRole('button', { name: 'Sign in' }).click()
  await page.getByRole('heading', { name: 'My courses' }).waitFor()
  await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Calculators' }).click()
  await page.getByRole('heading', { level: 1, name: 'Calculators' }).waitFor()
}

/** Waits until the calculator's results have caught up with the last edit. */
async function settled(results: Locator) {
  await expect.poll(() => results.getAttribute('aria-busy')).toBe('false')
}

/** Puts the keyboard focus in a box, selects what is there and types over it, as a person at the keyboard does. */
async function typeInto(page: Page, box: Locator, text: string) {
  await box.focus()
  await page.keyboard.press('ControlOrMeta+a')
  await page.keyboard.type(text)
}

/** Presses one of a choice's buttons from the keyboard. */
async function pressChoice(page: Page, section: Locator, group: string, option: string) {
  const button = section.getByRole('group', { name: group }).getByRole('button', { name: option, exact: true })
  await button.focus()
  await page.keyboard.press('Space')
  await expect.poll(() => button.getAttribute('aria-pressed')).toBe('true')
}

/** The number at the start of a result cell as printed (e.g. "2034.1" from "2,034.1 K"), thousands commas removed. */
async function printedNumber(cell: Locator): Promise<string> {
  const text = (await cell.innerText()).trim()
  const match = /^[−-]?[\d,]*\.?\d+/.exec(text)
  if (!match) throw new Error(`no number at the start of the result "${text}"`)
  return match[0].replace(/,/g, '').replace('−', '-')
}

/** The text of the messages tied to a box by aria-describedby. */
async function describedText(page: Page, box: Locator): Promise<string> {
  const ids = ((await box.getAttribute('aria-describedby')) ?? '').split(' ').filter(Boolean)
  const texts = await Promise.all(ids.map((id) => page.locator(`[id="${id}"]`).innerText()))
  return texts.join(' ')
}

describe('the combustion calculator in Chromium', () => {
  it('shows the flame temperature, c* and nozzle performance the libraries compute, from the keyboard', async () => {
    const page = await browser.newPage({ viewport: { width: 1280, height: 900 } })
    await signInAndOpenCalculators(page)
    const section = page.getByRole('region', { name: 'Combustion and hot-fire performance' })
    const results = section.getByTestId('combustion-results')
    const cell = (q: string) => results.locator(`[data-quantity="${q}"]`)
    const box = (label: string) => section.getByRole('textbox', { name: label, exact: true })
    await cell('temperature').waitFor()

    // The cautions sit in the calculator itself, so an embedded copy keeps them too.
    expect(await section.getByTestId('combustion-safety').innerText()).toMatch(
      /pressure vessel, flammable gas.*local codes, your institution's safety office and licensed practice/s,
    )

    // Methane, φ = 0.9, 4 bar gauge at 98 kPa, reactants at 20 °C, a 6 mm throat and a 10 mm exit.
    await pressChoice(page, section, 'Fuel, burned with air', 'methane')
    await typeInto(page, box('Equivalence ratio φ'), '0.9')
    // Tab moves on to the next box, and the focus there can be seen: its border takes the focus colour
    // (the inputs' focus ring), unlike a box without focus.
    await page.keyboard.press('Tab')
    const next = box('Reactant temperature')
    expect(await next.evaluate((el) => el === document.activeElement)).toBe(true)
    const border = (el: Element) => getComputedStyle(el).borderTopColor
    const unfocused = await box('Chamber pressure').evaluate(border)
    await expect.poll(() => next.evaluate(border)).not.toBe(unfocused)
    await typeInto(page, box('Reactant temperature'), '20')
    await typeInto(page, box('Chamber pressure'), '4')
    await typeInto(page, box('Ambient pressure (absolute)'), '98')
    await typeInto(page, box('Throat diameter'), '6')
    await typeInto(page, box('Exit diameter'), '10')
    await settled(results)

    // What the thermochemistry library gives for the same inputs, converted here with the unit table.
    const ambient = toSI(98, 'kPa')
    const chamber = gaugeToAbsolute(toSI(4, 'bar'), ambient)
    const gas = combustion({
      fuel: 'methane',
      equivalenceRatio: 0.9,
      pressure: chamber,
      reactantTemperature: toSI(20, 'degC'),
    })
    expectPrinted(gas.temperature, await printedNumber(cell('temperature')), 'flame temperature, K')
    expectPrinted(gas.characteristicVelocity, await printedNumber(cell('characteristicVelocity')), 'c*, m/s')
    expectPrinted(gas.gamma, await printedNumber(cell('gamma')), 'γ')
    expectPrinted(gas.molarMass * 1000, await printedNumber(cell('molarMass')), 'molar mass, g/mol')
    expectPrinted(gas.mixtureRatio, await printedNumber(cell('mixtureRatio')), 'air-to-fuel ratio')
    expectPrinted(gas.moleFractions.H2O, await printedNumber(cell('moleFraction-H2O')), 'H2O mole fraction')
    expectPrinted(gas.moleFractions.CO2, await printedNumber(cell('moleFraction-CO2')), 'CO2 mole fraction')

    // The nozzle with those products: the formula library's nozzleFlow with R = cp·(γ − 1)/γ.
    const flow = nozzleFlow({
      chamberPressure: chamber,
      chamberTemperature: gas.temperature,
      ambientPressure: ambient,
      throatArea: areaFromDiameter(toSI(6, 'mm')),
      exitArea: areaFromDiameter(toSI(10, 'mm')),
      gamma: gas.gamma,
      gasConstant: (gas.cp * (gas.gamma - 1)) / gas.gamma,
    })
    expect(await cell('regime').getAttribute('data-regime')).toBe(flow.regime)
    expectPrinted(flow.thrustCoefficient, await printedNumber(cell('thrustCoefficient')), 'CF')
    expectPrinted(flow.specificImpulse, await printedNumber(cell('specificImpulse')), 'Isp, s')
    expectPrinted(flow.exitMach, await printedNumber(cell('exitMach')), 'exit Mach number')

    // The chart is drawn: the canvas is named for what it shows and has ink on it.
    const canvas = section.locator('canvas[role="img"]')
    expect(await canvas.getAttribute('aria-label')).toMatch(
      /^Chart of the adiabatic flame temperature and c\* of methane with air .* This mixture, φ = 0\.900, is marked/,
    )
    await expect
      .poll(() =>
        canvas.evaluate((el: HTMLCanvasElement) => {
          const ctx = el.getContext('2d')
          if (!ctx || el.width === 0 || el.height === 0) return 0
          const data = ctx.getImageData(0, 0, el.width, el.height).data
          let inked = 0
          for (let i = 3; i < data.length; i += 4) if ((data[i] as number) > 0) inked++
          return inked
        }),
      )
      .toBeGreaterThan(2000)
    await section.screenshot({ path: screenshotPath('combustion-calculator') })
    await page.close()
  })

  it('switching to the air-to-fuel ratio keeps the mixture, and a typed ratio gives the equivalence ratio that matches it', async () => {
    const page = await browser.newPage({ viewport: { width: 1280, height: 900 } })
    await signInAndOpenCalculators(page)
    const section = page.getByRole('region', { name: 'Combustion and hot-fire performance' })
    const results = section.getByTestId('combustion-results')
    const cell = (q: string) => results.locator(`[data-quantity="${q}"]`)
    const box = (label: string) => section.getByRole('textbox', { name: label, exact: true })
    await cell('temperature').waitFor()

    await pressChoice(page, section, 'Fuel, burned with air', 'propane')
    await typeInto(page, box('Equivalence ratio φ'), '1.2')
    await settled(results)
    const before = await printedNumber(cell('temperature'))

    await pressChoice(page, section, 'Mixture given as', 'air-to-fuel ratio')
    // The φ box gives way to the ratio box, which starts at the ratio of the φ typed.
    expect(await box('Equivalence ratio φ').count()).toBe(0)
    const ratioBox = box('Air-to-fuel mass ratio')
    expectPrinted(mixtureRatioFromEquivalenceRatio('propane', 1.2), await ratioBox.inputValue(), 'ratio carried over')
    await settled(results)
    expectPrinted(1.2, await printedNumber(cell('equivalenceRatio')), 'φ shown after the switch')
    // The same flame (the ratio carried over is rounded to five figures, a few millikelvin here).
    expect(Math.abs(Number(await printedNumber(cell('temperature'))) - Number(before))).toBeLessThanOrEqual(0.1)

    // A ratio typed: φ is the library's for that ratio, and so is the flame.
    await typeInto(page, ratioBox, '18.5')
    await settled(results)
    const phi = equivalenceRatioFromMixtureRatio('propane', 18.5)
    expectPrinted(phi, await printedNumber(cell('equivalenceRatio')), 'φ from an air-to-fuel ratio of 18.5')
    const gas = combustion({
      fuel: 'propane',
      equivalenceRatio: phi,
      pressure: gaugeToAbsolute(toSI(5, 'bar'), 101325),
      reactantTemperature: 298.15,
    })
    expectPrinted(gas.temperature, await printedNumber(cell('temperature')), 'flame temperature at that ratio, K')
    expectPrinted(gas.characteristicVelocity, await printedNumber(cell('characteristicVelocity')), 'c* at that ratio')

    // Back to φ: the box starts at the φ of the ratio typed.
    await pressChoice(page, section, 'Mixture given as', 'equivalence ratio')
    expectPrinted(phi, await box('Equivalence ratio φ').inputValue(), 'φ carried back')
    await page.close()
  })

  it('an equivalence ratio outside the library range is explained at its field, and fixing it brings the results back', async () => {
    const page = await browser.newPage({ viewport: { width: 1280, height: 900 } })
    await signInAndOpenCalculators(page)
    const section = page.getByRole('region', { name: 'Combustion and hot-fire performance' })
    const results = section.getByTestId('combustion-results')
    const phiBox = section.getByRole('textbox', { name: 'Equivalence ratio φ', exact: true })
    await results.locator('[data-quantity="temperature"]').waitFor()

    await typeInto(page, phiBox, '3')
    await settled(results)
    expect(await phiBox.getAttribute('aria-invalid')).toBe('true')
    expect(await describedText(page, phiBox)).toContain(
      'The equivalence ratio φ must be between 0.4 (very lean) and 2.5',
    )
    expect(await section.getByTestId('field-error').count()).toBe(1)
    await results.getByTestId('no-results').filter({ hasText: 'equivalence ratio' }).waitFor()
    // The library refuses it too: the page does not invent its own range.
    expect(() =>
      combustion({ fuel: 'propane', equivalenceRatio: 3, pressure: 6e5, reactantTemperature: 298.15 }),
    ).toThrow(RangeError)

    await typeInto(page, phiBox, '0.7')
    await settled(results)
    expect(await phiBox.getAttribute('aria-invalid')).toBe('false')
    await results.locator('[data-quantity="temperature"]').waitFor()
    await page.close()
  })

  it('fits a 375 px phone: inputs above the results, no sideways scrolling', async () => {
    const page = await browser.newPage({ viewport: { width: 375, height: 740 } })
    await signInAndOpenCalculators(page)
    const section = page.getByRole('region', { name: 'Combustion and hot-fire performance' })
    await section.locator('canvas[role="img"]').waitFor()
    const overflow = await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth)
    expect(overflow).toBeLessThanOrEqual(0)
    const form = await page.getByRole('form', { name: 'Combustion inputs' }).boundingBox()
    const results = await section.getByTestId('combustion-results').boundingBox()
    expect(form && results && form.y + form.height <= results.y).toBe(true)
    await section.screenshot({ path: screenshotPath('combustion-calculator-375') })
    await page.close()
  })

  it('a module embeds it with its starting values: hydrogen at an air-to-fuel ratio of 40 and 300 kPa gauge', async () => {
    const page = await browser.newPage({ viewport: { width: 1400, height: 900 } })
    await signIn(page, app.url, DEMO_INSTRUCTOR.email)
    const courses = (await (await page.request.get(`${app.url}/api/courses`)).json()) as { id: number }[]
    const courseId = courses[0]!.id
    const modules = (await (await page.request.get(`${app.url}/api/courses/${courseId}/modules`)).json()) as {
      id: number
      status: string
    }[]
    const moduleId = modules.find((m) => m.status === 'published')!.id
    await page.goto(`${app.url}/courses/${courseId}/modules/${moduleId}/edit`)
    const preview = page.getByTestId('module-preview')
    await preview.locator('[data-source-line]').first().waitFor()

    const source = page.getByLabel('Markdown with YAML front matter')
    await source.press('ControlOrMeta+End')
    await source.pressSequentially(
      '\n\n```calculator combustion\nfuel: hydrogen\nmixtureBy: mixtureRatio\nmixtureRatio: 40\nchamberPressure: 300\nchamberPressureUnit: kPa\n```\n',
      { delay: 2 },
    )
    const host = preview.locator('.isentrope-calculator[data-kind="combustion"]')
    await host.scrollIntoViewIfNeeded()
    const results = host.getByTestId('combustion-results')
    await results.locator('[data-quantity="temperature"]').waitFor()
    await settled(results)

    const pressed = host.getByRole('group', { name: 'Fuel, burned with air' }).getByRole('button', { name: 'hydrogen' })
    expect(await pressed.getAttribute('aria-pressed')).toBe('true')
    expect(await host.getByRole('textbox', { name: 'Air-to-fuel mass ratio', exact: true }).inputValue()).toBe('40')
    const phi = equivalenceRatioFromMixtureRatio('hydrogen', 40)
    expectPrinted(phi, await printedNumber(results.locator('[data-quantity="equivalenceRatio"]')), 'φ at 40 kg/kg')
    const gas = combustion({
      fuel: 'hydrogen',
      equivalenceRatio: phi,
      pressure: gaugeToAbsolute(toSI(300, 'kPa'), 101325),
      reactantTemperature: 298.15,
    })
    expectPrinted(gas.temperature, await printedNumber(results.locator('[data-quantity="temperature"]')), 'T, K')
    expect(await host.getByTestId('combustion-safety').count()).toBe(1)
    await page.close()
  }, 90_000)
})

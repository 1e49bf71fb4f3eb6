import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, Locator, Page } from 'playwright-core'
import { areaFromDiameter, nozzleFlow } from '../../shared/physics'
import type { NozzleFlow, NozzleRegime } from '../../shared/physics'
import { fromSI, gaugeToAbsolute, toSI } from '../../shared/units'
import type { UnitSymbol } from '../../shared/units'
import { seedDemo } from '../../scripts/demo/seed-demo'
import { DEFAULT_DEMO_PASSWORD, DEMO_STUDENT } from '../../scripts/demo/scenario'
import { launchBrowser, screenshotPath, serveApp } from '../helpers/browser'
import { expectClose } from '../helpers/expect-close'
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

/** Waits until a calculator's results have caught up with the last edit. */
async function settled(results: Locator) {
  await expect.poll(() => results.getAttribute('aria-busy')).toBe('false')
}

/** Types a value into the input with the given label (replacing what was there). */
async function type(section: Locator, label: string, value: string) {
  await section.getByRole('textbox', { name: label, exact: true }).fill(value)
}

/** Picks a unit in the unit picker of the input with the given label. */
async function pickUnit(page: Page, section: Locator, label: string, unitShown: string) {
  const picker = section.getByRole('combobox', { name: `${label} unit` })
  await picker.click()
  // The list this picker opened (another picker's list may still be closing).
  const list = await picker.getAttribute('aria-controls')
  if (!list) throw new Error(`the ${label} unit picker did not open its list`)
  await page.locator(`[id="${list}"]`).getByRole('option', { name: unitShown, exact: true }).click()
  await expect.poll(() => picker.innerText()).toBe(unitShown)
}

/** The number at the start of a result cell as printed (e.g. "27.398" from "27.398 g/s"), thousands commas removed. */
async function printedNumber(cell: Locator): Promise<string> {
  const text = (await cell.innerText()).trim()
  const match = /^[−-]?[\d,]*\.?\d+/.exec(text)
  if (!match) throw new Error(`no number at the start of the result "${text}"`)
  return match[0].replace(/,/g, '').replace('−', '-')
}

interface NozzleCase {
  chamberPressure: string
  chamberUnit: UnitSymbol
  chamberUnitShown: string
  reading: 'gauge' | 'absolute'
  ambientPressure: string
  ambientUnit: UnitSymbol
  ambientUnitShown: string
  chamberTemperatureK: string
  throatDiameter: string
  exitDiameter: string
  lengthUnit: UnitSymbol
  lengthUnitShown: string
}

/** What the formula library gives for the same typed inputs, converted here with the unit table. */
function expectedNozzle(c: NozzleCase): { flow: NozzleFlow; exitDiameter: number; chamber: number; ambient: number } {
  const ambient = toSI(Number(c.ambientPressure), c.ambientUnit)
  const typed = toSI(Number(c.chamberPressure), c.chamberUnit)
  const chamber = c.reading === 'gauge' ? gaugeToAbsolute(typed, ambient) : typed
  const exitDiameter = toSI(Number(c.exitDiameter), c.lengthUnit)
  const flow = nozzleFlow({
    chamberPressure: chamber,
    chamberTemperature: toSI(Number(c.chamberTemperatureK), 'K'),
    ambientPressure: ambient,
    throatArea: areaFromDiameter(toSI(Number(c.throatDiameter), c.lengthUnit)),
    exitArea: areaFromDiameter(exitDiameter),
    gamma: 1.4,
    gasConstant: 287.05,
  })
  return { flow, exitDiameter, chamber, ambient }
}

async function enterNozzle(page: Page, nozzle: Locator, c: NozzleCase) {
  await pickUnit(page, nozzle, 'Chamber pressure', c.chamberUnitShown)
  await nozzle
    .getByRole('group', { name: 'Chamber pressure reading' })
    .getByRole('button', { name: c.reading, exact: true })
    .click()
  await type(nozzle, 'Chamber pressure', c.chamberPressure)
  await pickUnit(page, nozzle, 'Ambient pressure (absolute)', c.ambientUnitShown)
  await type(nozzle, 'Ambient pressure (absolute)', c.ambientPressure)
  await pickUnit(page, nozzle, 'Chamber temperature', 'K')
  await type(nozzle, 'Chamber temperature', c.chamberTemperatureK)
  await pickUnit(page, nozzle, 'Throat diameter', c.lengthUnitShown)
  await type(nozzle, 'Throat diameter', c.throatDiameter)
  await pickUnit(page, nozzle, 'Exit diameter', c.lengthUnitShown)
  await type(nozzle, 'Exit diameter', c.exitDiameter)
  await type(nozzle, 'Ratio of specific heats γ', '1.4')
  await type(nozzle, 'Gas constant R', '287.05')
}

/** Words the page must use for each regime (the product's own wording, checked independently of its code). */
const REGIME_TEXT: Record<NozzleRegime, RegExp> = {
  subsonic: /^Subsonic:/,
  'shock-in-nozzle': /^Shock in the nozzle:/,
  overexpanded: /^Over-expanded:.*shock pattern stands outside the exit/,
  ideal: /^Ideally expanded:/,
  underexpanded: /^Under-expanded:/,
}

describe('the live calculators in Chromium', () => {
  it('the isentropic calculator at Mach 2 and at A/A* = 4 shows the values of the published tables', async () => {
    const page = await browser.newPage({ viewport: { width: 1280, height: 900 } })
    await signInAndOpenCalculators(page)
    const section = page.getByRole('region', { name: 'Isentropic flow and normal shock' })
    const results = section.getByTestId('isentropic-results')

    await type(section, 'Ratio of specific heats γ', '1.4')
    await type(section, 'Mach number', '2')
    await settled(results)
    const cell = (q: string) => results.locator(`[data-quantity="${q}"]`)
    // NACA Report 1135 (1953), Table I, γ = 1.4, M = 2.00: p/p0 = 0.12780, T/T0 = 0.55556, ρ/ρ0 = 0.23005, A/A* = 1.6875.
    expectPrinted(Number(await printedNumber(cell('pressureRatio'))), '0.12780', 'p/p0 at M = 2')
    expectPrinted(Number(await printedNumber(cell('temperatureRatio'))), '0.55556', 'T/T0 at M = 2')
    expectPrinted(Number(await printedNumber(cell('densityRatio'))), '0.23005', 'ρ/ρ0 at M = 2')
    expectPrinted(Number(await printedNumber(cell('areaRatio'))), '1.6875', 'A/A* at M = 2')
    // NACA Report 1135, Table II (normal shock), M1 = 2.00: M2 = 0.57735, p2/p1 = 4.5000, p02/p01 = 0.72087.
    expectPrinted(Number(await printedNumber(cell('shockMach2'))), '0.57735', 'M2 behind a Mach 2 shock')
    expectPrinted(Number(await printedNumber(cell('shockPressureRatio'))), '4.5000', 'p2/p1 of a Mach 2 shock')
    expectPrinted(
      Number(await printedNumber(cell('shockStagnationPressureRatio'))),
      '0.72087',
      'p02/p01 of a Mach 2 shock',
    )
    // NACA Report 1135, Table I, M = 2.00: Prandtl–Meyer angle ν = 26.380°.
    expectPrinted(Number(await printedNumber(cell('prandtlMeyer'))), '26.380', 'ν at M = 2, degrees')

    // Below Mach 1 there is no shock to show, and the page says so instead of leaving a gap.
    await type(section, 'Mach number', '0.5')
    await settled(results)
    await results.getByTestId('no-shock').waitFor()
    expect(await cell('shockMach2').count()).toBe(0)

    // From an area ratio on the supersonic branch. NACA Report 1135, Table I: A/A* = 4.0 lies at M ≈ 2.94.
    await section.getByRole('group', { name: 'Start from' }).getByRole('button', { name: 'Area ratio' }).click()
    await type(section, 'Area ratio A/A*', '4')
    await section.getByRole('group', { name: 'Branch' }).getByRole('button', { name: 'supersonic' }).click()
    await settled(results)
    expectPrinted(Number(await printedNumber(cell('mach'))), '2.94', 'supersonic Mach number at A/A* = 4')
    await page.close()
  })

  it('the nozzle calculator converts units and shows the regime and exit state the formula library computes', async () => {
    const page = await browser.newPage({ viewport: { width: 1280, height: 900 } })
    await signInAndOpenCalculators(page)
    const nozzle = page.getByRole('region', { name: 'Converging–diverging nozzle' })
    const results = nozzle.getByTestId('nozzle-results')
    const cell = (q: string) => results.locator(`[data-quantity="${q}"]`)

    const cases: { name: string; input: NozzleCase; regime: NozzleRegime }[] = [
      {
        // 100 psi gauge into a 0.25 in → 0.5 in nozzle (area ratio exactly 4) at 98.6 kPa ambient.
        name: 'over-expanded, gauge psi and inches',
        regime: 'overexpanded',
        input: {
          chamberPressure: '100',
          chamberUnit: 'psi',
          chamberUnitShown: 'psi',
          reading: 'gauge',
          ambientPressure: '98.6',
          ambientUnit: 'kPa',
          ambientUnitShown: 'kPa',
          chamberTemperatureK: '293',
          throatDiameter: '0.25',
          exitDiameter: '0.5',
          lengthUnit: 'in',
          lengthUnitShown: 'in',
        },
      },
      {
        name: 'under-expanded, absolute MPa and millimetres',
        regime: 'underexpanded',
        input: {
          chamberPressure: '4',
          chamberUnit: 'MPa',
          chamberUnitShown: 'MPa',
          reading: 'absolute',
          ambientPressure: '1',
          ambientUnit: 'bar',
          ambientUnitShown: 'bar',
          chamberTemperatureK: '293',
          throatDiameter: '4',
          exitDiameter: '8',
          lengthUnit: 'mm',
          lengthUnitShown: 'mm',
        },
      },
      {
        name: 'shock in the nozzle, absolute bar',
        regime: 'shock-in-nozzle',
        input: {
          chamberPressure: '2',
          chamberUnit: 'bar',
          chamberUnitShown: 'bar',
          reading: 'absolute',
          ambientPressure: '100',
          ambientUnit: 'kPa',
          ambientUnitShown: 'kPa',
          chamberTemperatureK: '293',
          throatDiameter: '4',
          exitDiameter: '8',
          lengthUnit: 'mm',
          lengthUnitShown: 'mm',
        },
      },
    ]

    for (const c of cases) {
      await enterNozzle(page, nozzle, c.input)
      await settled(results)
      const expected = expectedNozzle(c.input)
      // The scenario is the one intended (a check on the test's own inputs).
      expect(expected.flow.regime, c.name).toBe(c.regime)

      const regime = cell('regime')
      expect(await regime.getAttribute('data-regime'), c.name).toBe(expected.flow.regime)
      expect((await regime.innerText()).trim(), c.name).toMatch(REGIME_TEXT[expected.flow.regime])
      // Each figure on the page is the library's value for the same inputs, correctly rounded.
      expectPrinted(expected.flow.exitMach, await printedNumber(cell('exitMach')), `${c.name}: exit Mach`)
      expectPrinted(expected.flow.thrust, await printedNumber(cell('thrust')), `${c.name}: thrust, N`)
      expect(await cell('massFlow').innerText()).toMatch(/ g\/s$/)
      expectPrinted(expected.flow.massFlow * 1000, await printedNumber(cell('massFlow')), `${c.name}: mass flow, g/s`)
      expectPrinted(expected.flow.pressureRatios.design, await printedNumber(cell('design')), `${c.name}: design pa/p0`)

      if (c.regime === 'overexpanded' || c.regime === 'underexpanded') {
        // Area ratio 4, γ = 1.4: NACA Report 1135, Table I puts the supersonic Mach number at 2.94.
        expectPrinted(Number(await printedNumber(cell('exitMach'))), '2.94', `${c.name}: exit Mach against NACA 1135`)
      }
      if (c.regime === 'underexpanded') {
        // Two Mach-disk estimates: Ashkenas & Sherman, x = 0.67·De·√(p0/pa), and Lewis & Carlson,
        // x = 0.69·De·Me·√(γ·pe/pa) (written out here; coefficients from memory).
        const ashkenasSherman = fromSI(
          0.67 * expected.exitDiameter * Math.sqrt(expected.chamber / expected.ambient),
          c.input.lengthUnit,
        )
        expectPrinted(
          ashkenasSherman,
          await printedNumber(cell('machDisk')),
          `${c.name}: Mach-disk distance (Ashkenas & Sherman)`,
        )
        const f = expected.flow
        const lewisCarlson = fromSI(
          0.69 * expected.exitDiameter * f.exitMach * Math.sqrt((1.4 * f.exitPressure) / expected.ambient),
          c.input.lengthUnit,
        )
        expectPrinted(
          lewisCarlson,
          await printedNumber(cell('machDiskLewisCarlson')),
          `${c.name}: Mach-disk distance (Lewis & Carlson)`,
        )
        expect(await results.getByTestId('separation').count(), c.name).toBe(0)
      } else if (c.regime === 'overexpanded') {
        // The Mach-disk fits do not hold for an over-expanded jet: the page leaves them out and says why.
        expect(await cell('machDisk').count(), c.name).toBe(0)
        expect(await cell('machDiskLewisCarlson').count(), c.name).toBe(0)
        await results.getByTestId('no-mach-disk').waitFor()
        // pa/p0 = 98.6/788.1 = 0.125, so the wall pressure falls to 0.4·pa (Summerfield criterion) at
        // p/p0 = 0.050, before the exit (pe/p0 = 0.0298): the flow separates. Independently here:
        // Ms from p/p0 (NACA 1135 eq. 44), As/At from the area–Mach relation (eq. 80), and the thrust
        // of the nozzle cut off there by Sutton & Biblarz eq. 3-30 with ambient on the rest of the wall.
        const g = 1.4
        const ps = (0.4 * expected.ambient) / expected.chamber
        const ms = Math.sqrt((2 / (g - 1)) * (Math.pow(ps, -(g - 1) / g) - 1))
        const as = Math.pow((2 / (g + 1)) * (1 + ((g - 1) / 2) * ms * ms), (g + 1) / (2 * (g - 1))) / ms
        const cf =
          Math.sqrt(
            ((2 * g * g) / (g - 1)) * Math.pow(2 / (g + 1), (g + 1) / (g - 1)) * (1 - Math.pow(ps, (g - 1) / g)),
          ) +
          (ps - expected.ambient / expected.chamber) * as
        const throatArea = areaFromDiameter(toSI(Number(c.input.throatDiameter), c.input.lengthUnit))
        const sentence = results.getByTestId('separation')
        expect((await sentence.innerText()).replace(/\s+/g, ' ')).toMatch(
          /^The flow separates inside the nozzle at A\/A\* ≈ [\d.]+ \(.* from the throat in a 15° cone\), .* estimated thrust [\d.]+ N/,
        )
        expectPrinted(
          as,
          await printedNumber(sentence.locator('[data-quantity="separationAreaRatio"]')),
          `${c.name}: separation A/A*`,
        )
        expectPrinted(
          cf * expected.chamber * throatArea,
          await printedNumber(sentence.locator('[data-quantity="separatedThrust"]')),
          `${c.name}: separated thrust, N`,
        )
        expect(cf * expected.chamber * throatArea).toBeGreaterThan(expected.flow.thrust)
      } else {
        expect(await cell('machDisk').count(), c.name).toBe(0)
        expect(expected.flow.exitMach, c.name).toBeLessThan(1)
        await cell('shockPosition').waitFor()
      }
    }
    await page.screenshot({ path: screenshotPath('calculators'), fullPage: true })
    await page.close()
  })

  it('an exit diameter smaller than the throat is explained at the exit-diameter field', async () => {
    const page = await browser.newPage({ viewport: { width: 1280, height: 900 } })
    await signInAndOpenCalculators(page)
    const nozzle = page.getByRole('region', { name: 'Converging–diverging nozzle' })
    const results = nozzle.getByTestId('nozzle-results')
    await pickUnit(page, nozzle, 'Throat diameter', 'mm')
    await type(nozzle, 'Throat diameter', '4')
    await pickUnit(page, nozzle, 'Exit diameter', 'mm')
    await type(nozzle, 'Exit diameter', '3')
    await settled(results)

    const exit = nozzle.getByRole('textbox', { name: 'Exit diameter', exact: true })
    expect(await exit.getAttribute('aria-invalid')).toBe('true')
    const describedBy = (await exit.getAttribute('aria-describedby')) ?? ''
    const message = page
      .locator(
        describedBy
          .split(' ')
          .map((i) => `[id="${i}"]`)
          .join(', '),
      )
      .filter({ hasText: 'throat' })
    expect(await message.innerText()).toContain('The exit diameter must be at least the throat diameter (4 mm)')
    // The message sits with the field, and the results say why there are none instead of going blank.
    expect(await nozzle.getByTestId('field-error').count()).toBe(1)
    await results.getByTestId('no-results').filter({ hasText: 'exit diameter' }).waitFor()
    expect(
      await nozzle.getByRole('textbox', { name: 'Throat diameter', exact: true }).getAttribute('aria-invalid'),
    ).toBe('false')
    await nozzle.screenshot({ path: screenshotPath('calculators-field-error') })

    // Fixing it clears the message and brings the results back.
    await type(nozzle, 'Exit diameter', '8')
    await settled(results)
    expect(await exit.getAttribute('aria-invalid')).toBe('false')
    expect(await nozzle.getByTestId('field-error').count()).toBe(0)
    await results.locator('[data-quantity="exitMach"]').waitFor()
    await page.close()
  })

  it('the blow-down calculator matches the closed form of an isothermal choked discharge', async () => {
    const page = await browser.newPage({ viewport: { width: 1280, height: 900 } })
    await signInAndOpenCalculators(page)
    const blowdown = page.getByRole('region', { name: 'Receiver blow-down' })
    const results = blowdown.getByTestId('blowdown-results')
    await pickUnit(page, blowdown, 'Receiver volume', 'L')
    await type(blowdown, 'Receiver volume', '50')
    await pickUnit(page, blowdown, 'Initial pressure', 'bar')
    await blowdown
      .getByRole('group', { name: 'Initial pressure reading' })
      .getByRole('button', { name: 'gauge', exact: true })
      .click()
    await type(blowdown, 'Initial pressure', '8')
    await pickUnit(page, blowdown, 'Ambient pressure (absolute)', 'kPa')
    await type(blowdown, 'Ambient pressure (absolute)', '101.325')
    await pickUnit(page, blowdown, 'Initial temperature', 'K')
    await type(blowdown, 'Initial temperature', '293.15')
    await pickUnit(page, blowdown, 'Throat diameter', 'mm')
    await type(blowdown, 'Throat diameter', '4')
    await type(blowdown, 'Discharge coefficient', '0.98')
    await type(blowdown, 'Ratio of specific heats γ', '1.4')
    await type(blowdown, 'Gas constant R', '287.05')
    await type(blowdown, 'Duration', '20')
    await blowdown
      .getByRole('group', { name: 'Gas in the receiver' })
      .getByRole('button', { name: 'isothermal' })
      .click()
    await settled(results)

    // Closed form, written out here from the ideal-gas law and the choked mass flow
    // ṁ = Cd·At·p·√(γ/(R·T))·(2/(γ+1))^((γ+1)/(2(γ−1))) (Sutton & Biblarz, Rocket Propulsion
    // Elements, choked-flow relation): an isothermal receiver decays as p = p_i·exp(−t/τ) with
    // τ = V/(Cd·At·√(γ·R·T)·(2/(γ+1))^((γ+1)/(2(γ−1)))), and stays choked while p ≥ pa·((γ+1)/2)^(γ/(γ−1)).
    const gamma = 1.4
    const R = 287.05
    const T = 293.15
    const V = 0.05
    const pa = 101325
    const pi = 8e5 + pa
    const At = (Math.PI * 0.004 ** 2) / 4
    const tau = V / (0.98 * At * Math.sqrt(gamma * R * T) * (2 / (gamma + 1)) ** ((gamma + 1) / (2 * (gamma - 1))))
    const unchokeAt = pa * ((gamma + 1) / 2) ** (gamma / (gamma - 1))
    const chokedFor = tau * Math.log(pi / unchokeAt)
    expect(chokedFor, 'the run must end while the throat is still choked for this check').toBeGreaterThan(20)
    // Choked for the whole 20 s run; then the receiver holds p_i·exp(−20/τ) and has released V·(p_i − p)/(R·T).
    expect(await results.locator('[data-quantity="chokedFor"]').innerText()).toContain('the whole 20 s run')
    const endPressure = pi * Math.exp(-20 / tau)
    expectClose(
      Number(await printedNumber(results.locator('[data-quantity="endPressure"]'))),
      endPressure / 1e5,
      1e-3,
      'receiver pressure at 20 s, bar',
    )
    const released = (V * (pi - endPressure)) / (R * T)
    expect(await results.locator('[data-quantity="massReleased"]').innerText()).toMatch(/ g$/)
    expectClose(
      Number(await printedNumber(results.locator('[data-quantity="massReleased"]'))),
      released * 1000,
      1e-3,
      'mass released, g',
    )

    // Long enough to unchoke: the time it stays choked.
    await type(blowdown, 'Duration', '60')
    await settled(results)
    expect(chokedFor).toBeLessThan(60)
    expectClose(
      Number(await printedNumber(results.locator('[data-quantity="chokedFor"]'))),
      chokedFor,
      1e-3,
      'time choked, s',
    )
    await page.close()
  })

  it('the blow-down calculator judges choking by the nozzle: ε = 1.5 stays choked about 36 s, a plain orifice about 26 s', async () => {
    const page = await browser.newPage({ viewport: { width: 1280, height: 900 } })
    await signInAndOpenCalculators(page)
    const blowdown = page.getByRole('region', { name: 'Receiver blow-down' })
    const results = blowdown.getByTestId('blowdown-results')
    // The stand of the cold-flow module: 50 L at 700 kPa gauge, 84 kPa barometer, 20 °C, a 4.0 mm
    // throat and a 4.9 mm exit, Cd 0.98, adiabatic, 60 s.
    await pickUnit(page, blowdown, 'Receiver volume', 'L')
    await type(blowdown, 'Receiver volume', '50')
    await pickUnit(page, blowdown, 'Initial pressure', 'kPa')
    await blowdown
      .getByRole('group', { name: 'Initial pressure reading' })
      .getByRole('button', { name: 'gauge', exact: true })
      .click()
    await type(blowdown, 'Initial pressure', '700')
    await pickUnit(page, blowdown, 'Ambient pressure (absolute)', 'kPa')
    await type(blowdown, 'Ambient pressure (absolute)', '84')
    await pickUnit(page, blowdown, 'Initial temperature', 'K')
    await type(blowdown, 'Initial temperature', '293.15')
    await pickUnit(page, blowdown, 'Throat diameter', 'mm')
    await type(blowdown, 'Throat diameter', '4')
    await pickUnit(page, blowdown, 'Exit diameter', 'mm')
    await type(blowdown, 'Exit diameter', '4.9')
    await type(blowdown, 'Discharge coefficient', '0.98')
    await type(blowdown, 'Ratio of specific heats γ', '1.4')
    await type(blowdown, 'Gas constant R', '287.05')
    await type(blowdown, 'Duration', '60')
    await blowdown
      .getByRole('group', { name: 'Gas in the receiver' })
      .getByRole('button', { name: 'adiabatic' })
      .click()
    await settled(results)

    // Independent computation. The choke limit of ε = (4.9/4)²: the p/p0 of the subsonic Mach number
    // whose A/A* is ε (area–Mach relation and p/p0 of NACA Report 1135, eqs. 80 and 44, by bisection
    // here). While choked an adiabatic receiver follows p = p_i·(1 + (γ−1)/2·t/τ)^(−2γ/(γ−1)), with
    // τ = V/(Cd·At·√(γRT)·(2/(γ+1))^((γ+1)/(2(γ−1)))); it unchokes at p = pa/limit.
    const g = 1.4
    const areaRatioOf = (m: number) =>
      Math.pow((2 / (g + 1)) * (1 + ((g - 1) / 2) * m * m), (g + 1) / (2 * (g - 1))) / m
    const epsilon = (4.9 / 4) ** 2
    let lo = 1e-6
    let hi = 1
    for (let i = 0; i < 100; i++) {
      const mid = 0.5 * (lo + hi)
      if (areaRatioOf(mid) > epsilon) lo = mid
      else hi = mid
    }
    const limit = Math.pow(1 + ((g - 1) / 2) * lo * lo, -g / (g - 1))
    const critical = Math.pow(2 / (g + 1), g / (g - 1))
    const pa = 84e3
    const pi = 784e3
    const tau =
      0.05 /
      (0.98 *
        ((Math.PI * 0.004 ** 2) / 4) *
        Math.sqrt(g * 287.05 * 293.15) *
        Math.pow(2 / (g + 1), (g + 1) / (2 * (g - 1))))
    const chokedUntil = (unchokeAt: number) => ((2 * tau) / (g - 1)) * (Math.pow(pi / unchokeAt, (g - 1) / (2 * g)) - 1)

    const cell = (q: string) => results.locator(`[data-quantity="${q}"]`)
    expectPrinted(limit, await printedNumber(cell('chokeLimit')), 'choke limit of ε = 1.5')
    expectPrinted(limit, '0.881', 'choke limit (hand computation)')
    expectClose(
      Number(await printedNumber(cell('chokedFor'))),
      chokedUntil(pa / limit),
      1e-3,
      'time choked with the nozzle, s',
    )
    expectPrinted(chokedUntil(pa / limit), '35.9', 'time choked with the nozzle (hand computation)')
    expect(await results.getByTestId('choke-note').innerText()).toMatch(/this nozzle \(ε = 1\.50\)/)

    // The same receiver through a plain orifice: the critical ratio 0.528, and ten seconds less.
    await type(blowdown, 'Exit diameter', '')
    await settled(results)
    expectPrinted(critical, await printedNumber(cell('chokeLimit')), 'critical pressure ratio')
    expectClose(
      Number(await printedNumber(cell('chokedFor'))),
      chokedUntil(pa / critical),
      1e-3,
      'time choked as an orifice, s',
    )
    expectPrinted(chokedUntil(pa / critical), '26.2', 'time choked as an orifice (hand computation)')

    // An exit narrower than the throat is explained at the exit-diameter field.
    await type(blowdown, 'Exit diameter', '3')
    await settled(results)
    const exit = blowdown.getByRole('textbox', { name: 'Exit diameter', exact: true })
    expect(await exit.getAttribute('aria-invalid')).toBe('true')
    await results
      .getByTestId('no-results')
      .filter({ hasText: 'exit diameter must be at least the throat diameter' })
      .waitFor()
    await page.close()
  })

  it('the page fits a 375 px phone without sideways scrolling', async () => {
    const page = await browser.newPage({ viewport: { width: 375, height: 740 } })
    await signInAndOpenCalculators(page)
    await page.getByTestId('blowdown-results').locator('[data-quantity="chokedFor"]').waitFor()
    await page.getByTestId('nozzle-results').locator('canvas[role="img"]').waitFor()
    const overflow = await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth)
    expect(overflow).toBeLessThanOrEqual(0)
    // Stacked: the nozzle inputs come above its results.
    const form = await page.getByRole('form', { name: 'Nozzle inputs' }).boundingBox()
    const results = await page.getByTestId('nozzle-results').boundingBox()
    expect(form && results && form.y + form.height <= results.y).toBe(true)
    await page.screenshot({ path: screenshotPath('calculators-375'), fullPage: true })
    await page.close()
  })
})

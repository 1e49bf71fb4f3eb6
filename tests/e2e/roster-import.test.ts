import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser } from 'playwright-core'
import { hashPassword } from '../../server/auth/password'
import { courses, enrollments, sections, users } from '../../server/db/schema'
import { uniq } from '../helpers/app'
import { launchBrowser, noSideways, screenshotPath, serveApp, signIn } from '../helpers/browser'
import { waitForMail } from '../helpers/maildev'

let app: Awaited<ReturnType<typeof serveApp>>
let chrome: Awaited<ReturnType<typeof launchBrowser>>
let browser: Browser
const tag = uniq()
const PASSWORD = 'instructor-password-e2e'
const instructorEmail = `rosterinst.${tag}@test.example`
let courseId = 0

beforeAll(async () => {
  app = await serveApp()
  const db = app.db.db
  const [inst] = await db
    .insert(users)
    .values({
      email: instructorEmail,
      displayName: `Roster Instructor ${tag}`,
      passwordHash: await hashPassword(PASSWORD),
    })
    .$returningId()
  const [course] = await db
    .insert(courses)
    .values({
      code: `R${tag}`,
      title: `Nozzle lab ${tag}`,
      term: 'Test term',
      institution: 'Test University (fictional)',
      timeZone: 'UTC',
    })
    .$returningId()
  courseId = course!.id
  await db.insert(sections).values({ courseId, name: 'Tue PM' })
  await db.insert(enrollments).values({ userId: inst!.id, courseId, role: 'instructor' })
  chrome = await launchBrowser()
  browser = chrome.browser
})
afterAll(async () => {
  await chrome?.close()
  await app?.close()
})

describe('roster import in the browser', () => {
  it('an instructor imports a CSV, and an invited student chooses a password from the e-mail and lands signed in', async () => {
    const mira = `merrin.${tag}@univ.example`
    const dag = `dace.${tag}@univ.example`
    const csv = `Email,Name,Role,Section,Group\n${mira},Merrin Saltmarsh ${tag},student,Tue PM,Rig ${tag}\n${dag},Dace Hollowmere ${tag},ta,Tue PM,\n`

    const ctx = await browser.newContext({ viewport: { width: 375, height: 812 } })
    const page = await ctx.newPage()
    await signIn(page, app.url, instructorEmail, PASSWORD)
    // The course's page address: its code and term, lower case and hyphenated.
    await page.goto(`${app.url}/c/r${tag.toLowerCase()}-test-term/roster`)
    await page.getByRole('link', { name: 'Import roster' }).click()
    await page.getByRole('heading', { level: 1, name: 'Import roster' }).waitFor()

    // Pasted rows with a problem: shown with its row and column, and the import cannot be confirmed.
    await page.getByLabel('Roster rows (CSV)').fill(`email,name\nnot-an-address,Someone ${tag}\n`)
    await page.getByRole('button', { name: 'Check the file' }).click()
    await page.getByTestId('import-problems').getByText('Row 2').waitFor()
    await page
      .getByTestId('import-problems')
      .getByText('email: "not-an-address" is not a valid e-mail address')
      .waitFor()
    expect(await page.getByTestId('confirm-import').isDisabled()).toBe(true)
    await noSideways(page)
    await page.screenshot({ path: screenshotPath('roster-import-problems-375'), fullPage: true })

    await page
      .getByLabel('CSV file')
      .setInputFiles({ name: 'roster.csv', mimeType: 'text/csv', buffer: Buffer.from(csv) })
    await expect.poll(() => page.getByLabel('Roster rows (CSV)').inputValue()).toContain(mira)
    await page.getByRole('button', { name: 'Check the file' }).click()
    const table = page.getByTestId('import-table')
    await table.waitFor()
    await expect.poll(() => table.locator('tbody tr').count()).toBe(2)
    await page.getByText(`New lab groups to create: Rig ${tag}`).waitFor()
    await noSideways(page)
    await page.screenshot({ path: screenshotPath('roster-import-preview-375'), fullPage: true })

    const confirm = page.getByRole('button', { name: 'Import: create 2 accounts, e-mail 2 invitations' })
    // The server's link lifetime (INVITATION_TTL_HOURS, 168 by default) in the person's words.
    await page.getByText('Each invitation link works once and for 7 days', { exact: false }).waitFor()
    await confirm.click()
    const done = page.getByTestId('import-result')
    await done.getByText('2 accounts created').waitFor()
    await done.getByText('2 invitations e-mailed').waitFor()
    await noSideways(page)
    await page.getByRole('link', { name: 'See the roster' }).click()
    await page.getByTestId('roster-table').getByText(`Merrin Saltmarsh ${tag}`).waitFor()
    await ctx.close()

    const all = await waitForMail((m) => m.some((x) => x.to[0]?.address === mira))
    const mail = all.find((x) => x.to[0]?.address === mira)!
    const link = /(http\S+\/invitations\/\S+)/.exec(mail.text)?.[1]
    expect(link).toMatch(new RegExp(`^${app.url}/invitations/[A-Za-z0-9_-]{43}$`))

    const sctx = await browser.newContext({ viewport: { width: 375, height: 812 } })
    const sp = await sctx.newPage()
    await sp.goto(link!)
    await sp.getByRole('heading', { name: 'Choose your password' }).waitFor()
    await sp.getByText(mira).waitFor()
    const password = `schlieren-${tag}-diamonds`
    // A mismatch is caught on the page before anything is sent.
    await sp.getByLabel('New password').fill(password)
    await sp.getByLabel('Type it again').fill(`${password}x`)
    await sp.getByRole('button', { name: 'Save password and sign in' }).click()
    await sp.getByText('The two passwords differ').waitFor()
    await sp.getByLabel('Type it again').fill(password)
    await noSideways(sp)
    await sp.screenshot({ path: screenshotPath('invitation-set-password-375'), fullPage: true })
    await sp.getByRole('button', { name: 'Save password and sign in' }).click()
    await sp.getByRole('heading', { name: 'My courses' }).waitFor()
    await sp.getByRole('link', { name: `Nozzle lab ${tag}` }).waitFor()

    // The link is spent: opening it again says so.
    await sp.goto(link!)
    await sp.getByTestId('invitation-refused').getByText('already been used').waitFor()
    await sctx.close()
  }, 120_000)
})

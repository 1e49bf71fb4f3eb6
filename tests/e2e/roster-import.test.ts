import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser } from 'playwright-core'
import { hashPassword } from '../../server/auth/password'
import { courses, enrollments, labGroups, sections, users } from '../../server/db/schema'
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
let sectionId = 0

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
  const [section] = await db.insert(sections).values({ courseId, name: 'Tue PM' }).$returningId()
  sectionId = section!.id
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

describe('roster import of a registrar file with moves', () => {
  it('imports a semicolon file with split names and short group names, leaves an unticked move out, and the roster shows the outcome', async () => {
    const db = app.db.db
    const groupId: Record<string, number> = {}
    for (const name of ['Group A1', 'Group A3']) {
      const [g] = await db.insert(labGroups).values({ courseId, sectionId, name }).$returningId()
      groupId[name] = g!.id
    }
    const aletta = `aletta.${tag}@univ.example`
    const tobias = `tobias.${tag}@univ.example`
    const ines = `ines.${tag}@univ.example`
    const hash = await hashPassword(`enrolled-${tag}-password`)
    for (const [email, displayName] of [
      [aletta, `Aletta Vermeulen ${tag}`],
      [tobias, `Tobias Okonkwo ${tag}`],
    ] as const) {
      const [u] = await db.insert(users).values({ email, displayName, passwordHash: hash }).$returningId()
      await db
        .insert(enrollments)
        .values({ userId: u!.id, courseId, role: 'student', sectionId, labGroupId: groupId['Group A1']! })
    }
    // As a spreadsheet in a European locale saves it: Windows-1252, semicolons, family name before given name.
    const file = [
      'Last name;First name;Student e-mail;Lab group',
      `Vermeulen ${tag};Aletta;${aletta};a3`,
      `Okonkwo ${tag};Tobias;${tobias};A3`,
      '',
      `Haldane ${tag};In\u00e8s;${ines};a1`,
    ].join('\r\n')

    const ctx = await browser.newContext({ viewport: { width: 375, height: 812 } })
    const page = await ctx.newPage()
    await signIn(page, app.url, instructorEmail, PASSWORD)
    await page.goto(`${app.url}/courses/${courseId}/roster`)
    await page.getByRole('link', { name: 'Import roster' }).click()
    await page.getByRole('heading', { level: 1, name: 'Import roster' }).waitFor()
    await page
      .getByLabel('CSV file')
      .setInputFiles({ name: 'class-list.csv', mimeType: 'text/csv', buffer: Buffer.from(file, 'latin1') })
    await expect.poll(() => page.getByLabel('Roster rows (CSV)').inputValue()).toContain(ines)
    await page.getByRole('button', { name: 'Check the file' }).click()

    const reading = page.getByTestId('import-reading')
    // The file's bytes reach the server, which says how it decoded them.
    await reading.getByText('Read as Windows-1252', { exact: false }).waitFor()
    await reading.getByText('cells separated by semicolons', { exact: false }).waitFor()
    expect(await reading.locator('dd[data-field="name"]').innerText()).toContain(
      'from “First name” + “Last name” (given name first',
    )
    expect(await reading.locator('dd[data-field="group"]').innerText()).toBe('from “Lab group”')
    const table = page.getByTestId('import-table')
    await table.getByText(`Inès Haldane ${tag}`).waitFor()
    // "a1" is the course's Group A1: nothing new is created.
    expect(await page.getByText('New lab groups to create').count()).toBe(0)

    const moves = page.getByTestId('import-moves')
    const alettaMove = moves.getByRole('checkbox', {
      name: `Aletta Vermeulen ${tag} (row 2) moves from Group A1 to Group A3`,
    })
    const tobiasMove = moves.getByRole('checkbox', {
      name: `Tobias Okonkwo ${tag} (row 3) moves from Group A1 to Group A3`,
    })
    expect(await alettaMove.isChecked()).toBe(true)
    expect(await tobiasMove.isChecked()).toBe(true)
    await alettaMove.uncheck()
    await noSideways(page)
    await page.screenshot({ path: screenshotPath('roster-import-moves-375'), fullPage: true })

    await page.getByRole('button', { name: 'Import: create 1 account, e-mail 1 invitation, move 1 person' }).click()
    const done = page.getByTestId('import-result')
    await done.getByText('1 move left out').waitFor()
    await page.getByRole('link', { name: 'See the roster' }).click()
    const roster = page.getByTestId('roster-table')
    await roster.getByText(`Inès Haldane ${tag}`).waitFor()
    const groupCell = (email: string) => roster.locator('tbody tr', { hasText: email }).locator('td').nth(3).innerText()
    expect(await groupCell(aletta)).toBe('Group A1')
    expect(await groupCell(tobias)).toBe('Group A3')
    expect(await groupCell(ines)).toBe('Group A1')
    await ctx.close()
  }, 120_000)
})

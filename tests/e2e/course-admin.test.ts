import { and, eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser } from 'playwright-core'
import { hashPassword } from '../../server/auth/password'
import { courses, dueExtensions, enrollments, users } from '../../server/db/schema'
import { insertModuleWithVersion, markPublished } from '../../server/repositories/modules'
import { toVersion } from '../../server/services/module-service'
import { zonedTimeToUtc } from '../../shared/time'
import { PASSWORD, uniq } from '../helpers/app'
import { choose, launchBrowser, noSideways, screenshotPath, serveApp, signIn } from '../helpers/browser'
import { moduleSource } from '../helpers/modules'

let app: Awaited<ReturnType<typeof serveApp>>
let chrome: Awaited<ReturnType<typeof launchBrowser>>
let browser: Browser
const tag = uniq()
const people = {
  instructor: { email: `admin-inst.${tag}@test.example`, name: `Rosa Instructor ${tag}`, id: 0 },
  student: { email: `admin-stud.${tag}@test.example`, name: `Tomas Student ${tag}`, id: 0 },
}
let courseId = 0
let moduleId = 0

/** A course of this test's own (so the demo course the other journeys use stays as it is). */
beforeAll(async () => {
  app = await serveApp()
  const db = app.db.db
  const hash = await hashPassword(PASSWORD)
  for (const p of Object.values(people)) {
    const [u] = await db
      .insert(users)
      .values({ email: p.email, displayName: p.name, passwordHash: hash })
      .$returningId()
    p.id = u!.id
  }
  const [c] = await db
    .insert(courses)
    .values({
      code: `ADM${tag.slice(0, 4)}`,
      title: `Admin journey course ${tag}`,
      term: 'Test term',
      institution: 'Test University (fictional)',
      timeZone: 'America/Denver',
    })
    .$returningId()
  courseId = c!.id
  await db.insert(enrollments).values([
    { userId: people.instructor.id, courseId, role: 'instructor' },
    { userId: people.student.id, courseId, role: 'student' },
  ])
  // A published module due 2027-02-09 17:00 Denver time.
  const v = toVersion(moduleSource('Nozzle sizing worksheet'), 'nozzle-sizing', 'America/Denver')
  const m = await insertModuleWithVersion(
    db,
    { courseId, slug: `nozzle-${tag}`, position: 1, createdBy: people.instructor.id },
    v,
  )
  await markPublished(db, m.moduleId, m.versionId, null, people.instructor.id)
  moduleId = m.moduleId
  chrome = await launchBrowser()
  browser = chrome.browser
}, 120_000)
afterAll(async () => {
  await chrome?.close()
  await app?.close()
})

describe('course administration in the browser', () => {
  it('the instructor adds a section and a lab group, moves a student into the group, and grants an extension; the pages fit 375 px', async () => {
    const ctx = await browser.newContext({ viewport: { width: 1280, height: 900 } })
    const page = await ctx.newPage()
    await signIn(page, app.url, people.instructor.email, PASSWORD)
    await page.getByRole('link', { name: `Admin journey course ${tag}` }).click()
    const nav = page.getByRole('navigation', { name: 'Course' })
    await nav.getByRole('link', { name: 'Sections & groups' }).click()
    await page.getByRole('heading', { level: 1, name: 'Sections & groups' }).waitFor()

    await page.getByLabel('New section name').fill('Tuesday bay')
    await page.getByLabel('Meets (optional)').fill('Tue 13:00–16:00, Bay 2')
    await page.getByRole('button', { name: 'Add section' }).click()
    await page.getByTestId('sections-table').getByRole('rowheader', { name: 'Tuesday bay' }).waitFor()

    // The same name again is refused with a message at the form.
    await page.getByLabel('New section name').fill('tuesday bay')
    await page.getByRole('button', { name: 'Add section' }).click()
    await expect
      .poll(() => page.getByTestId('section-create').getByRole('alert').innerText())
      .toContain('already a section named')

    // Row actions: edit and cancel, then a throw-away section renamed, and deleted after confirming.
    await page.getByLabel('New section name').fill('Spare bay')
    await page.getByRole('button', { name: 'Add section' }).click()
    const sections = page.getByTestId('sections-table')
    await sections.getByRole('rowheader', { name: 'Spare bay' }).waitFor()
    await page.getByRole('button', { name: 'Edit section Tuesday bay' }).click()
    await sections.getByRole('button', { name: 'Cancel' }).click()
    await sections.getByRole('rowheader', { name: 'Tuesday bay' }).waitFor()
    await page.getByRole('button', { name: 'Edit section Spare bay' }).click()
    await sections.getByLabel('Name', { exact: true }).fill('Spare bay 2')
    await sections.getByRole('button', { name: 'Save' }).click()
    await sections.getByRole('rowheader', { name: 'Spare bay 2' }).waitFor()
    await page.getByRole('button', { name: 'Delete section Spare bay 2' }).click()
    await sections.getByRole('button', { name: 'Keep' }).click()
    await page.getByRole('button', { name: 'Delete section Spare bay 2' }).click()
    await sections.getByRole('button', { name: 'Delete', exact: true }).click()
    await sections.getByRole('rowheader', { name: 'Spare bay 2' }).waitFor({ state: 'detached' })

    await page.getByLabel('New lab group name').fill('Rig 7')
    await choose(page, 'Section of the new group', 'Tuesday bay')
    await page.getByRole('button', { name: 'Add lab group' }).click()
    const groupRow = page.getByTestId('groups-table').getByRole('row', { name: /Rig 7/ })
    await groupRow.waitFor()
    expect(await groupRow.innerText()).toContain('Tuesday bay')

    await page.setViewportSize({ width: 375, height: 812 })
    await noSideways(page)
    await page.screenshot({ path: screenshotPath('course-sections-375'), fullPage: true })
    await page.setViewportSize({ width: 1280, height: 900 })

    // The roster: move the student into the group (which also puts them in its section).
    await nav.getByRole('link', { name: 'Roster' }).click()
    await page.getByRole('heading', { level: 1, name: 'Roster' }).waitFor()
    await page.getByRole('button', { name: `Change section & group of ${people.student.name}` }).click()
    const placement = page.getByRole('dialog', { name: `Section and lab group: ${people.student.name}` })
    await placement.waitFor()
    expect(await placement.innerText()).toContain('only future hand-ins follow the new group')
    await choose(page, 'Lab group', 'Rig 7 (section Tuesday bay)')
    await expect
      .poll(() => page.getByRole('combobox', { name: 'Section', exact: true }).innerText())
      .toBe('Tuesday bay')
    await placement.getByRole('button', { name: 'Save' }).click()
    await placement.waitFor({ state: 'hidden' })
    const row = page.getByTestId('roster-table').getByRole('row', { name: new RegExp(people.student.name) })
    await expect.poll(() => row.innerText()).toContain('Rig 7')
    expect(await row.innerText()).toContain('Tuesday bay')

    // An extension to 12 February, 17:00 course time.
    await page.getByRole('button', { name: `Due-date extension for ${people.student.name}` }).click()
    const ext = page.getByRole('dialog', { name: `Due-date extension: ${people.student.name}` })
    await ext.waitFor()
    expect(await ext.innerText()).toContain('Due for everyone')
    await ext.getByLabel(/New due date for/).fill('2027-02-12T17:00')
    await ext.getByLabel('Note for the staff (optional)').fill('Test stand down on the due date.')
    await ext.getByRole('button', { name: 'Grant extension' }).click()
    await ext.getByTestId('extensions-granted').waitFor()
    expect(await ext.getByTestId('extensions-granted').innerText()).toContain('Nozzle sizing worksheet')
    const [stored] = await app.db.db
      .select()
      .from(dueExtensions)
      .where(and(eq(dueExtensions.moduleId, moduleId), eq(dueExtensions.userId, people.student.id)))
    expect(stored!.dueAt.toISOString()).toBe(zonedTimeToUtc('2027-02-12T17:00', 'America/Denver').toISOString())
    expect(stored!.note).toBe('Test stand down on the due date.')

    await page.setViewportSize({ width: 375, height: 812 })
    await noSideways(page)
    await page.screenshot({ path: screenshotPath('roster-extension-375'), fullPage: true })
    await ext.getByRole('button', { name: 'Done' }).click()
    await ext.waitFor({ state: 'hidden' })
    await noSideways(page)

    // The removal dialog names the person and says their work is kept; keep them.
    await page.getByRole('button', { name: `Remove ${people.student.name} from the course` }).click()
    const remove = page.getByRole('alertdialog', { name: `Remove ${people.student.name} from the course?` })
    await remove.waitFor()
    expect(await remove.innerText()).toContain('hand-ins, grades and review history are kept')
    await noSideways(page)
    await remove.getByRole('button', { name: 'Keep them' }).click()
    await remove.waitFor({ state: 'hidden' })
    const [still] = await app.db.db
      .select()
      .from(enrollments)
      .where(and(eq(enrollments.userId, people.student.id), eq(enrollments.courseId, courseId)))
    expect(still).toBeDefined()
    await ctx.close()
  })
})

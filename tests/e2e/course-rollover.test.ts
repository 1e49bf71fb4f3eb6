import { readFileSync } from 'node:fs'
import { and, eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser } from 'playwright-core'
import { hashPassword } from '../../server/auth/password'
import { courses, enrollments, labGroups, modules, sections, users } from '../../server/db/schema'
import { insertModuleWithVersion, markPublished } from '../../server/repositories/modules'
import { toVersion } from '../../server/services/module-service'
import { PASSWORD, uniq } from '../helpers/app'
import { launchBrowser, noSideways, screenshotPath, serveApp, signIn } from '../helpers/browser'

let app: Awaited<ReturnType<typeof serveApp>>
let chrome: Awaited<ReturnType<typeof launchBrowser>>
let browser: Browser
const tag = uniq()
const code = `RO${tag.slice(0, 5)}`
const people = {
  instructor: { email: `roll-inst.${tag}@test.example`, name: `Ilse Instructor ${tag}`, id: 0 },
  ta: { email: `roll-ta.${tag}@test.example`, name: `Tarik Assistant ${tag}`, id: 0 },
  student: { email: `roll-stud.${tag}@test.example`, name: `Sunniva Student ${tag}`, id: 0 },
}

/**
 * A course shaped like the demo course (its three lab sheets issued, two sections with meeting
 * times, lab groups, a TA and a student), of this test's own so the demo course stays as it is.
 */
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
      code,
      title: `Rocket propulsion laboratory ${tag}`,
      term: 'Spring 2027',
      institution: 'Test University (fictional)',
      timeZone: 'America/Denver',
    })
    .$returningId()
  const courseId = c!.id
  const [tue] = await db
    .insert(sections)
    .values({ courseId, name: 'Tue', meets: 'Tue 13:00–16:00, Bay 2' })
    .$returningId()
  await db.insert(sections).values({ courseId, name: 'Thu', meets: 'Thu 09:00–12:00, Bay 1' })
  const [g] = await db.insert(labGroups).values({ courseId, sectionId: tue!.id, name: 'Group A1' }).$returningId()
  await db.insert(labGroups).values({ courseId, sectionId: tue!.id, name: 'Group A2' })
  await db.insert(enrollments).values([
    { userId: people.instructor.id, courseId, role: 'instructor' },
    { userId: people.ta.id, courseId, role: 'ta', sectionId: tue!.id },
    { userId: people.student.id, courseId, role: 'student', sectionId: tue!.id, labGroupId: g!.id },
  ])
  const files = ['01-nozzle-flow-fundamentals.md', '02-cold-flow-characterisation.md', '03-hot-fire.md']
  for (const [i, file] of files.entries()) {
    const source = readFileSync(new URL(`../../content/${file}`, import.meta.url), 'utf8')
    const slug = file.replace(/^\d+-|\.md$/g, '')
    const m = await insertModuleWithVersion(
      db,
      { courseId, slug, position: i + 1, createdBy: people.instructor.id },
      toVersion(source, slug, 'America/Denver'),
    )
    await markPublished(db, m.moduleId, m.versionId, null, people.instructor.id)
  }
  chrome = await launchBrowser()
  browser = chrome.browser
}, 120_000)
afterAll(async () => {
  await chrome?.close()
  await app?.close()
})

describe('starting next term from a course', () => {
  it('the instructor previews and creates next term’s course, then opens it: its sheets are being prepared with moved due dates', async () => {
    const ctx = await browser.newContext({ viewport: { width: 1280, height: 900 } })
    const page = await ctx.newPage()
    // A step that cannot happen fails on its own line rather than at the test's time limit.
    page.setDefaultTimeout(15_000)
    await signIn(page, app.url, people.instructor.email, PASSWORD)
    await page.getByRole('link', { name: `Rocket propulsion laboratory ${tag}` }).click()
    await page.getByRole('link', { name: 'Start next term from this course' }).click()
    await page.getByRole('heading', { level: 1, name: 'Start next term from this course' }).waitFor()

    await expect.poll(() => page.getByLabel('Course code').inputValue()).toBe(code)
    await page.getByLabel('Term', { exact: true }).fill('Autumn 2027')
    await page.getByLabel('This term started on (optional)').fill('2027-01-25')
    await page.getByLabel('Next term starts on').fill('2027-08-30')
    // 2027-01-25 → 2027-08-30 is 217 days: 31 weeks, proposed.
    await expect.poll(() => page.getByLabel('Move due dates by (whole weeks)').inputValue()).toBe('31')
    await page.getByLabel('Bring the teaching assistants along (with the sections they look after)').check()
    await page.getByRole('button', { name: 'Preview what will be created' }).click()

    const plan = page.getByTestId('rollover-plan')
    await plan.waitFor()
    const cold = plan.getByRole('row', { name: /Cold-flow characterisation/ })
    // 31 weeks after Tue 2027-02-23 is Tue 2027-09-28; after Tue 2027-03-23, Tue 2027-10-26.
    await expect.poll(() => cold.innerText()).toMatch(/2027-02-23 17:00[\s\S]*2027-09-28 17:00/)
    const hot = plan.getByRole('row', { name: /Hot fire/ })
    await expect.poll(() => hot.innerText()).toMatch(/2027-03-23 17:00[\s\S]*2027-10-26 17:00/)
    await expect.poll(() => plan.innerText()).toContain('Tue — Tue 13:00–16:00, Bay 2')
    await expect.poll(() => plan.innerText()).toContain('Group A1, Group A2')
    await expect.poll(() => plan.innerText()).toContain(people.ta.name)

    await page.setViewportSize({ width: 375, height: 800 })
    await noSideways(page)
    await page.screenshot({ path: screenshotPath('course-rollover-375'), fullPage: true })
    await page.setViewportSize({ width: 1280, height: 900 })

    await page.getByRole('button', { name: /Create next term/ }).click()
    await page.getByRole('link', { name: 'Open the new course' }).click()
    await page.getByRole('heading', { level: 1, name: `Rocket propulsion laboratory ${tag}` }).waitFor()
    await expect.poll(() => page.locator('.page-header .code').innerText()).toBe(`${code} · Autumn 2027`)
    const sheets = page.getByRole('region', { name: 'Lab modules and due dates' })
    await expect.poll(() => sheets.innerText()).toMatch(/Cold-flow characterisation[\s\S]*being prepared/i)
    await expect.poll(() => sheets.innerText()).toContain('Sep 28, 2027, 17:00')
    await expect.poll(() => sheets.innerText()).toContain('Oct 26, 2027, 17:00')

    // The new course's sheets are being prepared; the old course keeps its issued ones.
    const [made] = await app.db.db
      .select({ id: courses.id })
      .from(courses)
      .where(and(eq(courses.code, code), eq(courses.term, 'Autumn 2027')))
    const statuses = await app.db.db
      .select({ status: modules.status })
      .from(modules)
      .where(eq(modules.courseId, made!.id))
    expect(statuses.map((r) => r.status)).toEqual(['draft', 'draft', 'draft'])
    await ctx.close()
  }, 120_000)
})

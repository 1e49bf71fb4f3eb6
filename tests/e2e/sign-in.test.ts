import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, Page } from 'playwright-core'
import { seedDemo } from '../../scripts/demo/seed-demo'
import { DEFAULT_DEMO_PASSWORD, DEMO_COURSE, DEMO_INSTRUCTOR, DEMO_STUDENT } from '../../scripts/demo/scenario'
import { launchBrowser, screenshotPath, serveApp } from '../helpers/browser'

let app: Awaited<ReturnType<typeof serveApp>>
let chrome: Awaited<ReturnType<typeof launchBrowser>>
let browser: Browser

beforeAll(async () => {
  app = await serveApp()
  // The browser journeys use the demo scenario, seeded into the test database.
  await seedDemo(app.db.db)
  chrome = await launchBrowser()
  browser = chrome.browser
})
afterAll(async () => {
  await chrome?.close()
  await app?.close()
})

async function signIn(page: Page, email: string) {
  await page.goto(`${app.url}/`)
  await page.getByRole('heading', { name: 'Sign in' }).waitFor()
  await page.getByLabel('E-mail address').fill(email)
  await page.getByLabel('Password', { exact: true }).fill(DEFAULT_DEMO_PASSWORD)
  await page.getByRole('button', { name: 'Sign in' }).click()
  await page.getByRole('heading', { name: 'My courses' }).waitFor()
}

async function signOut(page: Page) {
  await page.getByRole('button', { name: 'Sign out' }).click()
  await page.getByRole('heading', { name: 'Sign in' }).waitFor()
  // Signed out for real: going back to a course page lands on sign-in again.
  await page.goto(`${app.url}/courses`)
  await page.getByRole('heading', { name: 'Sign in' }).waitFor()
}

describe('signing in as two roles in Chromium', () => {
  it('the instructor sees the course with its sections and the roster link, then signs out', async () => {
    const page = await browser.newPage({ viewport: { width: 1280, height: 800 } })
    await signIn(page, DEMO_INSTRUCTOR.email)
    await page.getByRole('link', { name: DEMO_COURSE.title }).click()
    // The course home has loaded once its staff-only panel is there.
    await page.getByRole('heading', { name: 'Sections' }).waitFor()
    await page.getByRole('heading', { level: 1, name: DEMO_COURSE.title }).waitFor()
    const courseNav = page.getByRole('navigation', { name: 'Course' })
    await expect(courseNav.getByRole('link', { name: 'Roster' }).isVisible()).resolves.toBe(true)
    await expect(page.getByText('Instructor', { exact: true }).isVisible()).resolves.toBe(true)
    await courseNav.getByRole('link', { name: 'Roster' }).click()
    await page.getByTestId('roster-table').waitFor()
    expect(await page.getByTestId('roster-table').locator('tbody tr').count()).toBe(27)
    await page.screenshot({ path: screenshotPath('instructor-roster'), fullPage: true })
    await signOut(page)
    await page.close()
  })

  it('a student sees their lab group, no roster link, and the page fits a 375 px phone', async () => {
    const page = await browser.newPage({ viewport: { width: 375, height: 740 } })
    await signIn(page, DEMO_STUDENT.email)
    await page.getByRole('link', { name: DEMO_COURSE.title }).click()
    await page.getByRole('heading', { name: 'My section and lab group' }).waitFor()
    const courseNav = page.getByRole('navigation', { name: 'Course' })
    expect(await courseNav.getByRole('link', { name: 'Roster' }).count()).toBe(0)
    expect(await page.getByRole('heading', { name: 'Sections' }).count()).toBe(0)
    // Their group's members are listed, themselves included.
    await expect(page.locator('.facts').getByText(DEMO_STUDENT.displayName).isVisible()).resolves.toBe(true)
    // Nothing wider than the phone's screen.
    const overflow = await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth)
    expect(overflow).toBeLessThanOrEqual(0)
    await page.screenshot({ path: screenshotPath('student-course-home-375'), fullPage: true })
    // The roster is refused by the server, not just hidden.
    await page.goto(`${app.url}${new URL(page.url()).pathname}/roster`)
    await page.getByText('Could not load the roster.').waitFor()
    await signOut(page)
    await page.close()
  })

  it('a wrong password shows one generic message at the form', async () => {
    const page = await browser.newPage()
    await page.goto(`${app.url}/sign-in`)
    await page.getByLabel('E-mail address').fill(DEMO_STUDENT.email)
    await page.getByLabel('Password', { exact: true }).fill('not the password')
    await page.getByRole('button', { name: 'Sign in' }).click()
    await page.getByRole('alert').filter({ hasText: 'do not match an account' }).waitFor()
    await page.close()
  })
})

import { mkdirSync } from 'node:fs'
import { createServer } from 'node:http'
import type { Server } from 'node:http'
import type { AddressInfo } from 'node:net'
import path from 'node:path'
import { chromium } from 'playwright-core'
import request from 'supertest'
import type { Browser, BrowserContext, Page } from 'playwright-core'
import { afterEach, expect } from 'vitest'
import { DEFAULT_DEMO_PASSWORD } from '../../scripts/demo/scenario'
import { createApp, gradingContext } from '../../server/app'
import { appDbOptions, gradingBudget } from '../../server/config'
import { createDb } from '../../server/db/client'
import { createLogger } from '../../server/logger'
import { DEFAULT_OUTBOX_OPTIONS, startOutboxWorker } from '../../server/mail/outbox-worker'
import { createSmtpSender } from '../../server/mail/transport'
import { createGrader } from '../../server/grading/grading-pool'
import { DEFAULT_GRADING_WORKER_OPTIONS, startGradingWorker } from '../../server/grading/grading-worker'
import { testConfig } from './app'
import { auditRecorded, newRecorder, recordNavigations } from './a11y'
import type { A11yRecorder } from './a11y'

/** The browser this test file launched, and the pages its tests reached that are not yet checked. */
let current: { browser: Browser; recorder: A11yRecorder } | null = null

/** The pages the current file's tests reached that are not yet checked (for the checker's own test). */
export function a11yRecorder(): A11yRecorder | null {
  return current?.recorder ?? null
}

// Every browser test file gets the accessibility check: after each test, the pages it reached are
// checked at 1280 px and 375 px (each route once per person per file). See ./a11y.ts.
afterEach(async () => {
  if (current) await auditRecorded(current.recorder)
}, 180_000)

/** Debian's Chromium, never a downloaded browser; playwright gives it a fresh temporary profile. */
export async function launchBrowser(): Promise<{ browser: Browser; close: () => Promise<void> }> {
  const browser = await chromium.launch({
    executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
    headless: true,
    args: [
      '--no-sandbox',
      '--disable-gpu',
      '--disable-quic',
      '--no-first-run',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
    ],
  })
  const recorder = newRecorder(browser.newContext.bind(browser))
  watchNavigations(browser, recorder)
  current = { browser, recorder }
  return {
    browser,
    close: async () => {
      if (current?.browser === browser) current = null
      await browser.close()
    },
  }
}

/**
 * Contexts and pages the tests open record where they go. Pages from `browser.newPage` get a context
 * of their own that closes with the page, as playwright's own `newPage` does.
 */
function watchNavigations(browser: Browser, recorder: A11yRecorder): void {
  browser.newContext = async (options) => {
    const ctx = await recorder.open(options)
    recordNavigations(ctx, recorder)
    return ctx
  }
  browser.newPage = async (options) => {
    const ctx: BrowserContext = await browser.newContext(options)
    const page = await ctx.newPage()
    const closePage = page.close.bind(page)
    page.close = async (opts) => {
      await closePage(opts)
      await ctx.close()
    }
    return page
  }
}

/** The real app (API + built client) on 127.0.0.1 and a free port, with its mail worker running. */
export async function serveApp(): Promise<{
  url: string
  db: ReturnType<typeof createDb>
  close: () => Promise<void>
}> {
  // Listen first so the app's public URL (used in e-mail links) has the real port.
  const server: Server = createServer()
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', () => resolve()))
  const { port } = server.address() as AddressInfo
  const url = `http://127.0.0.1:${port}`
  const config = testConfig({ CLIENT_DIST: 'dist/client', APP_URL: url })
  const handle = createDb(appDbOptions(config))
  const logger = createLogger(config.LOG_LEVEL)
  // The real outbox worker, polling fast so journeys see their e-mail within a second or two.
  const worker = startOutboxWorker(handle.db, createSmtpSender(config), logger, {
    ...DEFAULT_OUTBOX_OPTIONS,
    pollMs: 300,
  })
  // The real background grader too, as `npm start` runs it.
  const grader = createGrader(gradingBudget(config))
  const grading = startGradingWorker(
    handle.db,
    gradingContext(handle.db, { grader, logger, appUrl: url, onMailQueued: () => worker.kick() }),
    {
      ...DEFAULT_GRADING_WORKER_OPTIONS,
      pollMs: 500,
    },
  )
  const created = createApp({
    config,
    db: handle.db,
    logger,
    grader,
    onMailQueued: () => worker.kick(),
    onHandInStored: () => grading.kick(),
  })
  server.on('request', created.app)
  return {
    url,
    db: handle,
    close: async () => {
      server.closeAllConnections()
      await new Promise<void>((r) => server.close(() => r()))
      await worker.stop()
      await grading.stop()
      await grader.close()
      await created.close()
      await handle.close()
    },
  }
}

export function screenshotPath(name: string): string {
  const dir = path.join(process.env.ARTIFACTS_DIR ?? '.artifacts', 'screenshots')
  mkdirSync(dir, { recursive: true })
  return path.join(dir, `${name}.png`)
}

/** Signs in through the sign-in form and waits for the course list. */
export async function signIn(
  page: Page,
  baseUrl: string,
  email: string,
  password = DEFAULT_DEMO_PASSWORD,
): Promise<void> {
  await page.goto(`${baseUrl}/sign-in`)
  await page.getByLabel('E-mail address').fill(email)
  await page.getByLabel('Password', { exact: true }).fill(password)
  await page.getByRole('button', { name: 'Sign in' }).click()
  await page.getByRole('heading', { name: 'My courses' }).waitFor()
}

/** Picks an option in a PrimeVue select found by its accessible name. */
export async function choose(page: Page, name: string, option: string): Promise<void> {
  const picker = page.getByRole('combobox', { name, exact: true })
  await picker.click()
  const list = await picker.getAttribute('aria-controls')
  if (!list) throw new Error(`the picker "${name}" did not open its list`)
  await page.locator(`[id="${list}"]`).getByRole('option', { name: option, exact: true }).click()
  await expect.poll(() => picker.innerText()).toBe(option)
}

/** No sideways scrolling, once charts have followed a viewport change (chart.js resizes on the next frames). */
export async function noSideways(page: Page): Promise<void> {
  await expect
    .poll(() => page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth))
    .toBeLessThanOrEqual(0)
}

/**
 * The course whose page is open (`/c/<course slug>/…`): its slug from the address, and its numeric id
 * as the page-address lookup gives it to the signed-in person.
 */
export async function openCourse(page: Page): Promise<{ courseId: number; courseSlug: string }> {
  const courseSlug = /^\/c\/([^/]+)/.exec(new URL(page.url()).pathname)?.[1]
  if (!courseSlug) throw new Error(`not a course page: ${page.url()}`)
  const courseId = await page.evaluate(async (s) => {
    const res = await fetch(`/api/course-keys/${s}`, { headers: { Accept: 'application/json' } })
    return ((await res.json()) as { courseId: number }).courseId
  }, courseSlug)
  return { courseId, courseSlug }
}

/** A signed-in API client for a served app (set-up through the API beside the browser): agent and CSRF token. */
export async function apiSignIn(
  baseUrl: string,
  email: string,
  password = DEFAULT_DEMO_PASSWORD,
): Promise<{ agent: ReturnType<typeof request.agent>; csrf: string }> {
  const agent = request.agent(baseUrl)
  const s = await agent.get('/api/auth/session').expect(200)
  const res = await agent
    .post('/api/auth/sign-in')
    .set('x-csrf-token', s.body.csrfToken)
    .send({ email, password })
    .expect(200)
  return { agent, csrf: res.body.csrfToken as string }
}

import { createRequire } from 'node:module'
import type { BrowserContext, BrowserContextOptions, Cookie, Page } from 'playwright-core'
import { SESSION_COOKIE } from '../../server/routes/auth'

/**
 * Accessibility checks for the browser tests. Every context a test opens records the pages its tabs
 * reach (full loads and client-side route changes); after each test the pages not yet checked are
 * opened again with the same session cookies, at a desktop and a phone width, and axe-core looks for
 * WCAG 2 A/AA problems. A serious or critical one fails the test with a readable list.
 */

const AXE_SCRIPT = createRequire(import.meta.url).resolve('axe-core/axe.min.js')
/** Desktop first, then the narrow phone width every page must also work at. */
export const AUDIT_WIDTHS = [1280, 375] as const
const FAILING_IMPACTS = new Set(['serious', 'critical'])
/** The loading states the app shows while it fetches: a page is settled when none is left. */
const LOADING = '.load-state[role="status"], .p-datatable-mask, .p-skeleton, [aria-busy="true"]'

export interface A11yFinding {
  rule: string
  impact: string
  help: string
  targets: string[]
  page: string
  width: number
}

interface Visit {
  url: string
  cookies: Promise<Cookie[]>
}

/** What one browser (one test file) has recorded and already checked. */
export interface A11yRecorder {
  pending: Visit[]
  /** "who|route pattern" keys already checked in this file. */
  checked: Set<string>
  /** Session cookie value → the person signed in with it (asked once per session). */
  people: Map<string, string>
  /** Opens a context whose navigations are not recorded (the checks' own). */
  open: OpenContext
}

type OpenContext = (options?: BrowserContextOptions) => Promise<BrowserContext>

export function newRecorder(open: OpenContext): A11yRecorder {
  return { pending: [], checked: new Set(), people: new Map(), open }
}

/**
 * A route pattern: query and hash dropped, path segments holding a digit (ids, term slugs) replaced,
 * so one course's page and another's count as one page.
 */
export function routePattern(url: string): string {
  const u = new URL(url)
  const path = u.pathname
    .split('/')
    .map((s) => (/\d/.test(s) ? ':id' : s))
    .join('/')
  return `${u.origin}${path}`
}

/** Records every top-level page a tab of this context reaches, with the cookies it had then. */
export function recordNavigations(ctx: BrowserContext, recorder: A11yRecorder): void {
  let lastCookies: Cookie[] = []
  const watch = (page: Page) => {
    page.on('framenavigated', (frame) => {
      if (frame !== page.mainFrame()) return
      const url = frame.url()
      if (!/^https?:/.test(url)) return
      // The cookies at this moment say who saw the page (signed out on the sign-in page, signed in later).
      // A context closed right after the navigation answers with the cookies last seen.
      const cookies = Promise.race([
        ctx.cookies(),
        new Promise<never>((_, reject) => setTimeout(() => reject(new Error('no answer')), 5_000)),
      ]).then(
        (c) => (lastCookies = c),
        () => lastCookies,
      )
      recorder.pending.push({ url, cookies })
    })
  }
  ctx.pages().forEach(watch)
  ctx.on('page', watch)
}

/** Waits for the app's loading states to clear (a stuck page is still checked, as it stands). */
async function settle(page: Page): Promise<void> {
  await page.waitForLoadState('networkidle', { timeout: 10_000 }).catch(() => undefined)
  await page
    .waitForFunction((sel) => document.querySelectorAll(sel).length === 0, LOADING, { timeout: 10_000 })
    .catch(() => undefined)
  // Let transitions and chart resizes finish.
  await page.waitForTimeout(300)
}

/** Runs axe-core (WCAG 2 A and AA rules) on the page as it is and returns its serious and critical findings. */
export async function axeFindings(page: Page, width: number, label = page.url()): Promise<A11yFinding[]> {
  const hasAxe = await page.evaluate(() => 'axe' in window)
  if (!hasAxe) await page.addScriptTag({ path: AXE_SCRIPT })
  const violations = await page.evaluate(async () => {
    const w = window as unknown as {
      axe: {
        run: (
          ctx: Document,
          opts: object,
        ) => Promise<{
          violations: { id: string; impact?: string | null; help: string; nodes: { target: unknown[] }[] }[]
        }>
      }
    }
    const result = await w.axe.run(document, {
      runOnly: { type: 'tag', values: ['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa'] },
      resultTypes: ['violations'],
    })
    return result.violations.map((v) => ({
      id: v.id,
      impact: v.impact ?? 'unknown',
      help: v.help,
      targets: v.nodes.map((n) => n.target.map(String).join(' ')),
    }))
  })
  return violations
    .filter((v) => FAILING_IMPACTS.has(v.impact))
    .map((v) => ({ rule: v.id, impact: v.impact, help: v.help, targets: v.targets, page: label, width }))
}

/** Opens one recorded page at each width in a fresh context carrying the recorded cookies. */
async function auditVisit(
  open: OpenContext,
  url: string,
  cookies: Cookie[],
  firstLook: (landedOn: string) => boolean,
): Promise<A11yFinding[]> {
  // The app's Content-Security-Policy allows no inline script; axe is injected as one.
  const ctx = await open({ viewport: { width: AUDIT_WIDTHS[0], height: 900 }, bypassCSP: true })
  try {
    await ctx.addCookies(cookies)
    const page = await ctx.newPage()
    const findings: A11yFinding[] = []
    for (const width of AUDIT_WIDTHS) {
      await page.setViewportSize({ width, height: 900 })
      const res = await page.goto(url).catch((e: Error) => {
        // A file the browser downloads is not a page.
        if (/download|ERR_ABORTED/i.test(e.message)) return null
        throw e
      })
      // Downloads and API answers are not pages.
      if (!res || !(res.headers()['content-type'] ?? '').includes('text/html')) return []
      debug('loaded', width)
      await settle(page)
      debug('settled', width)
      // A page that sends the visitor elsewhere (sign-in) is checked where it lands, once.
      if (width === AUDIT_WIDTHS[0] && !firstLook(page.url())) return []
      findings.push(...(await axeFindings(page, width, new URL(page.url()).pathname)))
    }
    return findings
  } finally {
    await ctx.close()
  }
}

/** Who the cookies belong to, so each route is checked once per person per file. */
async function whoIs(recorder: A11yRecorder, origin: string, cookies: Cookie[]): Promise<string> {
  const session = cookies.find((c) => c.name === SESSION_COOKIE)?.value
  if (!session) return 'signed-out'
  const known = recorder.people.get(session)
  if (known) return known
  const ctx = await recorder.open()
  try {
    await ctx.addCookies(cookies)
    const res = await ctx.request.get(`${origin}/api/auth/session`, { failOnStatusCode: false })
    const body = res.ok() ? ((await res.json()) as { user: { email: string } | null }) : { user: null }
    const who = body.user?.email ?? 'signed-out'
    recorder.people.set(session, who)
    return who
  } finally {
    await ctx.close()
  }
}

const debug = (...args: unknown[]) => {
  if (process.env.A11Y_DEBUG) console.error('[a11y]', new Date().toISOString(), ...args)
}

export function formatFindings(findings: A11yFinding[]): string {
  const lines = findings.map(
    (f) =>
      `- ${f.rule} (${f.impact}) on ${f.page} at ${f.width} px: ${f.help}\n    ${f.targets.slice(0, 5).join('\n    ')}` +
      (f.targets.length > 5 ? `\n    … and ${f.targets.length - 5} more` : ''),
  )
  return `Accessibility check: ${findings.length} serious or critical problem(s)\n${lines.join('\n')}`
}

/** Checks the recorded pages not yet checked in this file; throws a readable list on a serious finding. */
export async function auditRecorded(recorder: A11yRecorder): Promise<void> {
  const findings = await collectFindings(recorder)
  if (findings.length > 0) throw new Error(formatFindings(findings))
}

async function collectFindings(recorder: A11yRecorder): Promise<A11yFinding[]> {
  const visits = recorder.pending.splice(0)
  const findings: A11yFinding[] = []
  for (const visit of visits) {
    debug('visit', visit.url)
    const cookies = await visit.cookies
    debug('cookies', cookies.length)
    const who = await whoIs(recorder, new URL(visit.url).origin, cookies)
    const key = `${who}|${routePattern(visit.url)}`
    if (recorder.checked.has(key)) continue
    recorder.checked.add(key)
    debug('audit', key)
    const firstLook = (landedOn: string) => {
      const landed = `${who}|${routePattern(landedOn)}`
      if (landed === key) return true
      if (recorder.checked.has(landed)) return false
      recorder.checked.add(landed)
      return true
    }
    findings.push(...(await auditVisit(recorder.open, visit.url, cookies, firstLook)))
  }
  return findings
}

// Bytes of JavaScript over the wire for three pages, as Chromium downloads them from the app on
// loopback with an empty cache: the sign-in page, a student's module page and the module editor
// (as the instructor). The demo course is seeded into the bench database; the client build in
// dist/client is served as `npm start` serves it (pre-compressed files, brotli when offered).
// Each figure is the sum of Chromium's encodedDataLength (bytes received, headers included) over
// the page's script responses until the network has been quiet for half a second.
// Run by `npm run bench` after `vite build`; exits 1 when a page misses its goal.
import { createServer } from 'node:http'
import type { AddressInfo } from 'node:net'
import { chromium } from 'playwright-core'
import type { BrowserContext } from 'playwright-core'
import { DEFAULT_DEMO_PASSWORD, DEMO_INSTRUCTOR, DEMO_STUDENT } from '../demo/scenario'
import { seedDemo } from '../demo/seed-demo'
import { createApp } from '../../server/app'
import { appDbOptions, loadConfig } from '../../server/config'
import { createDb } from '../../server/db/client'
import { createLogger } from '../../server/logger'

const KB = 1024
const GOALS = { signIn: 120 * KB, modulePage: 250 * KB, editor: 300 * KB }

const config = loadConfig({ ...process.env, CLIENT_DIST: 'dist/client', LOG_LEVEL: 'silent' })
const handle = createDb(appDbOptions(config))
await seedDemo(handle.db, DEFAULT_DEMO_PASSWORD)
const created = createApp({ config, db: handle.db, logger: createLogger('silent') })
const server = createServer(created.app)
await new Promise<void>((r) => server.listen(0, '127.0.0.1', () => r()))
const base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`

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

/** Signs in through the API in this context (the page's own cookies), so the measured page load is the first. */
async function signIn(context: BrowserContext, email: string): Promise<void> {
  const session = await context.request.get(`${base}/api/auth/session`)
  const { csrfToken } = (await session.json()) as { csrfToken: string }
  const res = await context.request.post(`${base}/api/auth/sign-in`, {
    headers: { 'x-csrf-token': csrfToken },
    data: { email, password: DEFAULT_DEMO_PASSWORD },
  })
  if (!res.ok()) throw new Error(`sign-in as ${email} failed: ${res.status()}`)
}

interface Weight {
  bytes: number
  /** The same without response headers: the script bodies as sent (compressed). */
  bodyBytes: number
  files: { url: string; bytes: number }[]
  encodings: Set<string>
}

/** Loads `path` in a fresh context (empty cache) and sums the script bytes Chromium received. */
async function weigh(path: string, email: string | null, ready: string): Promise<Weight> {
  const context = await browser.newContext()
  try {
    if (email) await signIn(context, email)
    const page = await context.newPage()
    const cdp = await context.newCDPSession(page)
    const scripts = new Map<string, { url: string; headerBytes: number }>()
    const weight: Weight = { bytes: 0, bodyBytes: 0, files: [], encodings: new Set() }
    cdp.on('Network.responseReceived', (e) => {
      if (e.type !== 'Script') return
      // At this point encodedDataLength counts what arrived before the body: the status line and headers.
      scripts.set(e.requestId, { url: e.response.url, headerBytes: e.response.encodedDataLength })
      const headers = Object.fromEntries(Object.entries(e.response.headers).map(([k, v]) => [k.toLowerCase(), v]))
      weight.encodings.add(String(headers['content-encoding'] ?? 'none'))
    })
    cdp.on('Network.loadingFinished', (e) => {
      const script = scripts.get(e.requestId)
      if (!script) return
      weight.bytes += e.encodedDataLength
      weight.bodyBytes += e.encodedDataLength - script.headerBytes
      weight.files.push({ url: script.url, bytes: e.encodedDataLength })
    })
    await cdp.send('Network.enable')
    await page.goto(`${base}${path}`, { waitUntil: 'networkidle' })
    await page.locator(ready).first().waitFor()
    await page.waitForLoadState('networkidle')
    return weight
  } finally {
    await context.close()
  }
}

/** The demo course and its first module (the one with live calculators). */
async function demoModule(): Promise<{ courseId: number; moduleId: number }> {
  const context = await browser.newContext()
  try {
    await signIn(context, DEMO_INSTRUCTOR.email)
    const courses = (await (await context.request.get(`${base}/api/courses`)).json()) as { id: number }[]
    const courseId = courses[0]!.id
    const modules = (await (await context.request.get(`${base}/api/courses/${courseId}/modules`)).json()) as {
      id: number
      status: string
    }[]
    const published = modules.find((m) => m.status === 'published')
    if (!published) throw new Error('the demo course has no published module')
    return { courseId, moduleId: published.id }
  } finally {
    await context.close()
  }
}

let ok = true
try {
  const { courseId, moduleId } = await demoModule()
  const pages = [
    { name: 'sign-in page', path: '/sign-in', email: null, ready: 'form', goal: GOALS.signIn },
    {
      name: "a student's module page",
      path: `/courses/${courseId}/modules/${moduleId}`,
      email: DEMO_STUDENT.email,
      ready: '.module-content h2',
      goal: GOALS.modulePage,
    },
    {
      name: 'module editor (instructor)',
      path: `/courses/${courseId}/modules/${moduleId}/edit`,
      email: DEMO_INSTRUCTOR.email,
      ready: '[data-testid="module-preview"] .module-content h2',
      goal: GOALS.editor,
    },
  ]
  console.log('Bytes of JavaScript over the wire (Chromium, empty cache, loopback; KB = 1024 bytes)')
  for (const p of pages) {
    const w = await weigh(p.path, p.email, p.ready)
    const met = w.bytes <= p.goal
    ok &&= met
    console.log(
      `  ${p.name.padEnd(28)} ${(w.bytes / KB).toFixed(1).padStart(6)} KB in ${String(w.files.length).padStart(2)} files` +
        ` (bodies ${(w.bodyBytes / KB).toFixed(1)} KB + headers; ${[...w.encodings].join(', ')})` +
        `   goal ≤ ${p.goal / KB} KB: ${met ? 'met' : 'MISSED'}`,
    )
    // BENCH_VERBOSE=1 lists the files, largest first.
    if (process.env.BENCH_VERBOSE) {
      for (const f of w.files.sort((a, b) => b.bytes - a.bytes)) {
        console.log(`      ${(f.bytes / KB).toFixed(1).padStart(6)} KB  ${new URL(f.url).pathname}`)
      }
    }
  }
} finally {
  await browser.close()
  server.closeAllConnections()
  await new Promise<void>((r) => server.close(() => r()))
  await created.close()
  await handle.close()
}
process.exit(ok ? 0 : 1)

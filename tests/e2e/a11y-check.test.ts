import { createServer } from 'node:http'
import type { Server } from 'node:http'
import type { AddressInfo } from 'node:net'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { auditRecorded } from '../helpers/a11y'
import { a11yRecorder, launchBrowser } from '../helpers/browser'

/**
 * The accessibility check itself: a page served on loopback that has an input without a label must
 * fail it, including when the page is reached by a client-side route change, so the check cannot pass
 * by not looking.
 */

let chrome: Awaited<ReturnType<typeof launchBrowser>>
let server: Server
let base: string

/** One small single-page app: /app/ok has a labelled field; /app/bad, reached by a button, has none. */
const PAGE = `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><title>Check page</title></head>
<body><main><h1>Check page</h1><div id="view"></div></main>
<script>
function render() {
  const view = document.getElementById('view')
  if (location.pathname === '/app/bad') {
    view.innerHTML = '<input type="text" id="nameless">'
  } else {
    view.innerHTML = '<label for="named">Throat area</label> <input type="text" id="named">' +
      ' <button type="button" id="go">Next step</button>'
    document.getElementById('go').addEventListener('click', () => { history.pushState({}, '', '/app/bad'); render() })
  }
}
render()
</script></body></html>`

beforeAll(async () => {
  server = createServer((_req, res) => {
    res.writeHead(200, { 'Content-Type': 'text/html; charset=utf-8' })
    res.end(PAGE)
  })
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', () => resolve()))
  base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`
  chrome = await launchBrowser()
})
afterAll(async () => {
  await chrome?.close()
  await new Promise<void>((r) => server.close(() => r()))
})

describe('the accessibility check on every page the browser tests visit', () => {
  it('passes a page whose field has a label', async () => {
    const page = await chrome.browser.newPage({ viewport: { width: 1280, height: 800 } })
    await page.goto(`${base}/app/ok`)
    await page.close()
    const recorder = a11yRecorder()!
    expect(recorder.pending.map((v) => new URL(v.url).pathname)).toEqual(['/app/ok'])
    await expect(auditRecorded(recorder)).resolves.toBeUndefined()
  })

  it('fails, naming rule, impact, element, page and both widths, for a field without a label reached by a client-side route change', async () => {
    const ctx = await chrome.browser.newContext({ viewport: { width: 1280, height: 800 } })
    const page = await ctx.newPage()
    await page.goto(`${base}/app/ok`)
    await page.getByRole('button', { name: 'Next step' }).click()
    await page.waitForURL(`${base}/app/bad`)
    await ctx.close()
    const recorder = a11yRecorder()!
    expect(recorder.pending.map((v) => new URL(v.url).pathname)).toEqual(['/app/ok', '/app/bad'])

    const failure = await auditRecorded(recorder).then(
      () => null,
      (e: Error) => e.message,
    )
    expect(failure).not.toBeNull()
    expect(failure).toContain('label (critical) on /app/bad at 1280 px')
    expect(failure).toContain('label (critical) on /app/bad at 375 px')
    expect(failure).toContain('#nameless')
    // /app/ok was checked in the first test and has no problem: it is neither checked again nor listed.
    expect(failure).not.toContain('/app/ok')
    // The recorded pages are used up, so the check after this test has nothing left to report.
    expect(recorder.pending).toEqual([])
  })
})

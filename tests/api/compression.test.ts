import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import path from 'node:path'
import { brotliCompressSync, gzipSync } from 'node:zlib'
import request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Client, Fixture, TestContext } from '../helpers/app'
import { seedFixture, signedInAs, startTestApp } from '../helpers/app'
import { createModuleAs, moduleSource } from '../helpers/modules'

/**
 * How the app sends bytes: the client build's pre-compressed .br/.gz files chosen by
 * Accept-Encoding (with Vary), JSON compressed per request, hashed assets cached for a year,
 * index.html and the single-page app's fallback revalidated on every load, and API replies still
 * `no-store`. The build here is a small one of our own, so the test does not depend on Vite; its
 * .br and .gz files each hold a marked copy of the script, so a reply shows which file was sent.
 * (supertest decodes br and gzip bodies itself; the checks read the decoded text.)
 */

const dist = mkdtempSync(path.join(tmpdir(), 'isentrope-dist-'))
const filler = (what: string) => Array.from({ length: 400 }, (_, i) => `${what} line ${i};`).join('\n')
const APP_JS = `console.log(${JSON.stringify(filler('script'))})\n`
const INDEX = `<!doctype html><html><head><title>Isentrope</title></head><body><div id="app"></div><!--${filler('page')}--></body></html>`
const PLAIN_CSS = `/* ${filler('style')} */ body { margin: 0 }\n`

let ctx: TestContext
let fx: Fixture
let inst: Client
let moduleId: number
const app = () => ctx.created.app

/** The body as text (after supertest has undone any Content-Encoding), whatever its type. */
const raw = (req: request.Test) =>
  req.buffer(true).parse((res, done) => {
    let text = ''
    res.setEncoding('utf8')
    res.on('data', (c: string) => (text += c))
    res.on('end', () => done(null, text))
  })
const text = (res: request.Response) => res.body as string

beforeAll(async () => {
  mkdirSync(path.join(dist, 'assets'))
  writeFileSync(path.join(dist, 'index.html'), INDEX)
  writeFileSync(path.join(dist, 'assets', 'app-Bq3xZ9kd.js'), APP_JS)
  writeFileSync(path.join(dist, 'assets', 'app-Bq3xZ9kd.js.br'), brotliCompressSync(`${APP_JS}// br file\n`))
  writeFileSync(path.join(dist, 'assets', 'app-Bq3xZ9kd.js.gz'), gzipSync(`${APP_JS}// gz file\n`))
  writeFileSync(path.join(dist, 'assets', 'plain-C4v8Tq1e.css'), PLAIN_CSS)
  writeFileSync(path.join(dist, 'favicon.svg'), '<svg xmlns="http://www.w3.org/2000/svg"/>')
  ctx = startTestApp({ CLIENT_DIST: dist })
  fx = await seedFixture(ctx)
  inst = await signedInAs(ctx, fx.instructor.email)
  moduleId = (await createModuleAs(inst, fx.courseId, moduleSource('Compression module', filler('text')))).id
})
afterAll(async () => {
  await ctx.close()
  rmSync(dist, { recursive: true, force: true })
})

describe('the client build', () => {
  it('sends the brotli file to a browser that accepts brotli, as it was written, with Vary', async () => {
    const res = await raw(request(app()).get('/assets/app-Bq3xZ9kd.js').set('Accept-Encoding', 'gzip, deflate, br'))
    expect(res.status).toBe(200)
    expect(res.headers['content-encoding']).toBe('br')
    expect(res.headers['content-type']).toMatch(/javascript/)
    expect(res.headers.vary).toMatch(/Accept-Encoding/i)
    expect(text(res)).toBe(`${APP_JS}// br file\n`)
  })

  it('sends the gzip file to a browser that accepts only gzip', async () => {
    const res = await raw(request(app()).get('/assets/app-Bq3xZ9kd.js').set('Accept-Encoding', 'gzip'))
    expect(res.headers['content-encoding']).toBe('gzip')
    expect(res.headers.vary).toMatch(/Accept-Encoding/i)
    expect(text(res)).toBe(`${APP_JS}// gz file\n`)
  })

  it('sends the plain file to a client that accepts no encoding', async () => {
    const res = await raw(request(app()).get('/assets/app-Bq3xZ9kd.js').set('Accept-Encoding', 'identity'))
    expect(res.headers['content-encoding']).toBeUndefined()
    expect(text(res)).toBe(APP_JS)
  })

  it('keeps hashed assets for a year, compressed or not', async () => {
    for (const [file, encoding] of [
      ['/assets/app-Bq3xZ9kd.js', 'br'],
      ['/assets/app-Bq3xZ9kd.js', 'identity'],
      ['/assets/plain-C4v8Tq1e.css', 'gzip'],
    ] as const) {
      const res = await raw(request(app()).get(file).set('Accept-Encoding', encoding))
      expect(res.status, file).toBe(200)
      expect(res.headers['cache-control'], `${file} ${encoding}`).toBe('public, max-age=31536000, immutable')
    }
  })

  it('sends hashed assets with nosniff but without the page policies (CSP, frame rules)', async () => {
    const res = await raw(request(app()).get('/assets/app-Bq3xZ9kd.js').set('Accept-Encoding', 'br'))
    expect(res.status).toBe(200)
    expect(res.headers['x-content-type-options']).toBe('nosniff')
    expect(res.headers['cross-origin-resource-policy']).toBe('same-origin')
    expect(res.headers['content-security-policy']).toBeUndefined()
    expect(res.headers['x-frame-options']).toBeUndefined()
    const page = await request(app()).get('/').set('Accept', 'text/html')
    expect(page.headers['content-security-policy']).toContain("default-src 'self'")
  })

  it('compresses an asset that has no pre-compressed file on the fly', async () => {
    const res = await raw(request(app()).get('/assets/plain-C4v8Tq1e.css').set('Accept-Encoding', 'gzip'))
    expect(res.headers['content-encoding']).toBe('gzip')
    expect(text(res)).toBe(PLAIN_CSS)
  })

  it('has the browser check index.html on every load, for the page itself and for client-side routes', async () => {
    for (const url of ['/', '/index.html', '/courses/1/modules/2/edit', '/sign-in']) {
      const res = await raw(request(app()).get(url).set('Accept-Encoding', 'br'))
      expect(res.status, url).toBe(200)
      expect(res.headers['content-type'], url).toMatch(/text\/html/)
      expect(res.headers['cache-control'], url).toBe('no-cache')
      expect(res.headers['content-encoding'], url).toBe('br')
      expect(text(res), url).toBe(INDEX)
    }
  })

  it('keeps other public files for an hour', async () => {
    const res = await request(app()).get('/favicon.svg')
    expect(res.status).toBe(200)
    expect(res.headers['cache-control']).toBe('public, max-age=3600')
  })
})

describe('API replies', () => {
  it('compresses JSON with brotli when offered and still forbids caching', async () => {
    const res = await raw(
      inst.agent.get(`/api/courses/${fx.courseId}/modules/${moduleId}/edit`).set('Accept-Encoding', 'gzip, br'),
    )
    expect(res.status).toBe(200)
    expect(res.headers['content-encoding']).toBe('br')
    expect(res.headers.vary).toMatch(/Accept-Encoding/i)
    expect(res.headers['cache-control']).toBe('no-store')
    const body = JSON.parse(text(res)) as { current: { source: string } }
    expect(body.current.source).toContain('text line 399;')
  })

  it('compresses JSON with gzip for a client without brotli', async () => {
    const res = await raw(
      inst.agent.get(`/api/courses/${fx.courseId}/modules/${moduleId}/edit`).set('Accept-Encoding', 'gzip'),
    )
    expect(res.headers['content-encoding']).toBe('gzip')
    expect(res.headers['cache-control']).toBe('no-store')
    expect(JSON.parse(text(res))).toHaveProperty('id', moduleId)
  })

  it('answers an unknown API path with JSON, not the single-page app, and no-store', async () => {
    const res = await request(app()).get('/api/no-such-thing')
    expect(res.status).toBe(404)
    expect(res.headers['content-type']).toMatch(/json/)
    expect(res.headers['cache-control']).toBe('no-store')
  })
})

import request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Fixture, TestContext } from '../helpers/app'
import { anonymous, seedFixture, signedInAs, startTestApp } from '../helpers/app'
import { TcpProxy } from '../helpers/tcp-proxy'

let ctx: TestContext
let fx: Fixture

beforeAll(async () => {
  ctx = startTestApp()
  fx = await seedFixture(ctx)
})
afterAll(async () => {
  await ctx.close()
})

describe('bad input and unknown routes', () => {
  it('answers malformed JSON with 400 and a clear message', async () => {
    const c = await anonymous(ctx)
    const res = await c.agent
      .post('/api/auth/sign-in')
      .set('x-csrf-token', c.csrf)
      .set('Content-Type', 'application/json')
      .send('{"email": "a@b.example", "password": ')
    expect(res.status).toBe(400)
    expect(res.body).toEqual({ error: { code: 'malformed_json', message: 'The request body is not valid JSON.' } })
  })

  it('answers an unknown API route with a JSON 404', async () => {
    const res = await request(ctx.created.app).get('/api/no-such-thing?x=1')
    expect(res.status).toBe(404)
    expect(res.headers['content-type']).toMatch(/application\/json/)
    expect(res.body.error).toEqual({ code: 'not_found', message: 'No API route GET /api/no-such-thing.' })
  })

  it('refuses a body over the size limit with 413', async () => {
    const c = await anonymous(ctx)
    const res = await c.agent
      .post('/api/auth/sign-in')
      .set('x-csrf-token', c.csrf)
      .send({ email: 'a@b.example', password: 'x'.repeat(2 * 1024 * 1024) })
    expect(res.status).toBe(413)
    expect(res.body.error.code).toBe('payload_too_large')
  })

  it('names the field when a course has an unknown time zone, and stores nothing', async () => {
    const c = await signedInAs(ctx, fx.admin.email)
    const res = await c.agent
      .post('/api/courses')
      .set('x-csrf-token', c.csrf)
      .send({ code: 'TZ1', title: 'Time zone test', term: 'T1', institution: 'Nowhere', timeZone: 'Mars/Olympus' })
    expect(res.status).toBe(400)
    expect(res.body.error.details).toEqual([{ path: 'timeZone', message: expect.stringContaining('IANA') }])
    const mine = await c.agent.get('/api/courses').expect(200)
    expect(mine.body.find((x: { code: string }) => x.code === 'TZ1')).toBeUndefined()
  })

  it('sets security headers, including a same-origin Content-Security-Policy', async () => {
    const res = await request(ctx.created.app).get('/api/health')
    expect(res.headers['content-security-policy']).toContain("default-src 'self'")
    expect(res.headers['content-security-policy']).toContain("script-src 'self'")
    expect(res.headers['x-content-type-options']).toBe('nosniff')
    expect(res.headers['x-powered-by']).toBeUndefined()
  })
})

describe('when the database is unreachable', () => {
  let proxy: TcpProxy
  let down: TestContext

  beforeAll(async () => {
    proxy = new TcpProxy(ctx.config.DB_HOST ?? '127.0.0.1', ctx.config.DB_PORT)
    await proxy.up()
    down = startTestApp({ DB_HOST: '127.0.0.1', DB_PORT: String(proxy.port) })
  })
  afterAll(async () => {
    await proxy.up().catch(() => undefined)
    await down.close()
    await proxy.down()
  })

  it('answers 503 with a clear message, keeps running, and recovers when the database returns', async () => {
    // Up: a signed-in request works through the relay.
    const c = await signedInAs(down, fx.student.email)
    await c.agent.get('/api/courses').expect(200)

    await proxy.down()
    const health = await request(down.created.app).get('/api/health')
    expect(health.status).toBe(503)
    expect(health.body.error.code).toBe('database_unavailable')
    expect(health.body.error.message).toMatch(/database is not reachable/i)
    expect(JSON.stringify(health.body)).not.toMatch(/at .*\.ts:\d+/) // no stack trace
    const courses = await c.agent.get('/api/courses')
    expect(courses.status).toBe(503)

    await proxy.up()
    // The pools reconnect on their own; allow them a few tries.
    let status = 0
    for (let i = 0; i < 20 && status !== 200; i++) {
      status = (await request(down.created.app).get('/api/health')).status
      if (status !== 200) await new Promise((r) => setTimeout(r, 250))
    }
    expect(status).toBe(200)
    const after = await c.agent.get('/api/courses')
    expect(after.status).toBe(200)
  })
})

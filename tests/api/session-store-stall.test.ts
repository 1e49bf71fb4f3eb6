import { once } from 'node:events'
import http from 'node:http'
import type { AddressInfo } from 'node:net'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Fixture, TestContext } from '../helpers/app'
import { PASSWORD, seedFixture, signedInAs, startTestApp } from '../helpers/app'
import { createModuleAs, moduleSource } from '../helpers/modules'
import type { CreatedModule } from '../helpers/modules'

/**
 * A rolling session writes its new expiry to the store after each answer. When the store is slow
 * (here: its row locked by another connection for longer than the app's statement timeout), the
 * answer must still arrive whole and the connection stay open; only the extension is missed.
 * (Before, the store's error went on to the error handler after the answer, which cut the
 * connection: a compressed answer still in the compressor was lost with it, under load.)
 */

let ctx: TestContext
let fx: Fixture
let mod: CreatedModule
let server: http.Server
let base: string

beforeAll(async () => {
  // Statements give up after 0.5 s, so the locked row makes the store's update fail quickly.
  ctx = startTestApp({ DB_QUERY_TIMEOUT_MS: '500' })
  fx = await seedFixture(ctx)
  const instructor = await signedInAs(ctx, fx.instructor.email)
  // A long sheet, so its editor answer is well over the compression threshold.
  const body = Array.from({ length: 200 }, (_, i) => `Paragraph ${i}: the throat area $A^*$ sets the mass flow.`)
  mod = await createModuleAs(instructor, fx.courseId, moduleSource('A long sheet', body.join('\n\n')))
  server = ctx.created.app.listen(0, '127.0.0.1')
  await once(server, 'listening')
  base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`
})
afterAll(async () => {
  server.closeAllConnections()
  await new Promise((resolve) => server.close(resolve))
  await ctx.close()
})

interface Reply {
  status: number
  body: string
  encoding: string | undefined
  reused: boolean
  cookies: string[]
}

/** One request over `agent`; whether it went out on a socket an earlier request had used. */
function send(agent: http.Agent, path: string, headers: Record<string, string>, body?: string): Promise<Reply> {
  return new Promise((resolve, reject) => {
    const req = http.request(`${base}${path}`, { agent, method: body ? 'POST' : 'GET', headers })
    req.on('response', (res) => {
      const chunks: Buffer[] = []
      res.on('data', (c: Buffer) => chunks.push(c))
      res.on('error', reject)
      res.on('end', () =>
        resolve({
          status: res.statusCode ?? 0,
          body: Buffer.concat(chunks).toString('latin1'),
          encoding: res.headers['content-encoding'],
          reused: req.reusedSocket,
          cookies: res.headers['set-cookie'] ?? [],
        }),
      )
    })
    req.on('error', reject)
    req.end(body)
  })
}

/** The session row behind a `isentrope.sid=s%3A<id>.<signature>` cookie. */
async function sessionRow(cookie: string): Promise<{ session_id: string; expires: number }> {
  const sid = /isentrope\.sid=s%3A([^.;]+)\./.exec(cookie)?.[1]
  expect(sid).toBeTruthy()
  const [rows] = (await ctx.handle.pool.query('SELECT session_id, expires FROM sessions WHERE session_id = ?', [
    sid,
  ])) as unknown as [{ session_id: string; expires: number }[]]
  expect(rows).toHaveLength(1)
  return rows[0]!
}

describe('a session store that does not answer in time', () => {
  it('still sends the answer whole and keeps the connection open, and a later request extends the expiry', async () => {
    const agent = new http.Agent({ keepAlive: true, maxSockets: 1 })
    try {
      const jar = new Map<string, string>()
      const keep = (r: Reply) => r.cookies.forEach((c) => jar.set(c.split('=')[0]!, c.split(';')[0]!))
      const cookie = () => [...jar.values()].join('; ')
      const first = await send(agent, '/api/auth/session', {})
      keep(first)
      const { csrfToken } = JSON.parse(first.body) as { csrfToken: string }
      const signIn = await send(
        agent,
        '/api/auth/sign-in',
        { cookie: cookie(), 'x-csrf-token': csrfToken, 'content-type': 'application/json' },
        JSON.stringify({ email: fx.instructor.email, password: PASSWORD }),
      )
      expect(signIn.status).toBe(200)
      keep(signIn)

      const before = await sessionRow(cookie())
      const path = `/api/courses/${fx.courseId}/modules/${mod.id}/edit`
      const conn = await ctx.handle.pool.getConnection()
      let stalled: Reply
      try {
        await conn.beginTransaction()
        await conn.query('SELECT expires FROM sessions WHERE session_id = ? FOR UPDATE', [before.session_id])
        stalled = await send(agent, path, { cookie: cookie(), 'accept-encoding': 'identity' })
      } finally {
        await conn.rollback()
        conn.release()
      }
      expect(stalled.status).toBe(200)
      expect(stalled.body).toContain('Paragraph 199')
      // The next request goes out on the same connection: nothing cut it.
      await new Promise((r) => setTimeout(r, 1100))
      const next = await send(agent, path, { cookie: cookie(), 'accept-encoding': 'gzip' })
      expect(next.status).toBe(200)
      expect(next.encoding).toBe('gzip')
      expect(next.reused).toBe(true)
      const after = await sessionRow(cookie())
      expect(Number(after.expires)).toBeGreaterThan(Number(before.expires))
    } finally {
      agent.destroy()
    }
  })
})

import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { and, eq } from 'drizzle-orm'
import { signInThrottles } from '../../server/db/schema'
import { BAD_CREDENTIALS } from '../../server/services/auth-service'
import type { Fixture, TestContext } from '../helpers/app'
import { PASSWORD, anonymous, seedFixture, signedInAs, startTestApp } from '../helpers/app'

let ctx: TestContext
let fx: Fixture

beforeAll(async () => {
  ctx = startTestApp({ SIGNIN_FREE_FAILURES: '3', SIGNIN_FIRST_DELAY_SECONDS: '60', SIGNIN_WINDOW_MINUTES: '15' })
  fx = await seedFixture(ctx)
})
afterAll(async () => {
  await ctx.close()
})

describe('sign-in', () => {
  it('signs in with the right password, sets an httpOnly SameSite session cookie and returns the person', async () => {
    const c = await anonymous(ctx)
    const res = await c.agent
      .post('/api/auth/sign-in')
      .set('x-csrf-token', c.csrf)
      .send({ email: fx.student.email, password: PASSWORD })
    expect(res.status).toBe(200)
    expect(res.body.user).toMatchObject({ id: fx.student.id, email: fx.student.email, isSiteAdmin: false })
    expect(res.body.user.passwordHash).toBeUndefined()
    const cookie = (res.headers['set-cookie'] as unknown as string[]).find((c) => c.startsWith('isentrope.sid='))
    expect(cookie).toBeDefined()
    expect(cookie).toMatch(/HttpOnly/i)
    expect(cookie).toMatch(/SameSite=Lax/i)
  })

  it('accepts the e-mail in any letter case', async () => {
    await expect(signedInAs(ctx, fx.ta.email.toUpperCase())).resolves.toBeDefined()
  })

  it('keeps the session across requests and gives a new session id at sign-in', async () => {
    const c = await anonymous(ctx)
    // An anonymous session cookie planted before sign-in must not survive it (fixation).
    const before = await c.agent.get('/api/auth/session')
    const res = await c.agent
      .post('/api/auth/sign-in')
      .set('x-csrf-token', c.csrf)
      .send({ email: fx.instructor.email, password: PASSWORD })
    const sid = (res.headers['set-cookie'] as unknown as string[]).find((x) => x.startsWith('isentrope.sid='))
    const beforeSid = ((before.headers['set-cookie'] as unknown as string[] | undefined) ?? []).find((x) =>
      x.startsWith('isentrope.sid='),
    )
    expect(sid).toBeDefined()
    expect(sid).not.toBe(beforeSid)
    const again = await c.agent.get('/api/auth/session').expect(200)
    expect(again.body.user.email).toBe(fx.instructor.email)
    const courses = await c.agent.get('/api/courses').expect(200)
    expect(courses.body.map((x: { id: number }) => x.id)).toContain(fx.courseId)
  })

  it('answers a wrong password and an unknown e-mail with the same generic message', async () => {
    const c = await anonymous(ctx)
    const wrong = await c.agent
      .post('/api/auth/sign-in')
      .set('x-csrf-token', c.csrf)
      .send({ email: fx.student2.email, password: 'nope' })
    const unknown = await c.agent
      .post('/api/auth/sign-in')
      .set('x-csrf-token', c.csrf)
      .send({ email: 'nobody@test.example', password: 'nope' })
    expect(wrong.status).toBe(401)
    expect(unknown.status).toBe(401)
    expect(wrong.body).toEqual({ error: { code: 'bad_credentials', message: BAD_CREDENTIALS } })
    expect(unknown.body).toEqual(wrong.body)
  })

  it('after the free failures, an early attempt from the same address waits, even with the right password, and is not counted', async () => {
    const c = await anonymous(ctx)
    const email = fx.outsider.email
    for (let i = 0; i < 3; i++) {
      await c.agent
        .post('/api/auth/sign-in')
        .set('x-csrf-token', c.csrf)
        .send({ email, password: `wrong-${i}` })
        .expect(401)
    }
    const pair = () =>
      ctx.handle.db
        .select({ failures: signInThrottles.failures })
        .from(signInThrottles)
        .where(and(eq(signInThrottles.scope, 'account_address'), eq(signInThrottles.email, email)))
    expect(await pair()).toEqual([{ failures: 3 }])
    const early = await c.agent
      .post('/api/auth/sign-in')
      .set('x-csrf-token', c.csrf)
      .send({ email, password: PASSWORD })
    expect(early.status).toBe(429)
    expect(early.body.error.code).toBe('too_many_attempts')
    expect(early.body.error.message).toMatch(/Try again in \d+ seconds/)
    expect(Number(early.headers['retry-after'])).toBe(early.body.error.details.retryAfterSeconds)
    expect(early.body.error.details.retryAfterSeconds).toBeGreaterThan(0)
    expect(await pair()).toEqual([{ failures: 3 }])
  })

  it('names the field when the e-mail is malformed', async () => {
    const c = await anonymous(ctx)
    const res = await c.agent
      .post('/api/auth/sign-in')
      .set('x-csrf-token', c.csrf)
      .send({ email: 'not-an-address', password: 'x' })
    expect(res.status).toBe(400)
    expect(res.body.error.code).toBe('validation_failed')
    expect(res.body.error.details).toContainEqual(expect.objectContaining({ path: 'email' }))
  })
})

describe('sign-out', () => {
  it('destroys the session so the old cookie no longer signs anyone in', async () => {
    const c = await signedInAs(ctx, fx.student.email)
    await c.agent.get('/api/courses').expect(200)
    const out = await c.agent.post('/api/auth/sign-out').set('x-csrf-token', c.csrf)
    expect(out.status).toBe(200)
    expect(out.body.user).toBeNull()
    await c.agent.get('/api/courses').expect(401)
    const s = await c.agent.get('/api/auth/session').expect(200)
    expect(s.body.user).toBeNull()
  })
})

describe('CSRF', () => {
  it('refuses a state-changing request without the token', async () => {
    const c = await anonymous(ctx)
    const res = await c.agent.post('/api/auth/sign-in').send({ email: fx.student.email, password: PASSWORD })
    expect(res.status).toBe(403)
    expect(res.body.error.code).toBe('csrf_failed')
  })

  it('refuses a token issued before sign-in once the person is signed in', async () => {
    const c = await anonymous(ctx)
    const old = c.csrf
    await c.agent
      .post('/api/auth/sign-in')
      .set('x-csrf-token', old)
      .send({ email: fx.admin.email, password: PASSWORD })
      .expect(200)
    const res = await c.agent
      .post('/api/courses')
      .set('x-csrf-token', old)
      .send({ code: 'X1', title: 'Stale token course', term: 'T', institution: 'Nowhere U', timeZone: 'UTC' })
    expect(res.status).toBe(403)
  })
})

import { randomInt } from 'node:crypto'
import { and, eq, or, sql } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { signInThrottles } from '../../server/db/schema'
import type { SignInScope } from '../../server/db/schema'
import type { Client, Fixture, TestContext } from '../helpers/app'
import { PASSWORD, anonymous, seedFixture, startTestApp, uniq } from '../helpers/app'

// Behind one trusted proxy, so X-Forwarded-For gives each simulated client its own address.
// The first wait is a minute, so no test depends on how fast the machine is: a test that needs
// time to pass moves the counter's last failure back instead of sleeping.
const FREE = 5
const ACCOUNT_FREE = 16
const ADDRESS_FREE = 10
const FIRST_DELAY_S = 60

let ctx: TestContext
let fx: Fixture
// A /16 of our own per run, so addresses never meet another run's counters.
const net = `10.${randomInt(1, 255)}`
let nextHost = 0
const freshAddress = () => {
  nextHost++
  return `${net}.${Math.floor(nextHost / 250)}.${(nextHost % 250) + 1}`
}

beforeAll(async () => {
  ctx = startTestApp({
    TRUST_PROXY: '1',
    SIGNIN_FREE_FAILURES: String(FREE),
    SIGNIN_ACCOUNT_FREE_FAILURES: String(ACCOUNT_FREE),
    SIGNIN_ADDRESS_FREE_FAILURES: String(ADDRESS_FREE),
    SIGNIN_FIRST_DELAY_SECONDS: String(FIRST_DELAY_S),
    SIGNIN_MAX_DELAY_SECONDS: '1800',
    SIGNIN_WINDOW_MINUTES: '60',
  })
  fx = await seedFixture(ctx)
})
afterAll(async () => {
  await ctx.close()
})

function attempt(c: Client, from: string, email: string, password: string) {
  return c.agent
    .post('/api/auth/sign-in')
    .set('x-csrf-token', c.csrf)
    .set('X-Forwarded-For', from)
    .send({ email, password })
}

/** `times` wrong passwords one after another; returns their statuses. */
async function failSequentially(from: string, email: string, times: number): Promise<number[]> {
  const c = await anonymous(ctx)
  const statuses: number[] = []
  for (let i = 0; i < times; i++) statuses.push((await attempt(c, from, email, `wrong-${i}`)).status)
  return statuses
}

const keyOf = (scope: SignInScope, email: string, address: string) => ({
  scope,
  email: scope === 'address' ? '' : email,
  address: scope === 'account' ? '' : address,
})

/** The stored failure count of one counter, or null when it has no row. */
async function failures(scope: SignInScope, email: string, address: string): Promise<number | null> {
  const k = keyOf(scope, email, address)
  const rows = await ctx.handle.db
    .select({ failures: signInThrottles.failures })
    .from(signInThrottles)
    .where(
      and(
        eq(signInThrottles.scope, k.scope),
        eq(signInThrottles.email, k.email),
        eq(signInThrottles.address, k.address),
      ),
    )
  return rows[0]?.failures ?? null
}

/** Pretends `seconds` have passed since the account+address counter's last failure. */
async function letTimePass(email: string, address: string, seconds: number): Promise<void> {
  await ctx.handle.db
    .update(signInThrottles)
    .set({ lastFailedAt: sql`${signInThrottles.lastFailedAt} - INTERVAL ${seconds} SECOND` })
    .where(
      and(
        eq(signInThrottles.scope, 'account_address'),
        eq(signInThrottles.email, email),
        eq(signInThrottles.address, address),
      ),
    )
}

/** Pretends `seconds` have passed since every counter of this e-mail or this address last failed. */
async function ageAllCounters(email: string, address: string, seconds: number): Promise<void> {
  await ctx.handle.db
    .update(signInThrottles)
    .set({ lastFailedAt: sql`${signInThrottles.lastFailedAt} - INTERVAL ${seconds} SECOND` })
    .where(or(eq(signInThrottles.email, email), eq(signInThrottles.address, address)))
}

const count = (statuses: number[], status: number) => statuses.filter((s) => s === status).length

describe('sign-in slow-down', () => {
  it('lets the right password in from a fresh address while the account is hammered from others', async () => {
    const email = fx.instructor.email
    // An address that failed once, before the attack.
    const earlier = freshAddress()
    expect(await failSequentially(earlier, email, 1)).toEqual([401])

    // One address hammers: its free failures are checked, the rest refused unchecked.
    const hammer = freshAddress()
    expect(await failSequentially(hammer, email, FREE)).toEqual(Array(FREE).fill(401))
    const c = await anonymous(ctx)
    const burst = await Promise.all(Array.from({ length: 10 }, (_, i) => attempt(c, hammer, email, `guess-${i}`)))
    expect(burst.map((r) => r.status)).toEqual(Array(10).fill(429))
    // Two more addresses join in, taking the account past its own threshold.
    for (let i = 0; i < 2; i++)
      expect(await failSequentially(freshAddress(), email, FREE)).toEqual(Array(FREE).fill(401))
    const accountFailures = 1 + 3 * FREE
    expect(accountFailures).toBeGreaterThanOrEqual(ACCOUNT_FREE)
    expect(await failures('account', email, '')).toBe(accountFailures)

    // The hammering address is refused even with the right password.
    const fromHammer = await attempt(await anonymous(ctx), hammer, email, PASSWORD)
    expect(fromHammer.status).toBe(429)
    // The address that failed once before now waits after that one failure (the account is under attack)…
    const fromEarlier = await attempt(await anonymous(ctx), earlier, email, PASSWORD)
    expect(fromEarlier.status).toBe(429)
    expect(Number(fromEarlier.headers['retry-after'])).toBeGreaterThan(0)

    // …but an address that has not failed on this account signs in at once.
    const fresh = freshAddress()
    const ok = await attempt(await anonymous(ctx), fresh, email, PASSWORD)
    expect(ok.status).toBe(200)
    expect(ok.body.user).toMatchObject({ id: fx.instructor.id, email })
    // The success is not a failure anywhere, and took nothing away from the attackers' counts.
    expect(await failures('account', email, '')).toBe(accountFailures)
    expect(await failures('account_address', email, fresh)).toBeNull()
    expect(await failures('address', email, fresh)).toBe(0)
    expect(await failures('account_address', email, hammer)).toBe(FREE)
  })

  it('checks only the free failures of 40 wrong passwords sent at once, refuses the rest, and counts exactly those', async () => {
    const email = fx.student.email
    const from = freshAddress()
    const c = await anonymous(ctx)
    const responses = await Promise.all(Array.from({ length: 40 }, (_, i) => attempt(c, from, email, `parallel-${i}`)))
    const statuses = responses.map((r) => r.status)
    expect(count(statuses, 401)).toBe(FREE)
    expect(count(statuses, 429)).toBe(40 - FREE)
    for (const r of responses.filter((x) => x.status === 429)) {
      expect(r.body.error.code).toBe('too_many_attempts')
      expect(Number(r.headers['retry-after'])).toBeGreaterThan(0)
    }
    expect(await failures('account_address', email, from)).toBe(FREE)
    expect(await failures('address', email, from)).toBe(FREE)
    expect(await failures('account', email, '')).toBe(FREE)
  })

  it('answers an early retry with 429 and Retry-After, and doubles the wait with each further failure', async () => {
    const email = fx.ta.email
    const from = freshAddress()
    const c = await anonymous(ctx)
    expect(await failSequentially(from, email, FREE)).toEqual(Array(FREE).fill(401))

    const waits: number[] = []
    for (let round = 0; round < 3; round++) {
      // Too early: refused without looking at the password, even the right one, and not counted.
      const early = await attempt(c, from, email, PASSWORD)
      expect(early.status).toBe(429)
      const wait = Number(early.headers['retry-after'])
      expect(early.body.error.details).toEqual({ retryAfterSeconds: wait })
      expect(early.body.error.message).toContain('Try again in')
      expect(await failures('account_address', email, from)).toBe(FREE + round)
      waits.push(wait)
      // Once the wait is over, the next wrong password is checked and counted again.
      const delay = FIRST_DELAY_S * 2 ** round
      await letTimePass(email, from, delay)
      expect((await attempt(c, from, email, `late-${round}`)).status).toBe(401)
    }
    // Each wait is at most its delay and longer than the one before: 60 s, 120 s, 240 s.
    expect(waits[0]).toBeLessThanOrEqual(FIRST_DELAY_S)
    expect(waits[1]).toBeGreaterThan(FIRST_DELAY_S)
    expect(waits[1]).toBeLessThanOrEqual(2 * FIRST_DELAY_S)
    expect(waits[2]).toBeGreaterThan(2 * FIRST_DELAY_S)
    expect(waits[2]).toBeLessThanOrEqual(4 * FIRST_DELAY_S)
    expect(await failures('account_address', email, from)).toBe(FREE + 3)
  })

  it('a success resets the counter for its own address only', async () => {
    const email = fx.student2.email
    const mine = freshAddress()
    const other = freshAddress()
    expect(await failSequentially(mine, email, 3)).toEqual([401, 401, 401])
    expect(await failSequentially(other, email, 3)).toEqual([401, 401, 401])

    const ok = await attempt(await anonymous(ctx), mine, email, PASSWORD)
    expect(ok.status).toBe(200)
    expect(await failures('account_address', email, mine)).toBeNull()
    expect(await failures('account_address', email, other)).toBe(3)
    // The address keeps its three failures: signing in to an account does not wipe them out.
    expect(await failures('address', email, mine)).toBe(3)
    expect(await failures('account', email, '')).toBe(6)

    // The address has its whole allowance on this account again.
    expect(await failSequentially(mine, email, FREE + 1)).toEqual([...Array(FREE).fill(401), 429])
    expect(await failures('account_address', email, mine)).toBe(FREE)
  })

  it('slows down one address spraying many accounts, for every account, while other addresses are untouched', async () => {
    const sprayer = freshAddress()
    const c = await anonymous(ctx)
    const statuses: number[] = []
    for (let i = 0; i < ADDRESS_FREE; i++)
      statuses.push((await attempt(c, sprayer, `spray-${uniq()}@test.example`, 'Winter2026!')).status)
    expect(statuses).toEqual(Array(ADDRESS_FREE).fill(401))
    expect(await failures('address', '', sprayer)).toBe(ADDRESS_FREE)

    // A new e-mail from the same address now waits, and so does the right password for a real account.
    expect((await attempt(c, sprayer, `spray-${uniq()}@test.example`, 'Winter2026!')).status).toBe(429)
    expect((await attempt(c, sprayer, fx.outsider.email, PASSWORD)).status).toBe(429)
    expect(await failures('address', '', sprayer)).toBe(ADDRESS_FREE)
    const ok = await attempt(await anonymous(ctx), freshAddress(), fx.outsider.email, PASSWORD)
    expect(ok.status).toBe(200)
  })

  it('forgets failures after the window without one, and prunes counters past it', async () => {
    const email = `forgetful-${uniq()}@test.example`
    const from = freshAddress()
    expect(await failSequentially(from, email, FREE + 1)).toEqual([...Array(FREE).fill(401), 429])
    // An hour and a minute later (the window is an hour), the count starts over.
    await ageAllCounters(email, from, 61 * 60)
    expect(await failSequentially(from, email, 1)).toEqual([401])
    expect(await failures('account_address', email, from)).toBe(1)
    expect(await failures('address', email, from)).toBe(1)
    expect(await failures('account', email, '')).toBe(1)

    // Once past the window again, the next sign-in anywhere removes the rows.
    await ageAllCounters(email, from, 61 * 60)
    const ok = await attempt(await anonymous(ctx), freshAddress(), fx.admin.email, PASSWORD)
    expect(ok.status).toBe(200)
    const left = await ctx.handle.db
      .select()
      .from(signInThrottles)
      .where(or(eq(signInThrottles.email, email), eq(signInThrottles.address, from)))
    expect(left).toEqual([])
  })

  it('answers an unknown e-mail exactly as a known one with a wrong password, refusals included', async () => {
    const from = freshAddress()
    const known = await failSequentially(from, fx.admin.email, FREE + 1)
    const unknown = await failSequentially(from, `nobody-${uniq()}@test.example`, FREE + 1)
    expect(unknown).toEqual(known)
    expect(known).toEqual([...Array(FREE).fill(401), 429])
  })
})

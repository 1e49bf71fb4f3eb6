import { describe, expect, it } from 'vitest'
import { loadConfig } from '../../server/config'
import type { SignInPolicy } from '../../server/services/sign-in-throttle'
import { clientAddress, delayAfter, signInPolicy, waitBeforeAttempt } from '../../server/services/sign-in-throttle'

const BASE = { SESSION_SECRET: 'x'.repeat(40), DATABASE_URL: 'mysql://u:p@127.0.0.1:3306/db' }

const policy: SignInPolicy = {
  freeFailures: 5,
  addressFreeFailures: 50,
  accountFreeFailures: 20,
  firstDelayMs: 1000,
  maxDelayMs: 300_000,
  windowMs: 3_600_000,
}

const idle = { failures: 0, sinceLastMs: 0 }

describe('sign-in slow-down schedule', () => {
  it('waits nothing within the free failures, then 1 s, 2 s, 4 s … up to the cap', () => {
    const waits = [0, 4, 5, 6, 7, 12, 13, 14, 100].map((n) => delayAfter(n, 5, policy))
    // 2^(n−5) s from the fifth failure; 2^9 s = 512 s is past the 300 s cap.
    expect(waits).toEqual([0, 0, 1000, 2000, 4000, 128_000, 256_000, 300_000, 300_000])
  })

  it('counts the time already waited since the last failure', () => {
    const wait = waitBeforeAttempt(
      { accountAddress: { failures: 6, sinceLastMs: 1500 }, address: idle, account: idle },
      policy,
    )
    expect(wait).toBe(500)
  })

  it('forgets failures once the window has passed without one', () => {
    const stale = { failures: 40, sinceLastMs: policy.windowMs }
    expect(waitBeforeAttempt({ accountAddress: stale, address: stale, account: stale }, policy)).toBe(0)
  })

  it('never holds back an address that has not failed on an account under attack', () => {
    const underAttack = { failures: 1000, sinceLastMs: 0 }
    expect(waitBeforeAttempt({ accountAddress: idle, address: idle, account: underAttack }, policy)).toBe(0)
  })

  it('gives an address that already failed on an account under attack only one free failure', () => {
    const once = { failures: 1, sinceLastMs: 0 }
    expect(
      waitBeforeAttempt({ accountAddress: once, address: once, account: { failures: 19, sinceLastMs: 0 } }, policy),
    ).toBe(0)
    expect(
      waitBeforeAttempt({ accountAddress: once, address: once, account: { failures: 20, sinceLastMs: 0 } }, policy),
    ).toBe(1000)
  })

  it('slows an address down for every account once it has failed too often overall', () => {
    const spraying = { failures: 51, sinceLastMs: 0 }
    expect(waitBeforeAttempt({ accountAddress: idle, address: spraying, account: idle }, policy)).toBe(2000)
  })
})

describe('client address of a counter', () => {
  it('keeps IPv4 as it is and reads IPv4-mapped IPv6 as IPv4', () => {
    expect(clientAddress('192.0.2.7')).toBe('192.0.2.7')
    expect(clientAddress('::ffff:192.0.2.7')).toBe('192.0.2.7')
    expect(clientAddress('::ffff:c000:0207')).toBe('192.0.2.7')
  })

  it('cuts IPv6 to its /64, however it is written', () => {
    expect(clientAddress('2001:db8:1:2:aaaa:bbbb:cccc:dddd')).toBe('2001:db8:1:2::/64')
    expect(clientAddress('2001:0db8:0001:0002::1')).toBe('2001:db8:1:2::/64')
    expect(clientAddress('2001:db8::1')).toBe('2001:db8:0:0::/64')
    expect(clientAddress('fe80::1%eth0')).toBe('fe80:0:0:0::/64')
    expect(clientAddress('::1')).toBe('0:0:0:0::/64')
  })

  it('has one bucket for a request without an address', () => {
    expect(clientAddress(undefined)).toBe('unknown')
  })
})

describe('sign-in configuration', () => {
  it('has defaults that slow down after five failures from one address, doubling from 1 s to 5 min', () => {
    expect(signInPolicy(loadConfig(BASE))).toEqual({
      freeFailures: 5,
      addressFreeFailures: 50,
      accountFreeFailures: 20,
      firstDelayMs: 1000,
      maxDelayMs: 300_000,
      windowMs: 3_600_000,
    })
  })

  it('refuses the replaced SIGNIN_MAX_FAILURES, naming its replacement', () => {
    expect(() => loadConfig({ ...BASE, SIGNIN_MAX_FAILURES: '5' })).toThrow(/SIGNIN_MAX_FAILURES.*SIGNIN_FREE_FAILURES/)
  })

  it('refuses a cap below the first delay or beyond the window, naming the variable', () => {
    expect(() => loadConfig({ ...BASE, SIGNIN_FIRST_DELAY_SECONDS: '10', SIGNIN_MAX_DELAY_SECONDS: '5' })).toThrow(
      /SIGNIN_MAX_DELAY_SECONDS/,
    )
    expect(() => loadConfig({ ...BASE, SIGNIN_MAX_DELAY_SECONDS: '3600', SIGNIN_WINDOW_MINUTES: '60' })).toThrow(
      /SIGNIN_MAX_DELAY_SECONDS/,
    )
    expect(() => loadConfig({ ...BASE, SIGNIN_FREE_FAILURES: 'five' })).toThrow(/SIGNIN_FREE_FAILURES/)
  })
})

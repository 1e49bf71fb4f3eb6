import { isIPv4, isIPv6 } from 'node:net'
import type { Config } from '../config'
import type { Database } from '../db/client'
import { AppError } from '../errors'
import type { CounterKey, LockedCounter } from '../repositories/sign-in-throttles'
import {
  deleteCounter,
  isLockConflict,
  lockCounters,
  pruneCounters,
  setCounter,
  takeBackAttempt,
} from '../repositories/sign-in-throttles'

/**
 * How failed sign-ins slow further attempts down (README, "Sign-in policy"). Nothing is ever
 * locked: past a free allowance each failure doubles the wait before the next attempt from the
 * same client address, and an address that has not been failing is never made to wait.
 */
export interface SignInPolicy {
  /** Failures on one account from one address before that address waits for that account. */
  freeFailures: number
  /** Failures from one address over all accounts before that address waits for every account. */
  addressFreeFailures: number
  /** Failures on one account over all addresses after which addresses that already failed on it get one free failure. */
  accountFreeFailures: number
  firstDelayMs: number
  maxDelayMs: number
  /** A counter starts over after this long without a failure. */
  windowMs: number
}

export function signInPolicy(config: Config): SignInPolicy {
  return {
    freeFailures: config.SIGNIN_FREE_FAILURES,
    addressFreeFailures: config.SIGNIN_ADDRESS_FREE_FAILURES,
    accountFreeFailures: config.SIGNIN_ACCOUNT_FREE_FAILURES,
    firstDelayMs: config.SIGNIN_FIRST_DELAY_SECONDS * 1000,
    maxDelayMs: config.SIGNIN_MAX_DELAY_SECONDS * 1000,
    windowMs: config.SIGNIN_WINDOW_MINUTES * 60_000,
  }
}

/**
 * The wait before the next attempt after `failures` counted failures, `free` of them without
 * any wait: first delay, then doubling, up to the maximum.
 * @example delayAfter(5, 5, { firstDelayMs: 1000, maxDelayMs: 300_000 }) === 1000; delayAfter(7, 5, …) === 4000
 */
export function delayAfter(
  failures: number,
  free: number,
  policy: Pick<SignInPolicy, 'firstDelayMs' | 'maxDelayMs'>,
): number {
  if (failures < free) return 0
  // Capping the exponent keeps 2^n finite; 2^30 times any sensible first delay is past the cap.
  return Math.min(policy.maxDelayMs, policy.firstDelayMs * 2 ** Math.min(failures - free, 30))
}

export interface CounterState {
  failures: number
  sinceLastMs: number
}

/**
 * Milliseconds this address must still wait before its next attempt on this account (0: go).
 * The account-wide count never holds back an address that has not failed on the account: it
 * only shrinks the free allowance of addresses that already have.
 */
export function waitBeforeAttempt(
  c: { accountAddress: CounterState; address: CounterState; account: CounterState },
  policy: SignInPolicy,
): number {
  const live = (s: CounterState) => (s.sinceLastMs >= policy.windowMs ? 0 : s.failures)
  const pair = live(c.accountAddress)
  const underAttack = live(c.account) >= policy.accountFreeFailures
  const pairFree = underAttack && pair >= 1 ? 1 : policy.freeFailures
  const pairWait = delayAfter(pair, pairFree, policy) - c.accountAddress.sinceLastMs
  const addressWait = delayAfter(live(c.address), policy.addressFreeFailures, policy) - c.address.sinceLastMs
  return Math.max(0, pairWait, addressWait)
}

/**
 * The client address a counter is kept for. IPv4-mapped IPv6 counts as the IPv4 address; other
 * IPv6 addresses are cut to their /64, the block one subscriber usually gets, so stepping
 * through one's own block does not buy fresh allowances.
 */
export function clientAddress(ip: string | undefined): string {
  if (!ip) return 'unknown'
  if (isIPv4(ip)) return ip
  if (!isIPv6(ip)) return ip.slice(0, 64)
  const groups = ipv6Groups(ip.split('%')[0] ?? ip)
  if (!groups) return ip.slice(0, 64)
  if (groups.slice(0, 5).every((g) => g === 0) && groups[5] === 0xffff) {
    const [hi = 0, lo = 0] = groups.slice(6)
    return [hi >> 8, hi & 0xff, lo >> 8, lo & 0xff].join('.')
  }
  return `${groups
    .slice(0, 4)
    .map((g) => g.toString(16))
    .join(':')}::/64`
}

/** The eight 16-bit groups of an IPv6 address (already checked by isIPv6). */
function ipv6Groups(ip: string): number[] | null {
  let s = ip.toLowerCase()
  const tail: number[] = []
  const dotted = /(\d+)\.(\d+)\.(\d+)\.(\d+)$/.exec(s)
  if (dotted) {
    const [a, b, c, d] = dotted.slice(1).map(Number) as [number, number, number, number]
    tail.push((a << 8) | b, (c << 8) | d)
    s = s.slice(0, dotted.index)
    if (s.endsWith(':') && !s.endsWith('::')) s = s.slice(0, -1)
  }
  const parse = (part: string) => (part ? part.split(':').map((h) => parseInt(h, 16)) : [])
  const [head = '', rest] = s.split('::')
  const left = parse(head)
  const right = [...parse(rest ?? ''), ...tail]
  const missing = 8 - left.length - right.length
  if (rest === undefined ? missing !== 0 : missing < 0) return null
  return [...left, ...Array<number>(Math.max(0, missing)).fill(0), ...right]
}

/** An attempt counted as a failure before its password is checked; a success takes it back. */
export interface Reservation {
  keys: { accountAddress: CounterKey; address: CounterKey; account: CounterKey }
  /** The time the attempt was counted at, and each counter's previous last-failure time. */
  countedAt: string
  previous: { address: string; account: string }
}

export interface TooManyAttemptsDetails {
  retryAfterSeconds: number
}

/** The Retry-After seconds of a refused attempt, or null for any other error. */
export function retryAfterSeconds(err: unknown): number | null {
  if (!(err instanceof AppError) || err.code !== 'too_many_attempts') return null
  const s = (err.details as TooManyAttemptsDetails | undefined)?.retryAfterSeconds
  return typeof s === 'number' && s > 0 ? s : null
}

function inWords(seconds: number): string {
  if (seconds < 90) return `${seconds} second${seconds === 1 ? '' : 's'}`
  const minutes = Math.ceil(seconds / 60)
  return `${minutes} minutes`
}

/**
 * Counts this attempt against the account+address, address and account counters in one
 * transaction, or refuses it (429, nothing counted) when it comes before the wait is over.
 * Counting happens before the password is checked, so N attempts sent at once cannot all be
 * checked: each waits for the row lock, and sees the ones before it.
 */
export async function reserveSignInAttempt(
  db: Database,
  policy: SignInPolicy,
  who: { email: string; address: string },
): Promise<Reservation> {
  const keys = {
    accountAddress: { scope: 'account_address', email: who.email, address: who.address },
    address: { scope: 'address', email: '', address: who.address },
    account: { scope: 'account', email: who.email, address: '' },
  } satisfies Reservation['keys']
  for (let attempt = 1; ; attempt++) {
    try {
      return await reserveOnce(db, policy, keys)
    } catch (err) {
      // The rows are always locked in one order, so a conflict needs another transaction
      // (pruning, say) in the middle; trying again is safe because nothing was counted.
      if (attempt < 3 && isLockConflict(err)) continue
      throw err
    }
  }
}

async function reserveOnce(db: Database, policy: SignInPolicy, keys: Reservation['keys']): Promise<Reservation> {
  return db.transaction(
    async (tx) => {
      const { now, counters } = await lockCounters(tx, [keys.accountAddress, keys.address, keys.account])
      const [accountAddress, address, account] = counters as [LockedCounter, LockedCounter, LockedCounter]
      const waitMs = waitBeforeAttempt({ accountAddress, address, account }, policy)
      if (waitMs > 0) {
        const seconds = Math.ceil(waitMs / 1000)
        throw new AppError(
          'too_many_attempts',
          `Too many failed sign-ins. Try again in ${inWords(seconds)}; each further wrong password makes the wait longer. If you have forgotten your password, ask your instructor to reset it.`,
          429,
          { retryAfterSeconds: seconds } satisfies TooManyAttemptsDetails,
        )
      }
      for (const c of counters) {
        const live = c.sinceLastMs >= policy.windowMs ? 0 : c.failures
        await setCounter(tx, c, live + 1, now)
      }
      return { keys, countedAt: now, previous: { address: address.lastFailedAt, account: account.lastFailedAt } }
    },
    // Locking reads on primary keys only; read committed also keeps InnoDB from taking gap locks.
    { isolationLevel: 'read committed' },
  )
}

/**
 * The right password: this address starts over on this account, and the attempt is taken back
 * from the address and account counters (a success is not a failure, but it does not wipe out
 * failures others made from the same address or on the same account).
 */
export async function settleSuccessfulSignIn(db: Database, r: Reservation): Promise<void> {
  await deleteCounter(db, r.keys.accountAddress)
  await takeBackAttempt(db, r.keys.address, r.countedAt, r.previous.address)
  await takeBackAttempt(db, r.keys.account, r.countedAt, r.previous.account)
}

/** Removes counters whose window has passed (a bounded batch, so a sign-in never waits long for it). */
export async function pruneSignInCounters(db: Database, policy: SignInPolicy): Promise<void> {
  try {
    await pruneCounters(db, policy.windowMs)
  } catch (err) {
    // Expired rows are only clutter (they count as zero); the next sign-in prunes again.
    if (!isLockConflict(err)) throw err
  }
}

import { sql } from 'drizzle-orm'
import { index, int, mysqlEnum, mysqlTable, primaryKey, timestamp, varchar } from 'drizzle-orm/mysql-core'

/**
 * What a sign-in counter counts failures for:
 * - `account_address`: one e-mail address tried from one client address (the main slow-down);
 * - `address`: one client address, across every e-mail it tries (password spraying);
 * - `account`: one e-mail address, from every client address (guessing spread over many addresses).
 */
export const SIGN_IN_SCOPES = ['account_address', 'address', 'account'] as const
export type SignInScope = (typeof SIGN_IN_SCOPES)[number]

/**
 * Failed sign-in counters, one row per (scope, e-mail, client address); the part a scope does not
 * use is ''. Kept in MariaDB rather than process memory so the limits hold across server replicas,
 * and keyed by the natural key (no surrogate id) so "insert or lock the existing row" is one
 * primary-key lookup. A counter starts over once its window has passed without a failure; rows
 * past it are pruned. No created/updated columns: `last_failed_at` is the only time that matters.
 */
export const signInThrottles = mysqlTable(
  'sign_in_throttles',
  {
    scope: mysqlEnum('scope', SIGN_IN_SCOPES).notNull(),
    /** Lower-cased e-mail as typed (whether or not an account has it), or '' for `address`. */
    email: varchar('email', { length: 254 }).notNull().default(''),
    /** Client address (IPv6 cut to its /64), or '' for `account`. */
    address: varchar('address', { length: 64 }).notNull().default(''),
    /** Attempts counted and not taken back by a success, since the counter last started over. */
    failures: int('failures', { unsigned: true }).notNull().default(0),
    lastFailedAt: timestamp('last_failed_at', { fsp: 3, mode: 'date' })
      .notNull()
      .default(sql`CURRENT_TIMESTAMP(3)`),
  },
  (t) => [
    primaryKey({ name: 'sign_in_throttles_pk', columns: [t.scope, t.email, t.address] }),
    index('sign_in_throttles_last_failed_idx').on(t.lastFailedAt),
  ],
)

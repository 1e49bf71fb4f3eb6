import { boolean, mysqlTable, uniqueIndex, varchar } from 'drizzle-orm/mysql-core'
import { id, timestamps } from './columns'

export const users = mysqlTable(
  'users',
  {
    id: id(),
    /** Stored lower-cased; the unique index makes sign-in by e-mail unambiguous. */
    email: varchar('email', { length: 254 }).notNull(),
    displayName: varchar('display_name', { length: 120 }).notNull(),
    /** argon2id hash; null until an invited person sets a password. */
    passwordHash: varchar('password_hash', { length: 255 }),
    isSiteAdmin: boolean('is_site_admin').notNull().default(false),
    ...timestamps,
  },
  (t) => [uniqueIndex('users_email_uq').on(t.email)],
)

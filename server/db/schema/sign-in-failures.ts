import { index, mysqlTable, varchar } from 'drizzle-orm/mysql-core'
import { id, timestamps } from './columns'

/**
 * Failed sign-ins, kept in the database (not in process memory) so the limit holds across
 * server replicas. Rows older than the window are pruned on each failure.
 */
export const signInFailures = mysqlTable(
  'sign_in_failures',
  {
    id: id(),
    email: varchar('email', { length: 254 }).notNull(),
    ip: varchar('ip', { length: 64 }).notNull(),
    createdAt: timestamps.createdAt,
  },
  (t) => [index('sign_in_failures_email_created_idx').on(t.email, t.createdAt)],
)

import { char, mysqlTable, timestamp, uniqueIndex } from 'drizzle-orm/mysql-core'
import { sql } from 'drizzle-orm'
import { id, ref } from './columns'
import { users } from './users'

/**
 * A person's calendar feed address. The address carries a random token; only its SHA-256 (hex) is
 * kept, so a copy of the database cannot be turned into working feed addresses. One per person:
 * making a new one replaces the row, and the old address stops working.
 */
export const calendarTokens = mysqlTable(
  'calendar_tokens',
  {
    id: id(),
    userId: ref('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    tokenHash: char('token_hash', { length: 64 }).notNull(),
    createdAt: timestamp('created_at', { fsp: 3, mode: 'date' })
      .notNull()
      .default(sql`CURRENT_TIMESTAMP(3)`),
  },
  (t) => [uniqueIndex('calendar_tokens_user_uq').on(t.userId), uniqueIndex('calendar_tokens_hash_uq').on(t.tokenHash)],
)

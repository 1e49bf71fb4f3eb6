import { char, index, mysqlTable, timestamp, uniqueIndex } from 'drizzle-orm/mysql-core'
import { id, ref, timestamps } from './columns'
import { courses } from './courses'
import { users } from './users'

/**
 * A set-password link sent to an imported person. Only the SHA-256 of the token is stored, so a
 * copy of the database cannot be used to take over an account; `used_at` makes it single-use.
 */
export const invitations = mysqlTable(
  'invitations',
  {
    id: id(),
    userId: ref('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    /** The course whose roster import sent it (null for invitations sent outside a course). */
    courseId: ref('course_id').references(() => courses.id, { onDelete: 'cascade' }),
    /** Hex SHA-256 of the random token in the link. */
    tokenHash: char('token_hash', { length: 64 }).notNull(),
    expiresAt: timestamp('expires_at', { fsp: 3, mode: 'date' }).notNull(),
    usedAt: timestamp('used_at', { fsp: 3, mode: 'date' }),
    createdBy: ref('created_by').references(() => users.id, { onDelete: 'set null' }),
    ...timestamps,
  },
  (t) => [uniqueIndex('invitations_token_hash_uq').on(t.tokenHash), index('invitations_user_idx').on(t.userId)],
)

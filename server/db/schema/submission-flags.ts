import { index, json, mysqlEnum, mysqlTable, timestamp, varchar } from 'drizzle-orm/mysql-core'
import { id, ref, timestamps } from './columns'
import { submissions } from './submissions'
import { users } from './users'
import { FLAG_STATUSES } from '../../../shared/schemas/review'

/** A reason for staff to look at a submission: a built-in data check or a module's review rule. */
export const submissionFlags = mysqlTable(
  'submission_flags',
  {
    id: id(),
    submissionId: ref('submission_id')
      .notNull()
      .references(() => submissions.id, { onDelete: 'cascade' }),
    code: varchar('code', { length: 80 }).notNull(),
    message: varchar('message', { length: 1000 }).notNull(),
    detail: json('detail').$type<Record<string, number | string> | null>(),
    status: mysqlEnum('status', FLAG_STATUSES).notNull().default('open'),
    resolvedBy: ref('resolved_by').references(() => users.id, { onDelete: 'set null' }),
    resolvedAt: timestamp('resolved_at', { fsp: 3, mode: 'date' }),
    /** When this flag went out in a digest e-mail to the section's TAs (null: not yet). */
    digestedAt: timestamp('digested_at', { fsp: 3, mode: 'date' }),
    ...timestamps,
  },
  (t) => [
    index('submission_flags_submission_idx').on(t.submissionId),
    index('submission_flags_digested_idx').on(t.digestedAt),
  ],
)

import { double, index, mysqlTable, varchar } from 'drizzle-orm/mysql-core'
import { id, ref, timestamps } from './columns'
import { submissionChecks } from './submission-checks'
import { submissions } from './submissions'
import { users } from './users'

/** The audit of every staff change to points: who, when, old, new, why. Rows are never updated. */
export const gradeChanges = mysqlTable(
  'grade_changes',
  {
    id: id(),
    submissionId: ref('submission_id')
      .notNull()
      .references(() => submissions.id, { onDelete: 'cascade' }),
    /** The check overridden, or null for an override of the total. */
    checkId: ref('check_id').references(() => submissionChecks.id, { onDelete: 'set null' }),
    /** What was changed, in words (the check's label, or "total"). */
    target: varchar('target', { length: 200 }).notNull(),
    changedBy: ref('changed_by')
      .notNull()
      .references(() => users.id),
    oldPoints: double('old_points'),
    newPoints: double('new_points').notNull(),
    reason: varchar('reason', { length: 2000 }).notNull(),
    ...timestamps,
  },
  (t) => [index('grade_changes_submission_idx').on(t.submissionId)],
)

import { index, mysqlTable, timestamp, uniqueIndex, varchar } from 'drizzle-orm/mysql-core'
import { id, ref, timestamps } from './columns'
import { modules } from './modules'
import { users } from './users'

/**
 * A later due date for one student on one module, granted by the instructor. Lateness (and the
 * late penalty) of that student's hand-ins is measured from this date instead of the module's.
 */
export const dueExtensions = mysqlTable(
  'due_extensions',
  {
    id: id(),
    moduleId: ref('module_id')
      .notNull()
      .references(() => modules.id, { onDelete: 'cascade' }),
    userId: ref('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    dueAt: timestamp('due_at', { fsp: 3, mode: 'date' }).notNull(),
    /** Why it was granted, for the staff (not shown to other students). */
    note: varchar('note', { length: 500 }).notNull().default(''),
    grantedBy: ref('granted_by').references(() => users.id, { onDelete: 'set null' }),
    ...timestamps,
  },
  (t) => [
    uniqueIndex('due_extensions_module_user_uq').on(t.moduleId, t.userId),
    index('due_extensions_user_idx').on(t.userId),
  ],
)

import { sql } from 'drizzle-orm'
import {
  boolean,
  customType,
  index,
  int,
  json,
  mysqlEnum,
  mysqlTable,
  timestamp,
  uniqueIndex,
  varchar,
} from 'drizzle-orm/mysql-core'
import { id, ref, timestamps } from './columns'
import type { ModuleIssueRow } from './modules'
import { modules } from './modules'
import { users } from './users'

/** MEDIUMTEXT (16 MB): a module's source is limited to 1 MB, its rendered HTML can be larger. */
const mediumText = customType<{ data: string }>({ dataType: () => 'mediumtext' })

export const VERSION_STATUSES = ['draft', 'published', 'superseded'] as const

/**
 * Every saved state of a module. A draft version is edited in place; publishing freezes it, and
 * the next edit starts a new draft. Submissions point at the version they were made against.
 */
export const moduleVersions = mysqlTable(
  'module_versions',
  {
    id: id(),
    moduleId: ref('module_id')
      .notNull()
      .references(() => modules.id, { onDelete: 'cascade' }),
    number: int('number').notNull(),
    status: mysqlEnum('status', VERSION_STATUSES).notNull().default('draft'),
    source: mediumText('source').notNull(),
    html: mediumText('html').notNull(),
    /** The validated front matter (title, due, assignment spec…) as JSON. */
    frontMatter: json('front_matter').$type<Record<string, unknown> | null>(),
    title: varchar('title', { length: 200 }).notNull(),
    /** Due instant in UTC (the front matter states it in the course's zone). */
    dueAt: timestamp('due_at', { fsp: 3, mode: 'date' }),
    /** Validation problems; a version with any cannot be published. */
    issues: json('issues')
      .$type<ModuleIssueRow[]>()
      .notNull()
      .default(sql`('[]')`),
    valid: boolean('valid').notNull().default(false),
    createdBy: ref('created_by').references(() => users.id, { onDelete: 'set null' }),
    updatedBy: ref('updated_by').references(() => users.id, { onDelete: 'set null' }),
    publishedAt: timestamp('published_at', { fsp: 3, mode: 'date' }),
    publishedBy: ref('published_by').references(() => users.id, { onDelete: 'set null' }),
    ...timestamps,
  },
  (t) => [
    uniqueIndex('module_versions_module_number_uq').on(t.moduleId, t.number),
    index('module_versions_module_idx').on(t.moduleId),
  ],
)

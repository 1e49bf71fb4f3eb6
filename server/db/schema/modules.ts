import { double, index, int, mysqlEnum, mysqlTable, timestamp, uniqueIndex, varchar } from 'drizzle-orm/mysql-core'
import { id, ref, timestamps } from './columns'
import { courses } from './courses'
import { users } from './users'

export const MODULE_STATUSES = ['draft', 'published', 'closed'] as const

/**
 * A lab module of a course. Its text lives in module_versions; this row says which version is
 * being edited (`current_version_id`) and which one students read (`published_version_id`).
 */
export const modules = mysqlTable(
  'modules',
  {
    id: id(),
    courseId: ref('course_id')
      .notNull()
      .references(() => courses.id, { onDelete: 'cascade' }),
    slug: varchar('slug', { length: 80 }).notNull(),
    status: mysqlEnum('status', MODULE_STATUSES).notNull().default('draft'),
    /** Order on the course home. */
    position: int('position').notNull().default(0),
    // Not declared as foreign keys: versions reference modules, and a cycle would block inserts.
    currentVersionId: ref('current_version_id'),
    publishedVersionId: ref('published_version_id'),
    /** When staff released the grades (modules whose results wait for a release). */
    gradesReleasedAt: timestamp('grades_released_at', { fsp: 3, mode: 'date' }),
    /** The module's weight in the course total (relative; the gradebook divides by the sum). */
    weight: double('weight').notNull().default(1),
    createdBy: ref('created_by').references(() => users.id, { onDelete: 'set null' }),
    ...timestamps,
  },
  (t) => [
    uniqueIndex('modules_course_slug_uq').on(t.courseId, t.slug),
    index('modules_course_status_idx').on(t.courseId, t.status),
  ],
)

export type ModuleIssueRow = { path: string; message: string; line?: number }

import { index, mysqlTable, uniqueIndex, varchar } from 'drizzle-orm/mysql-core'
import { id, ref, timestamps } from './columns'
import { courses } from './courses'

export const sections = mysqlTable(
  'sections',
  {
    id: id(),
    courseId: ref('course_id')
      .notNull()
      .references(() => courses.id, { onDelete: 'cascade' }),
    name: varchar('name', { length: 60 }).notNull(),
    /** Free text such as "Tue 13:00–16:00, Bay 2". */
    meets: varchar('meets', { length: 120 }).notNull().default(''),
    ...timestamps,
  },
  (t) => [uniqueIndex('sections_course_name_uq').on(t.courseId, t.name), index('sections_course_idx').on(t.courseId)],
)

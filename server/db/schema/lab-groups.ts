import { mysqlTable, uniqueIndex, varchar } from 'drizzle-orm/mysql-core'
import { id, ref, timestamps } from './columns'
import { courses } from './courses'
import { sections } from './sections'

export const labGroups = mysqlTable(
  'lab_groups',
  {
    id: id(),
    courseId: ref('course_id')
      .notNull()
      .references(() => courses.id, { onDelete: 'cascade' }),
    sectionId: ref('section_id').references(() => sections.id, { onDelete: 'set null' }),
    name: varchar('name', { length: 60 }).notNull(),
    ...timestamps,
  },
  (t) => [uniqueIndex('lab_groups_course_name_uq').on(t.courseId, t.name)],
)

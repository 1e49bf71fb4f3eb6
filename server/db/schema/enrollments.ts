import { index, mysqlEnum, mysqlTable, uniqueIndex } from 'drizzle-orm/mysql-core'
import { id, ref, timestamps } from './columns'
import { courses } from './courses'
import { labGroups } from './lab-groups'
import { sections } from './sections'
import { users } from './users'

export const COURSE_ROLES = ['instructor', 'ta', 'student'] as const

/** A person's role in one course; the same person may be a TA here and a student elsewhere. */
export const enrollments = mysqlTable(
  'enrollments',
  {
    id: id(),
    userId: ref('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    courseId: ref('course_id')
      .notNull()
      .references(() => courses.id, { onDelete: 'cascade' }),
    role: mysqlEnum('role', COURSE_ROLES).notNull(),
    /** A student's section, or the section a TA looks after; null for instructors. */
    sectionId: ref('section_id').references(() => sections.id, { onDelete: 'set null' }),
    labGroupId: ref('lab_group_id').references(() => labGroups.id, { onDelete: 'set null' }),
    ...timestamps,
  },
  (t) => [
    uniqueIndex('enrollments_user_course_uq').on(t.userId, t.courseId),
    index('enrollments_course_role_idx').on(t.courseId, t.role),
  ],
)

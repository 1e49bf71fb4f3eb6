import { mysqlTable, uniqueIndex, varchar } from 'drizzle-orm/mysql-core'
import { id, timestamps } from './columns'

export const courses = mysqlTable(
  'courses',
  {
    id: id(),
    code: varchar('code', { length: 32 }).notNull(),
    title: varchar('title', { length: 200 }).notNull(),
    term: varchar('term', { length: 40 }).notNull(),
    institution: varchar('institution', { length: 200 }).notNull(),
    /** IANA zone in which due dates are stated, e.g. America/Chicago. */
    timeZone: varchar('time_zone', { length: 64 }).notNull(),
    ...timestamps,
  },
  (t) => [uniqueIndex('courses_code_term_uq').on(t.code, t.term)],
)

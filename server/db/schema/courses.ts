import { sql } from 'drizzle-orm'
import { int, mysqlTable, timestamp, uniqueIndex, varchar } from 'drizzle-orm/mysql-core'
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
    /**
     * The course's key in page addresses (`/c/<slug>`): code and term in lower case, runs of other
     * characters as one hyphen. Computed by MariaDB, so every insert path (admin form, seeds, demo,
     * backups) gets it and it cannot drift from code and term. Nullable only in the DDL: MariaDB refuses NOT NULL on a generated column, and
     * the expression never yields NULL because code and term are NOT NULL.
     */
    slug: varchar('slug', { length: 80 }).generatedAlwaysAs(
      sql`TRIM(BOTH '-' FROM REGEXP_REPLACE(LOWER(CONCAT(code, '-', term)), '[^a-z0-9]+', '-'))`,
      {
        mode: 'stored',
      },
    ),
    /**
     * When the instructor closed the course at the end of its term: from then on it is read-only for
     * everyone, hidden from students, and still listed (marked closed) and readable for staff. Null: open.
     */
    closedAt: timestamp('closed_at', { fsp: 3, mode: 'date' }),
    /** Groups book and cancel stand slots until this many hours before a slot starts; staff are not bound by it. */
    bookingCutoffHours: int('booking_cutoff_hours').notNull().default(24),
    ...timestamps,
  },
  (t) => [uniqueIndex('courses_code_term_uq').on(t.code, t.term), uniqueIndex('courses_slug_uq').on(t.slug)],
)

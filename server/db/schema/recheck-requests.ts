import { index, mysqlEnum, mysqlTable, text, timestamp } from 'drizzle-orm/mysql-core'
import { id, ref, timestamps } from './columns'
import { courses } from './courses'
import { submissions } from './submissions'
import { users } from './users'

export const RECHECK_STATUSES = ['open', 'answered'] as const

/** A student's request, on a released result, that the staff look at the grade again. */
export const recheckRequests = mysqlTable(
  'recheck_requests',
  {
    id: id(),
    courseId: ref('course_id')
      .notNull()
      .references(() => courses.id, { onDelete: 'cascade' }),
    submissionId: ref('submission_id')
      .notNull()
      .references(() => submissions.id, { onDelete: 'cascade' }),
    requestedBy: ref('requested_by')
      .notNull()
      .references(() => users.id),
    /** The student's message (plain text, shown escaped). */
    message: text('message').notNull(),
    status: mysqlEnum('status', RECHECK_STATUSES).notNull().default('open'),
    /** The staff answer (Markdown, sanitised when rendered), e-mailed to the student. */
    answer: text('answer'),
    answeredBy: ref('answered_by').references(() => users.id, { onDelete: 'set null' }),
    answeredAt: timestamp('answered_at', { fsp: 3, mode: 'date' }),
    ...timestamps,
  },
  (t) => [
    index('recheck_requests_course_status_idx').on(t.courseId, t.status),
    index('recheck_requests_submission_idx').on(t.submissionId),
  ],
)

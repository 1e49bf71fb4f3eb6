import { index, mysqlTable, text } from 'drizzle-orm/mysql-core'
import { id, ref, timestamps } from './columns'
import { submissions } from './submissions'
import { users } from './users'

/** Staff comments to the student on a submission (Markdown, sanitised when rendered). */
export const submissionComments = mysqlTable(
  'submission_comments',
  {
    id: id(),
    submissionId: ref('submission_id')
      .notNull()
      .references(() => submissions.id, { onDelete: 'cascade' }),
    authorId: ref('author_id')
      .notNull()
      .references(() => users.id),
    body: text('body').notNull(),
    ...timestamps,
  },
  (t) => [index('submission_comments_submission_idx').on(t.submissionId)],
)

import { char, customType, index, int, mysqlTable, uniqueIndex, varchar } from 'drizzle-orm/mysql-core'
import { id, ref, timestamps } from './columns'
import { courses } from './courses'
import { submissions } from './submissions'

/** LONGBLOB: the stored picture (re-encoded, without metadata). */
const longBlob = customType<{ data: Buffer; driverData: Buffer }>({ dataType: () => 'longblob' })

/**
 * A photograph handed in with a submission (the sheet's `assignment.images`), stored in the same
 * transaction as the submission. The upload itself is not kept, only its sha256 and size: what is
 * kept is the picture re-encoded without metadata (server/images/photo.ts), so no camera serial or
 * GPS position is stored. The marks live with the rest of the typed inputs (`submissions.inputs`),
 * in this picture's pixel coordinates.
 */
export const submissionImages = mysqlTable(
  'submission_images',
  {
    id: id(),
    submissionId: ref('submission_id')
      .notNull()
      .references(() => submissions.id, { onDelete: 'cascade' }),
    courseId: ref('course_id')
      .notNull()
      .references(() => courses.id, { onDelete: 'cascade' }),
    imageKey: varchar('image_key', { length: 60 }).notNull(),
    contentType: varchar('content_type', { length: 20 }).$type<'image/png' | 'image/jpeg'>().notNull(),
    width: int('width').notNull(),
    height: int('height').notNull(),
    size: int('size').notNull(),
    sha256: char('sha256', { length: 64 }).notNull(),
    originalSha256: char('original_sha256', { length: 64 }).notNull(),
    originalSize: int('original_size').notNull(),
    bytes: longBlob('bytes').notNull(),
    ...timestamps,
  },
  (t) => [
    uniqueIndex('submission_images_submission_key_uq').on(t.submissionId, t.imageKey),
    // "The same photograph as another group's in this course" is one indexed lookup.
    index('submission_images_course_original_idx').on(t.courseId, t.originalSha256),
  ],
)

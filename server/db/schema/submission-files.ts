import { customType, index, int, json, mysqlTable, char, varchar } from 'drizzle-orm/mysql-core'
import type { LogFingerprint } from '../../../shared/grading/fingerprint'
import { id, ref, timestamps } from './columns'
import { courses } from './courses'
import { submissions } from './submissions'
import type { PressureSense } from '../../../shared/units'

/** LONGBLOB: the raw upload, byte for byte, as the student sent it. */
const longBlob = customType<{ data: Buffer; driverData: Buffer }>({ dataType: () => 'longblob' })

export interface ColumnMappingRow {
  header: string
  unit: string
  pressure?: PressureSense
}

/** A submission's uploaded table: raw bytes with their sha256, the mapping used, the parsed data. */
export const submissionFiles = mysqlTable(
  'submission_files',
  {
    id: id(),
    submissionId: ref('submission_id')
      .notNull()
      .references(() => submissions.id, { onDelete: 'cascade' }),
    /** Kept here too so "same file as another group's in this course" is one indexed lookup. */
    courseId: ref('course_id')
      .notNull()
      .references(() => courses.id, { onDelete: 'cascade' }),
    tableKey: varchar('table_key', { length: 60 }).notNull(),
    filename: varchar('filename', { length: 255 }).notNull(),
    contentType: varchar('content_type', { length: 120 }).notNull(),
    size: int('size').notNull(),
    sha256: char('sha256', { length: 64 }).notNull(),
    bytes: longBlob('bytes').notNull(),
    mapping: json('mapping').$type<Record<string, ColumnMappingRow>>().notNull(),
    /** Parsed columns in SI (pressures as declared gauge/absolute), keyed by column key. */
    parsed: json('parsed').$type<Record<string, number[]>>().notNull(),
    rowCount: int('row_count').notNull(),
    /**
     * A few hundred samples of each column from the start of the run (shared/grading/fingerprint.ts),
     * so near-copies of another group's log are found without reading every parsed log of the
     * module. Null for a log with no time column, and for files stored before fingerprints existed
     * (the near-copy check computes those from `parsed` the first time it needs them).
     */
    fingerprint: json('fingerprint').$type<LogFingerprint>(),
    ...timestamps,
  },
  (t) => [
    index('submission_files_course_sha_idx').on(t.courseId, t.sha256),
    index('submission_files_submission_idx').on(t.submissionId),
  ],
)

import type { JetMarks } from '../../../shared/images/jet-marks'
import { sql } from 'drizzle-orm'
import { boolean, double, index, int, json, mysqlEnum, mysqlTable, timestamp, varchar } from 'drizzle-orm/mysql-core'
import { id, ref, timestamps } from './columns'
import { courses } from './courses'
import { labGroups } from './lab-groups'
import { moduleVersions } from './module-versions'
import { modules } from './modules'
import { users } from './users'
import { runRecords } from './run-records'
import { SUBMISSION_STATUSES } from '../../../shared/schemas/submissions'
import { REVIEW_STATES } from '../../../shared/schemas/review'
import type { PressureSense } from '../../../shared/units'

export { SUBMISSION_STATUSES }

/** What the student typed, kept as typed (value and unit) besides the SI values used to grade. */
export interface SubmissionInputs {
  measurements: Record<string, { value: number; unit: string; pressure?: PressureSense }>
  reported: Record<string, { value: number; unit: string }>
  /** The marks on each photograph (by the sheet's image key), in the stored picture's pixels. */
  images?: Record<string, JetMarks>
}

/**
 * One hand-in of a module by a student (or by one member for a lab group). It is stored with
 * its files in one transaction before grading, so an acknowledged submission is never lost.
 */
export const submissions = mysqlTable(
  'submissions',
  {
    id: id(),
    courseId: ref('course_id')
      .notNull()
      .references(() => courses.id, { onDelete: 'cascade' }),
    moduleId: ref('module_id')
      .notNull()
      .references(() => modules.id, { onDelete: 'cascade' }),
    /** Graded against this version of the module, always. */
    moduleVersionId: ref('module_version_id')
      .notNull()
      .references(() => moduleVersions.id),
    userId: ref('user_id')
      .notNull()
      .references(() => users.id),
    labGroupId: ref('lab_group_id').references(() => labGroups.id, { onDelete: 'set null' }),
    attempt: int('attempt').notNull(),
    status: mysqlEnum('status', SUBMISSION_STATUSES).notNull().default('received'),
    gradingError: varchar('grading_error', { length: 1000 }),
    inputs: json('inputs').$type<SubmissionInputs>().notNull(),
    isLate: boolean('is_late').notNull().default(false),
    daysLate: int('days_late').notNull().default(0),
    /** Fraction of the score taken off for lateness (0–1). */
    latePenalty: double('late_penalty').notNull().default(0),
    // Points are DOUBLE on purpose: they come from tolerance arithmetic on measured data and are
    // shown rounded; no money-like exact sums are needed.
    rawScore: double('raw_score'),
    score: double('score'),
    /** A staff override of the total (after penalty); null when the computed score stands. */
    scoreOverride: double('score_override'),
    maxScore: double('max_score'),
    reviewStatus: mysqlEnum('review_status', REVIEW_STATES).notNull().default('none'),
    /** Optimistic-lock counter for staff edits. */
    revision: int('revision').notNull().default(0),
    submittedAt: timestamp('submitted_at', { fsp: 3, mode: 'date' })
      .notNull()
      .default(sql`CURRENT_TIMESTAMP(3)`),
    gradedAt: timestamp('graded_at', { fsp: 3, mode: 'date' }),
    // Grading is a durable job on this row: claimed by a worker (status 'grading', claimed_at set,
    // grade_attempts + 1 as the claim's token), retried after grade_after on transient errors,
    // and released when a claim goes stale (a worker that died).
    gradeAttempts: int('grade_attempts').notNull().default(0),
    gradeAfter: timestamp('grade_after', { fsp: 3, mode: 'date' }),
    gradeClaimedAt: timestamp('grade_claimed_at', { fsp: 3, mode: 'date' }),
    /** The signed-off stand run this hand-in reports (lab sheets with `requiresSignedRun`). */
    runRecordId: ref('run_record_id').references(() => runRecords.id, { onDelete: 'set null' }),
    ...timestamps,
  },
  (t) => [
    index('submissions_module_user_idx').on(t.moduleId, t.userId),
    index('submissions_module_group_idx').on(t.moduleId, t.labGroupId),
    index('submissions_course_review_idx').on(t.courseId, t.reviewStatus),
    index('submissions_grading_idx').on(t.status, t.gradeAfter),
  ],
)

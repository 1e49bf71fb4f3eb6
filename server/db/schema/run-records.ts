import { sql } from 'drizzle-orm'
import {
  index,
  int,
  json,
  mysqlEnum,
  mysqlTable,
  primaryKey,
  text,
  timestamp,
  uniqueIndex,
  varchar,
} from 'drizzle-orm/mysql-core'
import { id, ref } from './columns'
import { bookings } from './bookings'
import { courses } from './courses'
import { moduleVersions } from './module-versions'
import { users } from './users'
import type { ChecklistItem } from '../../../shared/modules/stand-schema'

export const RUN_OUTCOMES = ['completed', 'aborted', 'hang-fire', 'misfire'] as const
export const RUN_ENTRY_KINDS = ['tick', 'untick', 'sign-off', 'correction', 'note'] as const

/** One checklist item as the run was opened with it (copied from the lab sheet's version then). */
export type RunChecklistItem = ChecklistItem

/**
 * The record of one run at the stand for a booking. It is opened at the stand with the checklist of
 * the lab sheet's issued version (so a later edit of the sheet does not change a run's items), and
 * signed off once: the sign-off columns are written by one UPDATE guarded by `signed_off_at IS NULL`.
 * Everything else that happens (ticks, corrections, notes) is an entry in run_entries, which the
 * database refuses to update or delete.
 */
export const runRecords = mysqlTable(
  'run_records',
  {
    id: id(),
    courseId: ref('course_id')
      .notNull()
      .references(() => courses.id, { onDelete: 'cascade' }),
    bookingId: ref('booking_id')
      .notNull()
      .references(() => bookings.id, { onDelete: 'cascade' }),
    moduleVersionId: ref('module_version_id')
      .notNull()
      .references(() => moduleVersions.id),
    checklist: json('checklist').$type<RunChecklistItem[]>().notNull(),
    openedBy: ref('opened_by').references(() => users.id, { onDelete: 'set null' }),
    openedAt: timestamp('opened_at', { fsp: 3, mode: 'date' })
      .notNull()
      .default(sql`CURRENT_TIMESTAMP(3)`),
    // Written once, at sign-off.
    startedAt: timestamp('started_at', { fsp: 3, mode: 'date' }),
    endedAt: timestamp('ended_at', { fsp: 3, mode: 'date' }),
    outcome: mysqlEnum('outcome', RUN_OUTCOMES),
    /** Why a run was aborted (required then). */
    outcomeReason: varchar('outcome_reason', { length: 500 }),
    /** Minutes waited before approaching after a hang-fire or misfire (required then). */
    waitMinutes: int('wait_minutes'),
    notes: text('notes'),
    signedOffBy: ref('signed_off_by').references(() => users.id, { onDelete: 'set null' }),
    signedOffAt: timestamp('signed_off_at', { fsp: 3, mode: 'date' }),
  },
  (t) => [uniqueIndex('run_records_booking_uq').on(t.bookingId), index('run_records_course_idx').on(t.courseId)],
)

/**
 * Append-only log of a run: each tick, untick, sign-off, correction and note with who and when.
 * Triggers in the migration refuse UPDATE and DELETE on this table; a correction is a new row.
 */
export const runEntries = mysqlTable(
  'run_entries',
  {
    id: id(),
    runId: ref('run_id')
      .notNull()
      .references(() => runRecords.id),
    kind: mysqlEnum('kind', RUN_ENTRY_KINDS).notNull(),
    /** The checklist item for tick/untick; null otherwise. */
    itemKey: varchar('item_key', { length: 60 }),
    text: varchar('text', { length: 2000 }),
    byUserId: ref('by_user_id')
      .notNull()
      .references(() => users.id),
    at: timestamp('at', { fsp: 3, mode: 'date' })
      .notNull()
      .default(sql`CURRENT_TIMESTAMP(3)`),
  },
  (t) => [index('run_entries_run_idx').on(t.runId, t.id)],
)

/** Who was at the stand for the run (written with the sign-off). */
export const runPeople = mysqlTable(
  'run_people',
  {
    runId: ref('run_id')
      .notNull()
      .references(() => runRecords.id, { onDelete: 'cascade' }),
    userId: ref('user_id')
      .notNull()
      .references(() => users.id),
  },
  (t) => [primaryKey({ columns: [t.runId, t.userId] })],
)

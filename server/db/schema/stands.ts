import { index, int, mysqlTable, primaryKey, timestamp, uniqueIndex, varchar } from 'drizzle-orm/mysql-core'
import { id, ref, timestamps } from './columns'
import { courses } from './courses'
import { modules } from './modules'
import { sections } from './sections'
import { users } from './users'

/**
 * A test stand of a course: where lab groups run their pressurised and hot-fire runs. The maximum
 * receiver pressure is a plain note for people to read; the stand's own rating and the institution's
 * procedures govern, never this row.
 */
export const stands = mysqlTable(
  'stands',
  {
    id: id(),
    courseId: ref('course_id')
      .notNull()
      .references(() => courses.id, { onDelete: 'cascade' }),
    name: varchar('name', { length: 80 }).notNull(),
    location: varchar('location', { length: 120 }).notNull().default(''),
    maxPressureNote: varchar('max_pressure_note', { length: 120 }).notNull().default(''),
    ...timestamps,
  },
  (t) => [uniqueIndex('stands_course_name_uq').on(t.courseId, t.name)],
)

/** Which lab sheets may run on a stand (an allow-list; a sheet not listed cannot be booked there). */
export const standModules = mysqlTable(
  'stand_modules',
  {
    standId: ref('stand_id')
      .notNull()
      .references(() => stands.id, { onDelete: 'cascade' }),
    moduleId: ref('module_id')
      .notNull()
      .references(() => modules.id, { onDelete: 'cascade' }),
  },
  (t) => [primaryKey({ columns: [t.standId, t.moduleId] }), index('stand_modules_module_idx').on(t.moduleId)],
)

/**
 * A bookable stretch of stand time for one section. Times are UTC instants; pages show them in the
 * course's time zone. Two slots of one stand never overlap: the service checks ranges under a lock on
 * the stand row, and the unique key refuses two slots starting at the same instant.
 * A cancelled slot keeps its row (bookings and run records point at it).
 */
export const standSlots = mysqlTable(
  'stand_slots',
  {
    id: id(),
    standId: ref('stand_id')
      .notNull()
      .references(() => stands.id, { onDelete: 'cascade' }),
    sectionId: ref('section_id')
      .notNull()
      .references(() => sections.id, { onDelete: 'cascade' }),
    startsAt: timestamp('starts_at', { fsp: 3, mode: 'date' }).notNull(),
    minutes: int('minutes').notNull(),
    cancelledAt: timestamp('cancelled_at', { fsp: 3, mode: 'date' }),
    cancelReason: varchar('cancel_reason', { length: 500 }),
    createdBy: ref('created_by').references(() => users.id, { onDelete: 'set null' }),
    ...timestamps,
  },
  (t) => [
    uniqueIndex('stand_slots_stand_start_uq').on(t.standId, t.startsAt),
    index('stand_slots_section_start_idx').on(t.sectionId, t.startsAt),
    index('stand_slots_start_idx').on(t.startsAt),
  ],
)

import { sql } from 'drizzle-orm'
import { bigint, index, mysqlEnum, mysqlTable, timestamp, uniqueIndex, varchar } from 'drizzle-orm/mysql-core'
import { id, ref, timestamps } from './columns'
import { labGroups } from './lab-groups'
import { modules } from './modules'
import { standSlots } from './stands'
import { users } from './users'

export const BOOKING_STATUSES = ['active', 'cancelled', 'moved'] as const

/**
 * A lab group's hold on a stand slot for one run of a lab sheet. A cancelled or moved booking keeps
 * its row (with who, when and why); a move makes a new active booking on the new slot.
 *
 * Two groups can never hold the same slot: `active_slot_id` is the slot while the booking is active
 * and NULL otherwise, and its unique key makes MariaDB refuse a second active holder whatever the
 * timing of the requests.
 */
export const bookings = mysqlTable(
  'bookings',
  {
    id: id(),
    slotId: ref('slot_id')
      .notNull()
      .references(() => standSlots.id, { onDelete: 'cascade' }),
    labGroupId: ref('lab_group_id')
      .notNull()
      .references(() => labGroups.id, { onDelete: 'cascade' }),
    moduleId: ref('module_id')
      .notNull()
      .references(() => modules.id, { onDelete: 'cascade' }),
    status: mysqlEnum('status', BOOKING_STATUSES).notNull().default('active'),
    activeSlotId: bigint('active_slot_id', { mode: 'number', unsigned: true }).generatedAlwaysAs(
      sql`CASE WHEN status = 'active' THEN slot_id END`,
      { mode: 'stored' },
    ),
    bookedBy: ref('booked_by').references(() => users.id, { onDelete: 'set null' }),
    endedBy: ref('ended_by').references(() => users.id, { onDelete: 'set null' }),
    endedAt: timestamp('ended_at', { fsp: 3, mode: 'date' }),
    /** Why staff cancelled or moved it (e-mailed to the group); empty when the group cancelled. */
    reason: varchar('reason', { length: 500 }),
    /** The booking a move made (status 'moved' only). */
    movedToId: ref('moved_to_id'),
    ...timestamps,
  },
  (t) => [
    uniqueIndex('bookings_active_slot_uq').on(t.activeSlotId),
    index('bookings_slot_idx').on(t.slotId),
    index('bookings_group_module_idx').on(t.labGroupId, t.moduleId, t.status),
  ],
)

/** Groups waiting for a slot that is taken, first come first served. */
export const bookingWaitlist = mysqlTable(
  'booking_waitlist',
  {
    id: id(),
    slotId: ref('slot_id')
      .notNull()
      .references(() => standSlots.id, { onDelete: 'cascade' }),
    labGroupId: ref('lab_group_id')
      .notNull()
      .references(() => labGroups.id, { onDelete: 'cascade' }),
    moduleId: ref('module_id')
      .notNull()
      .references(() => modules.id, { onDelete: 'cascade' }),
    addedBy: ref('added_by').references(() => users.id, { onDelete: 'set null' }),
    createdAt: timestamp('created_at', { fsp: 3, mode: 'date' })
      .notNull()
      .default(sql`CURRENT_TIMESTAMP(3)`),
  },
  (t) => [uniqueIndex('booking_waitlist_slot_group_uq').on(t.slotId, t.labGroupId)],
)

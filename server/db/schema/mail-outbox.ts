import { sql } from 'drizzle-orm'
import { index, int, mysqlEnum, mysqlTable, text, timestamp, uniqueIndex, varchar } from 'drizzle-orm/mysql-core'
import { id, timestamps } from './columns'

export const MAIL_STATUSES = ['pending', 'sending', 'sent', 'failed'] as const

/**
 * Mail to send, written in the same transaction as the change it reports. Workers claim rows
 * with SELECT … FOR UPDATE SKIP LOCKED, so two server processes never send the same message.
 */
export const mailOutbox = mysqlTable(
  'mail_outbox',
  {
    id: id(),
    /** What caused the message and for which item, e.g. "module-published:42"; with the
     * recipient it is unique, so retrying a business action cannot queue a message twice. */
    dedupeKey: varchar('dedupe_key', { length: 120 }).notNull(),
    toAddress: varchar('to_address', { length: 254 }).notNull(),
    toName: varchar('to_name', { length: 120 }).notNull().default(''),
    subject: varchar('subject', { length: 250 }).notNull(),
    textBody: text('text_body').notNull(),
    htmlBody: text('html_body').notNull(),
    status: mysqlEnum('status', MAIL_STATUSES).notNull().default('pending'),
    attempts: int('attempts').notNull().default(0),
    lastError: varchar('last_error', { length: 1000 }),
    nextAttemptAt: timestamp('next_attempt_at', { fsp: 3, mode: 'date' })
      .notNull()
      .default(sql`CURRENT_TIMESTAMP(3)`),
    claimedAt: timestamp('claimed_at', { fsp: 3, mode: 'date' }),
    sentAt: timestamp('sent_at', { fsp: 3, mode: 'date' }),
    ...timestamps,
  },
  (t) => [
    uniqueIndex('mail_outbox_dedupe_to_uq').on(t.dedupeKey, t.toAddress),
    index('mail_outbox_status_next_idx').on(t.status, t.nextAttemptAt),
  ],
)

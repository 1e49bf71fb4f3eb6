import { sql } from 'drizzle-orm'
import { bigint, timestamp } from 'drizzle-orm/mysql-core'

/** Surrogate key: BIGINT UNSIGNED AUTO_INCREMENT, read as a JS number (ids stay far below 2^53). */
export const id = () => bigint('id', { mode: 'number', unsigned: true }).autoincrement().primaryKey()

/** Foreign-key column of the same type as `id()`. */
export const ref = (name: string) => bigint(name, { mode: 'number', unsigned: true })

/** created_at / updated_at with millisecond precision, maintained by MariaDB. */
export const timestamps = {
  createdAt: timestamp('created_at', { fsp: 3, mode: 'date' })
    .notNull()
    .default(sql`CURRENT_TIMESTAMP(3)`),
  updatedAt: timestamp('updated_at', { fsp: 3, mode: 'date' })
    .notNull()
    .default(sql`CURRENT_TIMESTAMP(3)`)
    .$onUpdate(() => new Date()),
}

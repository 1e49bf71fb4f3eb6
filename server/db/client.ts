import { drizzle } from 'drizzle-orm/mysql2'
import type { MySql2Database } from 'drizzle-orm/mysql2'
import mysql from 'mysql2/promise'
import type { DbConnectionOptions } from '../config'
import * as schema from './schema'
import { withTimeouts } from './timeouts'
import type { DbTimeouts } from './timeouts'

export type Database = MySql2Database<typeof schema>
/** The handle passed to `db.transaction(async (tx) => …)`. */
export type Transaction = Parameters<Parameters<Database['transaction']>[0]>[0]
/** Either the database or an open transaction: repositories accept both. */
export type Executor = Database | Transaction

export interface DbHandle {
  db: Database
  pool: mysql.Pool
  close: () => Promise<void>
}

export function createDb(options: DbConnectionOptions & { poolSize?: number; timeouts?: DbTimeouts }): DbHandle {
  const pool = mysql.createPool({
    host: options.host,
    port: options.port,
    user: options.user,
    password: options.password,
    database: options.database,
    connectionLimit: options.poolSize ?? 10,
    // Fail fast when the server is down so requests get a 503 quickly instead of hanging.
    connectTimeout: 3000,
    timezone: 'Z',
    dateStrings: false,
    enableKeepAlive: true,
  })
  // MariaDB lacks LATERAL joins; 'planetscale' mode makes relational queries avoid them.
  // https://orm.drizzle.team/docs/rqb
  const db = drizzle(options.timeouts ? withTimeouts(pool, options.timeouts) : pool, { schema, mode: 'planetscale' })
  return { db, pool, close: () => pool.end() }
}

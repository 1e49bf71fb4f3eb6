// Applies the committed Drizzle migrations in drizzle/ to the configured database.
// https://orm.drizzle.team/docs/migrations
import { migrate } from 'drizzle-orm/mysql2/migrator'
import { loadDbOptions } from '../server/config'
import { createDb } from '../server/db/client'

const handle = createDb(loadDbOptions())
try {
  await migrate(handle.db, { migrationsFolder: new URL('../drizzle', import.meta.url).pathname })
  console.log('[isentrope] migrations applied')
} finally {
  await handle.close()
}

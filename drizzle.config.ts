import { defineConfig } from 'drizzle-kit'

// https://orm.drizzle.team/docs/drizzle-config-file
// Only `generate` is used (never `push`); migrations are applied by scripts/migrate.ts.
export default defineConfig({
  // drizzle-kit 0.31 has no 'mariadb' dialect; 'mysql' generates SQL MariaDB 10.11 accepts.
  dialect: 'mysql',
  schema: './server/db/schema/index.ts',
  out: './drizzle',
  // The session store owns its `sessions` table; keep drizzle-kit from touching it.
  tablesFilter: ['!sessions'],
  casing: 'snake_case',
})

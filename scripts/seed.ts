// Seeds the demo course once. Running it again changes nothing (it looks for the course first).
import { loadDbOptions } from '../server/config'
import { createDb } from '../server/db/client'
import { seedDemo } from './demo/seed-demo'

const handle = createDb(loadDbOptions())
try {
  const result = await seedDemo(handle.db, process.env.DEMO_PASSWORD)
  console.log(
    result.created
      ? `[isentrope] demo course seeded (${result.users} people)`
      : result.addedModules
        ? '[isentrope] demo course present; added its modules and seeded hand-ins'
        : '[isentrope] demo course already present; nothing changed',
  )
} finally {
  await handle.close()
}

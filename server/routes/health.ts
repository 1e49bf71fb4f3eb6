import { Router } from 'express'
import { sql } from 'drizzle-orm'
import type { Database } from '../db/client'

/** GET /api/health — anyone; 200 when the database answers, else 503 via the error middleware. */
export function healthRoutes(db: Database): Router {
  const r = Router()
  r.get('/', async (_req, res) => {
    await db.execute(sql`SELECT 1`)
    res.json({ status: 'ok', database: 'up' })
  })
  return r
}

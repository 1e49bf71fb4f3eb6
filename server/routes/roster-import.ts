import { Router } from 'express'
import { RosterImportRequestSchema } from '../../shared/schemas/roster-import'
import type { Database } from '../db/client'
import { INSTRUCTOR, courseMember, enrollmentOf } from '../middleware/authorize'
import { valid, validate } from '../middleware/validate'
import type { RosterImportOptions } from '../services/roster-import-service'
import { confirmRosterImport, previewRosterImport } from '../services/roster-import-service'

/**
 * Mounted at /api/courses/:courseId/roster/import. Body of both: `{ csv }` (JSON, the CSV text;
 * the app-wide 1 MB JSON parser covers the 256 KB CSV limit even with JSON escaping). Who may call:
 * - POST /preview   instructor of the course: what the import would do; writes nothing
 * - POST /          instructor of the course: imports (all rows or none), queues invitations
 */
export function rosterImportRoutes(db: Database, opts: RosterImportOptions & { onMailQueued: () => void }): Router {
  const r = Router({ mergeParams: true })
  const body = validate('body', RosterImportRequestSchema)

  r.post('/preview', courseMember(db, INSTRUCTOR), body, async (_req, res) => {
    const { csv } = valid(res, 'body', RosterImportRequestSchema)
    res.json(await previewRosterImport(db, enrollmentOf(res), csv, opts))
  })

  r.post('/', courseMember(db, INSTRUCTOR), body, async (req, res) => {
    const { csv } = valid(res, 'body', RosterImportRequestSchema)
    const e = enrollmentOf(res)
    const result = await confirmRosterImport(db, e, csv, opts)
    req.log.info({ courseId: e.courseId, ...result }, 'roster imported')
    if (result.invitationsSent + result.enrollmentMailsSent > 0) opts.onMailQueued()
    res.json(result)
  })

  return r
}

import { Router } from 'express'
import { RosterImportRequestSchema } from '../../shared/schemas/roster-import'
import type { Database } from '../db/client'
import { INSTRUCTOR, courseMember, enrollmentOf } from '../middleware/authorize'
import { valid, validate } from '../middleware/validate'
import type { RosterImportRequest } from '../../shared/schemas/roster-import'
import type { RosterInput } from '../services/roster-import-plan'
import type { RosterImportOptions } from '../services/roster-import-service'
import { confirmRosterImport, previewRosterImport } from '../services/roster-import-service'

/** The file's bytes go to the reader as bytes, so the server detects the encoding itself. */
const inputOf = (b: RosterImportRequest): RosterInput => ({
  data: b.file !== undefined ? new Uint8Array(Buffer.from(b.file, 'base64')) : (b.csv ?? ''),
  locale: b.locale,
  skip: b.skip,
})

/**
 * Mounted at /api/courses/:courseId/roster/import. Body of both: `{ file }` (the file's bytes in
 * base64) or `{ csv }` (text typed or pasted), optional `locale`, and on the confirm `skip` (moves
 * left out). JSON: the app-wide 1 MB parser covers the 256 KB limit in base64 or JSON escaping.
 * Who may call:
 * - POST /preview   instructor of the course: what the import would do; writes nothing
 * - POST /          instructor of the course: imports (all rows or none), queues invitations
 */
export function rosterImportRoutes(db: Database, opts: RosterImportOptions & { onMailQueued: () => void }): Router {
  const r = Router({ mergeParams: true })
  const body = validate('body', RosterImportRequestSchema)

  r.post('/preview', courseMember(db, INSTRUCTOR), body, async (_req, res) => {
    const body = valid(res, 'body', RosterImportRequestSchema)
    res.json(await previewRosterImport(db, enrollmentOf(res), inputOf({ ...body, skip: [] }), opts))
  })

  r.post('/', courseMember(db, INSTRUCTOR), body, async (req, res) => {
    const e = enrollmentOf(res)
    const result = await confirmRosterImport(db, e, inputOf(valid(res, 'body', RosterImportRequestSchema)), opts)
    req.log.info({ courseId: e.courseId, ...result }, 'roster imported')
    if (result.invitationsSent + result.enrollmentMailsSent > 0) opts.onMailQueued()
    res.json(result)
  })

  return r
}

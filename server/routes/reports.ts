import { pipeline } from 'node:stream/promises'
import { Router } from 'express'
import { ModuleParamsSchema } from '../../shared/schemas/modules'
import { SubmissionParamsSchema } from '../../shared/schemas/submissions'
import type { Database } from '../db/client'
import { ANY_MEMBER, INSTRUCTOR, courseMember, enrollmentOf } from '../middleware/authorize'
import { valid, validate } from '../middleware/validate'
import { feedbackReportPdf, moduleReportsZip } from '../services/report-service'

/**
 * Mounted at /api/courses/:courseId, before the module router. Who may call:
 * - GET /submissions/:submissionId/report.pdf   whoever may read the hand-in: its submitter, their
 *   lab group, the instructors, the TAs of the submitter's section (others 404). A student only
 *   once it is graded and its results are visible to them (409 with the reason otherwise).
 * - GET /modules/:moduleId/reports.zip          instructor (TA and student 403): every lab group's or
 *   student's counted report of the module, one PDF each, streamed.
 */
export function reportRoutes(db: Database): Router {
  const r = Router({ mergeParams: true })

  r.get(
    '/submissions/:submissionId/report.pdf',
    courseMember(db, ANY_MEMBER),
    validate('params', SubmissionParamsSchema),
    async (_req, res) => {
      const { submissionId } = valid(res, 'params', SubmissionParamsSchema)
      const { filename, pdf } = await feedbackReportPdf(db, enrollmentOf(res), submissionId)
      // Results and comments are personal: no shared caches.
      res.attachment(filename).type('application/pdf').set('Cache-Control', 'private, no-store').send(pdf)
    },
  )

  r.get(
    '/modules/:moduleId/reports.zip',
    courseMember(db, INSTRUCTOR),
    validate('params', ModuleParamsSchema),
    async (req, res) => {
      const { moduleId } = valid(res, 'params', ModuleParamsSchema)
      const { filename, count, stream } = await moduleReportsZip(db, enrollmentOf(res), moduleId)
      res.attachment(filename).type('application/zip').set('Cache-Control', 'private, no-store')
      try {
        await pipeline(stream, res)
        req.log.info({ moduleId, reports: count }, 'report archive sent')
      } catch (err) {
        // Headers are gone: the download is cut off, which the browser shows as a failed download.
        req.log.warn({ err, moduleId }, 'report archive stopped')
      }
    },
  )

  return r
}

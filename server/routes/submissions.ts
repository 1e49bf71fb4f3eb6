import { Router } from 'express'
import { ModuleParamsSchema } from '../../shared/schemas/modules'
import { HandInRunFieldSchema } from '../../shared/schemas/runs'
import {
  SubmissionFileParamsSchema,
  SubmissionImageParamsSchema,
  SubmissionParamsSchema,
  SubmissionPayloadSchema,
  isAwaitingGrade,
} from '../../shared/schemas/submissions'
import type { Database } from '../db/client'
import { AppError } from '../errors'
import { ANY_MEMBER, courseMember, enrollmentOf } from '../middleware/authorize'
import { handInUpload } from '../middleware/hand-in-upload'
import { valid, validate } from '../middleware/validate'
import { handInFileFields } from '../services/hand-in-spec'
import {
  mySubmissions,
  submissionDetail,
  submissionFile,
  submissionImage,
  submitHandIn,
} from '../services/submission-service'
import type { GradingContext } from '../services/grading-service'

interface Opts {
  uploadLimitMb: number
  grading: GradingContext
  onHandInStored: () => void
}

/**
 * Who may call:
 * - POST /api/courses/:courseId/modules/:moduleId/submissions        student of the course (multipart hand-in;
 *   `runRecordId`: the group's signed-off stand run, required when the sheet says requiresSignedRun)
 * - GET  /api/courses/:courseId/modules/:moduleId/submissions/mine   enrolled (a student's own or lab group's attempts)
 * - GET  /api/courses/:courseId/submissions/:submissionId             its submitter, their lab group, or course staff (others 404)
 * - GET  /api/courses/:courseId/submissions/:submissionId/files/:fileId   same as above (the raw upload)
 * - GET  /api/courses/:courseId/submissions/:submissionId/images/:imageKey   same as above (the stored photograph)
 */
export function handInRoutes(db: Database, opts: Opts): Router {
  const r = Router({ mergeParams: true })
  // The body is read only after the module's declared files are known; see the middleware.
  const upload = handInUpload({
    limitMb: opts.uploadLimitMb,
    fileFields: (_req, res) => {
      const { moduleId } = valid(res, 'params', ModuleParamsSchema)
      return handInFileFields(db, enrollmentOf(res).courseId, moduleId)
    },
  })

  r.post(
    '/modules/:moduleId/submissions',
    courseMember(db, ANY_MEMBER),
    validate('params', ModuleParamsSchema),
    upload,
    async (req, res) => {
      const { moduleId } = valid(res, 'params', ModuleParamsSchema)
      const body = req.body as Record<string, unknown>
      let raw: unknown
      try {
        raw = JSON.parse(typeof body.payload === 'string' ? body.payload : '')
      } catch {
        throw new AppError('validation_failed', 'payload: the form data is missing or not valid JSON.', 400, {
          issues: [{ field: 'payload', message: 'not valid JSON' }],
        })
      }
      const payload = SubmissionPayloadSchema.parse(raw)
      const { runRecordId } = HandInRunFieldSchema.parse({ runRecordId: body.runRecordId || undefined })
      const files = ((req.files as Express.Multer.File[] | undefined) ?? []).map((f) => ({
        field: f.fieldname,
        filename: f.originalname,
        contentType: f.mimetype,
        bytes: f.buffer,
      }))
      const detail = await submitHandIn(db, enrollmentOf(res), moduleId, payload, files, {
        grading: opts.grading,
        runRecordId,
      })
      // Stored: when this request could not grade it, the background grader does.
      if (isAwaitingGrade(detail.status)) opts.onHandInStored()
      res.status(201).json(detail)
    },
  )

  r.get(
    '/modules/:moduleId/submissions/mine',
    courseMember(db, ANY_MEMBER),
    validate('params', ModuleParamsSchema),
    async (_req, res) => {
      const { moduleId } = valid(res, 'params', ModuleParamsSchema)
      res.json(await mySubmissions(db, enrollmentOf(res), moduleId))
    },
  )

  r.get(
    '/submissions/:submissionId',
    courseMember(db, ANY_MEMBER),
    validate('params', SubmissionParamsSchema),
    async (_req, res) => {
      const { submissionId } = valid(res, 'params', SubmissionParamsSchema)
      res.json(await submissionDetail(db, enrollmentOf(res), submissionId))
    },
  )

  r.get(
    '/submissions/:submissionId/files/:fileId',
    courseMember(db, ANY_MEMBER),
    validate('params', SubmissionFileParamsSchema),
    async (_req, res) => {
      const { submissionId, fileId } = valid(res, 'params', SubmissionFileParamsSchema)
      const f = await submissionFile(db, enrollmentOf(res), submissionId, fileId)
      // Served as an attachment with a fixed type: the browser never renders student content.
      res.attachment(f.filename).type('text/csv; charset=utf-8').set('X-Content-Type-Options', 'nosniff').send(f.bytes)
    },
  )

  r.get(
    '/submissions/:submissionId/images/:imageKey',
    courseMember(db, ANY_MEMBER),
    validate('params', SubmissionImageParamsSchema),
    async (_req, res) => {
      const { submissionId, imageKey } = valid(res, 'params', SubmissionImageParamsSchema)
      const image = await submissionImage(db, enrollmentOf(res), submissionId, imageKey)
      // The stored picture was decoded and re-encoded by the server, so it is a plain PNG or JPEG
      // and safe to show inline; the type is fixed and never sniffed.
      res
        .type(image.contentType)
        .set('X-Content-Type-Options', 'nosniff')
        .set('Cache-Control', 'private, max-age=3600')
        .set(
          'Content-Disposition',
          `inline; filename="${imageKey}${image.contentType === 'image/png' ? '.png' : '.jpg'}"`,
        )
        .send(image.bytes)
    },
  )

  return r
}

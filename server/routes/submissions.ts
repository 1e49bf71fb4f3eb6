import { Router } from 'express'
import type { NextFunction, Request, Response } from 'express'
import multer from 'multer'
import { ModuleParamsSchema } from '../../shared/schemas/modules'
import { SubmissionFileParamsSchema, SubmissionParamsSchema, SubmissionPayloadSchema, isAwaitingGrade } from '../../shared/schemas/submissions'
import type { Database } from '../db/client'
import { AppError } from '../errors'
import { ANY_MEMBER, courseMember, enrollmentOf } from '../middleware/authorize'
import { valid, validate } from '../middleware/validate'
import { mySubmissions, submissionDetail, submissionFile, submitHandIn } from '../services/submission-service'
import type { GradingContext } from '../services/grading-service'

interface Opts {
  uploadLimitMb: number
  grading: GradingContext
  onHandInStored: () => void
}

/**
 * Who may call:
 * - POST /api/courses/:courseId/modules/:moduleId/submissions        student of the course (multipart hand-in)
 * - GET  /api/courses/:courseId/modules/:moduleId/submissions/mine   enrolled (a student's own or lab group's attempts)
 * - GET  /api/courses/:courseId/submissions/:submissionId             its submitter, their lab group, or course staff (others 404)
 * - GET  /api/courses/:courseId/submissions/:submissionId/files/:fileId   same as above (the raw upload)
 */
export function handInRoutes(db: Database, opts: Opts): Router {
  const r = Router({ mergeParams: true })
  const limitBytes = Math.round(opts.uploadLimitMb * 1024 * 1024)
  // Files stay in memory until the transaction stores them; the size limit bounds that memory.
  // https://github.com/expressjs/multer#limits
  const upload = multer({
    storage: multer.memoryStorage(),
    limits: { fileSize: limitBytes, files: 5, fields: 5, fieldSize: 2 * 1024 * 1024, parts: 12 },
  }).any()

  /** Refuses an oversized upload from its Content-Length before reading any of it. */
  const earlySizeCheck = (req: Request, _res: Response, next: NextFunction) => {
    const declared = Number(req.headers['content-length'] ?? 0)
    if (declared > limitBytes + 2 * 1024 * 1024) {
      throw new AppError('upload_too_large', `The upload is ${(declared / 1048576).toFixed(0)} MB; the limit is ${opts.uploadLimitMb} MB per hand-in.`, 413)
    }
    next()
  }

  const parseUpload = (req: Request, res: Response, next: NextFunction) => {
    upload(req, res, (err: unknown) => {
      if (!err) return next()
      if (err instanceof multer.MulterError) {
        if (err.code === 'LIMIT_FILE_SIZE') {
          return next(new AppError('upload_too_large', `${err.field ?? 'The file'} is larger than the ${opts.uploadLimitMb} MB limit.`, 413, { field: err.field }))
        }
        return next(new AppError('bad_upload', `The upload was refused: ${err.message}.`, 400, { field: err.field }))
      }
      next(err)
    })
  }

  r.post(
    '/modules/:moduleId/submissions',
    courseMember(db, ANY_MEMBER),
    validate('params', ModuleParamsSchema),
    earlySizeCheck,
    parseUpload,
    async (req, res) => {
      const { moduleId } = valid(res, 'params', ModuleParamsSchema)
      const body = req.body as Record<string, unknown>
      let raw: unknown
      try {
        raw = JSON.parse(typeof body.payload === 'string' ? body.payload : '')
      } catch {
        throw new AppError('validation_failed', 'payload: the form data is missing or not valid JSON.', 400, { issues: [{ field: 'payload', message: 'not valid JSON' }] })
      }
      const payload = SubmissionPayloadSchema.parse(raw)
      const files = ((req.files as Express.Multer.File[] | undefined) ?? []).map((f) => ({
        field: f.fieldname,
        filename: f.originalname,
        contentType: f.mimetype,
        bytes: f.buffer,
      }))
      const detail = await submitHandIn(db, enrollmentOf(res), moduleId, payload, files, { grading: opts.grading })
      // Stored: when this request could not grade it, the background grader does.
      if (isAwaitingGrade(detail.status)) opts.onHandInStored()
      res.status(201).json(detail)
    },
  )

  r.get('/modules/:moduleId/submissions/mine', courseMember(db, ANY_MEMBER), validate('params', ModuleParamsSchema), async (_req, res) => {
    const { moduleId } = valid(res, 'params', ModuleParamsSchema)
    res.json(await mySubmissions(db, enrollmentOf(res), moduleId))
  })

  r.get('/submissions/:submissionId', courseMember(db, ANY_MEMBER), validate('params', SubmissionParamsSchema), async (_req, res) => {
    const { submissionId } = valid(res, 'params', SubmissionParamsSchema)
    res.json(await submissionDetail(db, enrollmentOf(res), submissionId))
  })

  r.get('/submissions/:submissionId/files/:fileId', courseMember(db, ANY_MEMBER), validate('params', SubmissionFileParamsSchema), async (_req, res) => {
    const { submissionId, fileId } = valid(res, 'params', SubmissionFileParamsSchema)
    const f = await submissionFile(db, enrollmentOf(res), submissionId, fileId)
    // Served as an attachment with a fixed type: the browser never renders student content.
    res.attachment(f.filename).type('text/csv; charset=utf-8').set('X-Content-Type-Options', 'nosniff').send(f.bytes)
  })

  return r
}

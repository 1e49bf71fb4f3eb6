import { Router, json } from 'express'
import type { CourseRole } from '../../shared/schemas/auth'
import { CourseIdParamsSchema } from '../../shared/schemas/courses'
import {
  GradebookQuerySchema,
  RecheckAnswerSchema,
  RecheckParamsSchema,
  RecheckRequestSchema,
  WeightSchema,
} from '../../shared/schemas/grades'
import { ModuleParamsSchema } from '../../shared/schemas/modules'
import { SubmissionParamsSchema } from '../../shared/schemas/submissions'
import type { Database } from '../db/client'
import { ANY_MEMBER, INSTRUCTOR, STAFF, courseMember, enrollmentOf } from '../middleware/authorize'
import { valid, validate } from '../middleware/validate'
import { gradebookCsv } from '../services/gradebook-csv'
import { changeWeight, gradebook, myGrades, releaseGrades, withdrawRelease } from '../services/grades-service'
import { answerRecheck, recheckStatus, requestRecheck } from '../services/recheck-service'

interface Opts {
  appUrl: string
  onMailQueued: () => void
}

const STUDENT: readonly CourseRole[] = ['student']

/**
 * Mounted at /api/courses/:courseId. Who may call:
 * - GET    /gradebook                                   staff (a TA: the students of their own section; another section → 403)
 * - GET    /gradebook.csv                               staff, same scope and filters (an attachment)
 * - PUT    /gradebook/modules/:moduleId/weight          instructor
 * - POST   /gradebook/modules/:moduleId/release         instructor (e-mails every student once; a repeat is a no-op; a draft → 409)
 * - DELETE /gradebook/modules/:moduleId/release         instructor (withdraws the release, no e-mail)
 * - GET    /my-grades                                   student (staff → 403: they use the gradebook)
 * - GET    /submissions/:submissionId/recheck           the student who handed it in (or their lab group for a group
 *                                                       hand-in), or staff in scope as for review; others 404
 * - POST   /submissions/:submissionId/recheck           that student or group member (staff → 403; someone else's → 404)
 * - POST   /submissions/:submissionId/recheck/:requestId/answer   staff (a TA only for their own section; others 404)
 */
export function gradeRoutes(db: Database, opts: Opts): Router {
  const r = Router({ mergeParams: true })
  // The /submissions/* paths skip the app's JSON parser (they share a prefix with multipart
  // hand-ins), so these routes parse their own small bodies.
  const jsonBody = json({ limit: '100kb' })
  const courseParams = validate('params', CourseIdParamsSchema)
  const moduleParams = validate('params', ModuleParamsSchema)

  r.get(
    '/gradebook',
    courseMember(db, STAFF),
    courseParams,
    validate('query', GradebookQuerySchema),
    async (_req, res) => {
      res.json(await gradebook(db, enrollmentOf(res), valid(res, 'query', GradebookQuerySchema)))
    },
  )

  r.get(
    '/gradebook.csv',
    courseMember(db, STAFF),
    courseParams,
    validate('query', GradebookQuerySchema),
    async (_req, res) => {
      const { filename, csv } = await gradebookCsv(db, enrollmentOf(res), valid(res, 'query', GradebookQuerySchema))
      res.attachment(filename).type('text/csv; charset=utf-8').set('X-Content-Type-Options', 'nosniff').send(csv)
    },
  )

  r.put(
    '/gradebook/modules/:moduleId/weight',
    courseMember(db, INSTRUCTOR),
    moduleParams,
    validate('body', WeightSchema),
    async (_req, res) => {
      const { moduleId } = valid(res, 'params', ModuleParamsSchema)
      const { weight } = valid(res, 'body', WeightSchema)
      await changeWeight(db, enrollmentOf(res), moduleId, weight)
      res.json({ moduleId, weight })
    },
  )

  r.post('/gradebook/modules/:moduleId/release', courseMember(db, INSTRUCTOR), moduleParams, async (_req, res) => {
    const { moduleId } = valid(res, 'params', ModuleParamsSchema)
    const result = await releaseGrades(db, enrollmentOf(res), moduleId, opts.appUrl)
    if (result.emailed > 0) opts.onMailQueued()
    res.json(result)
  })

  r.delete('/gradebook/modules/:moduleId/release', courseMember(db, INSTRUCTOR), moduleParams, async (_req, res) => {
    const { moduleId } = valid(res, 'params', ModuleParamsSchema)
    res.json(await withdrawRelease(db, enrollmentOf(res), moduleId))
  })

  r.get('/my-grades', courseMember(db, STUDENT), courseParams, async (_req, res) => {
    res.json(await myGrades(db, enrollmentOf(res)))
  })

  r.get(
    '/submissions/:submissionId/recheck',
    courseMember(db, ANY_MEMBER),
    validate('params', SubmissionParamsSchema),
    async (_req, res) => {
      res.json(await recheckStatus(db, enrollmentOf(res), valid(res, 'params', SubmissionParamsSchema).submissionId))
    },
  )

  r.post(
    '/submissions/:submissionId/recheck',
    courseMember(db, STUDENT),
    validate('params', SubmissionParamsSchema),
    jsonBody,
    validate('body', RecheckRequestSchema),
    async (_req, res) => {
      const { submissionId } = valid(res, 'params', SubmissionParamsSchema)
      res
        .status(201)
        .json(
          await requestRecheck(db, enrollmentOf(res), submissionId, valid(res, 'body', RecheckRequestSchema).message),
        )
    },
  )

  r.post(
    '/submissions/:submissionId/recheck/:requestId/answer',
    courseMember(db, STAFF),
    validate('params', RecheckParamsSchema),
    jsonBody,
    validate('body', RecheckAnswerSchema),
    async (_req, res) => {
      const { submissionId, requestId } = valid(res, 'params', RecheckParamsSchema)
      const result = await answerRecheck(
        db,
        enrollmentOf(res),
        submissionId,
        requestId,
        valid(res, 'body', RecheckAnswerSchema).answer,
        opts.appUrl,
      )
      opts.onMailQueued()
      res.json(result)
    },
  )

  return r
}

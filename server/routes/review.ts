import { Router, json } from 'express'
import { CourseIdParamsSchema } from '../../shared/schemas/courses'
import {
  CommentSchema,
  FlagActionSchema,
  FlagParamsSchema,
  OverrideSchema,
  ReviewQuerySchema,
  ReviewStatusSchema,
} from '../../shared/schemas/review'
import { SubmissionParamsSchema } from '../../shared/schemas/submissions'
import type { Database } from '../db/client'
import { STAFF, courseMember, enrollmentOf } from '../middleware/authorize'
import { valid, validate } from '../middleware/validate'
import {
  addComment,
  changeFlag,
  overridePoints,
  reviewExtras,
  reviewQueue,
  setReviewStatus,
} from '../services/review-service'

/**
 * Mounted at /api/courses/:courseId. Who may call (all: staff of the course; a TA only for the
 * submissions of their own section, others answer 404):
 * - GET  /review                                        the review queue (paged, sorted, filtered)
 * - GET  /submissions/:submissionId/review              audit trail, comments, revision
 * - POST /submissions/:submissionId/overrides           override a check's points or the total, with a reason
 * - POST /submissions/:submissionId/comments            comment to the student (Markdown)
 * - POST /submissions/:submissionId/flags/:flagId       resolve or re-open a flag
 * - POST /submissions/:submissionId/review-status       open / in review / resolved
 */
export function reviewRoutes(db: Database): Router {
  const r = Router({ mergeParams: true })
  // Parsed per route: this router shares its mount point with others that take larger bodies.
  const jsonBody = json({ limit: '100kb' })
  const sub = validate('params', SubmissionParamsSchema)

  r.get(
    '/review',
    courseMember(db, STAFF),
    validate('params', CourseIdParamsSchema),
    validate('query', ReviewQuerySchema),
    async (_req, res) => {
      res.json(await reviewQueue(db, enrollmentOf(res), valid(res, 'query', ReviewQuerySchema)))
    },
  )

  r.get('/submissions/:submissionId/review', courseMember(db, STAFF), sub, async (_req, res) => {
    res.json(await reviewExtras(db, enrollmentOf(res), valid(res, 'params', SubmissionParamsSchema).submissionId))
  })

  r.post(
    '/submissions/:submissionId/overrides',
    courseMember(db, STAFF),
    sub,
    jsonBody,
    validate('body', OverrideSchema),
    async (_req, res) => {
      const { submissionId } = valid(res, 'params', SubmissionParamsSchema)
      await overridePoints(db, enrollmentOf(res), submissionId, valid(res, 'body', OverrideSchema))
      res.json(await reviewExtras(db, enrollmentOf(res), submissionId))
    },
  )

  r.post(
    '/submissions/:submissionId/comments',
    courseMember(db, STAFF),
    sub,
    jsonBody,
    validate('body', CommentSchema),
    async (_req, res) => {
      const { submissionId } = valid(res, 'params', SubmissionParamsSchema)
      const { body, revision } = valid(res, 'body', CommentSchema)
      await addComment(db, enrollmentOf(res), submissionId, body, revision)
      res.status(201).json(await reviewExtras(db, enrollmentOf(res), submissionId))
    },
  )

  r.post(
    '/submissions/:submissionId/flags/:flagId',
    courseMember(db, STAFF),
    validate('params', FlagParamsSchema),
    jsonBody,
    validate('body', FlagActionSchema),
    async (_req, res) => {
      const { submissionId, flagId } = valid(res, 'params', FlagParamsSchema)
      const { action, revision } = valid(res, 'body', FlagActionSchema)
      await changeFlag(db, enrollmentOf(res), submissionId, flagId, action, revision)
      res.json(await reviewExtras(db, enrollmentOf(res), submissionId))
    },
  )

  r.post(
    '/submissions/:submissionId/review-status',
    courseMember(db, STAFF),
    sub,
    jsonBody,
    validate('body', ReviewStatusSchema),
    async (_req, res) => {
      const { submissionId } = valid(res, 'params', SubmissionParamsSchema)
      const { status, revision } = valid(res, 'body', ReviewStatusSchema)
      await setReviewStatus(db, enrollmentOf(res), submissionId, status, revision)
      res.json(await reviewExtras(db, enrollmentOf(res), submissionId))
    },
  )

  return r
}

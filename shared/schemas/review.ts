import { z } from 'zod'
import type { LinkedRunView } from './runs'

/**
 * Where a hand-in stands with the staff: 'none' until a flag or a person opens it, then 'open',
 * 'in-review' while someone works on it, 'resolved' when done. One list for the database column,
 * the server and the pages.
 */
export const REVIEW_STATES = ['none', 'open', 'in-review', 'resolved'] as const
export type ReviewState = (typeof REVIEW_STATES)[number]

/** The states staff may set by hand ('none' is only where a hand-in starts). */
export const SETTABLE_REVIEW_STATES = ['open', 'in-review', 'resolved'] as const
export type SettableReviewState = (typeof SETTABLE_REVIEW_STATES)[number]

/** A flag is open until staff resolve it (and may be reopened). */
export const FLAG_STATUSES = ['open', 'resolved'] as const
export type FlagStatus = (typeof FLAG_STATUSES)[number]

export const REVIEW_SORTS = ['submittedAt', 'score', 'module', 'student'] as const

/** Query of the review queue: server-side paging, sorting and filters. */
export const ReviewQuerySchema = z.object({
  page: z.coerce.number().int().min(1, 'page starts at 1').default(1),
  pageSize: z.coerce.number().int().min(1).max(100, 'pageSize: at most 100 rows per page').default(25),
  sort: z.enum(REVIEW_SORTS).default('submittedAt'),
  order: z.enum(['asc', 'desc']).default('desc'),
  moduleId: z.coerce.number().int().positive().optional(),
  sectionId: z.coerce.number().int().positive().optional(),
  /** A flag code, e.g. thrust-above-ideal or rule:chamber_above_receiver. */
  reason: z.string().max(80).optional(),
  status: z.enum([...SETTABLE_REVIEW_STATES, 'all']).default('open'),
})
export type ReviewQuery = z.infer<typeof ReviewQuerySchema>

export interface ReviewRow {
  submissionId: number
  moduleId: number
  moduleTitle: string
  submittedBy: string
  labGroupName: string | null
  sectionName: string | null
  submittedAt: string
  isLate: boolean
  score: number | null
  maxScore: number | null
  reviewStatus: ReviewState
  flagCodes: string[]
}

/** A flag reason that occurs in the course, with the words of one of its flags (for the filter). */
export interface ReviewReason {
  code: string
  example: string
}

export interface ReviewPage {
  rows: ReviewRow[]
  total: number
  page: number
  pageSize: number
  /** What the filters can offer the caller: the sections they may review, the reasons that occur. */
  facets: { sections: { id: number; name: string }[]; reasons: ReviewReason[] }
}

const reason = z
  .string({ error: 'reason: write why you change the points.' })
  .trim()
  .min(5, 'reason: write why you change the points (at least a few words).')
  .max(2000, 'reason: at most 2000 characters.')

/** Override one check's points or the total; `revision` is the submission revision the editor saw. */
export const OverrideSchema = z.object({
  checkId: z.number().int().positive().nullable(),
  points: z.number({ error: 'points: enter a number.' }).refine(Number.isFinite, 'points: enter a finite number.'),
  reason,
  revision: z.number().int().min(0),
})
export type Override = z.infer<typeof OverrideSchema>

export const CommentSchema = z.object({
  body: z.string().trim().min(1, 'body: the comment is empty.').max(10_000, 'body: at most 10 000 characters.'),
  revision: z.number().int().min(0),
})

export const FlagActionSchema = z.object({
  action: z.enum(['resolve', 'reopen']),
  revision: z.number().int().min(0),
})

export const ReviewStatusSchema = z.object({
  status: z.enum(SETTABLE_REVIEW_STATES),
  revision: z.number().int().min(0),
})

export const FlagParamsSchema = z.object({
  courseId: z.coerce.number().int().positive(),
  submissionId: z.coerce.number().int().positive(),
  flagId: z.coerce.number().int().positive(),
})

export interface GradeChangeView {
  id: number
  target: string
  changedBy: string
  at: string
  oldPoints: number | null
  newPoints: number
  reason: string
}

export interface CommentView {
  id: number
  author: string
  at: string
  /** Sanitised HTML of the Markdown body. */
  html: string
}

/** What staff see beside a submission: the audit trail, the comments and the revision to edit against. */
export interface ReviewExtras {
  revision: number
  reviewStatus: ReviewState
  scoreOverride: number | null
  gradeChanges: GradeChangeView[]
  comments: CommentView[]
  /** The signed-off stand run the hand-in was made against (null: none). */
  run: LinkedRunView | null
}

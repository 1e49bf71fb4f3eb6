import { z } from 'zod'
import type { ReviewState } from './review'

/**
 * The gradebook, grade release, a student's own grades and re-check requests: request schemas
 * (the browser checks forms with the same ones) and the shapes the API answers with.
 */

const optionalId = () =>
  z.coerce.number({ error: 'must be a number.' }).int().positive('must be a positive whole number.').optional()

/** Filters of the gradebook and its CSV export. */
export const GradebookQuerySchema = z.object({
  sectionId: optionalId(),
  labGroupId: optionalId(),
})
export type GradebookQuery = z.infer<typeof GradebookQuerySchema>

export const MAX_WEIGHT = 1000

/**
 * A module's weight in the course total: relative, so only the ratios between modules matter.
 * (Messages leave the field name out: the error middleware puts the path in front.)
 */
export const WeightSchema = z.object({
  weight: z
    .number({ error: 'enter a number (0 or more).' })
    .min(0, 'must be 0 or more; 0 leaves the module out of the total.')
    .max(MAX_WEIGHT, `at most ${MAX_WEIGHT}.`)
    .refine(Number.isFinite, 'enter a finite number.'),
})
export type WeightChange = z.infer<typeof WeightSchema>

export const RECHECK_MESSAGE_MAX = 2000

/** A student's re-check request: what they think is wrong, in their own words. */
export const RecheckRequestSchema = z.object({
  message: z
    .string({ error: 'write what you would like the staff to look at again.' })
    .trim()
    .min(1, 'write what you would like the staff to look at again.')
    .max(RECHECK_MESSAGE_MAX, `at most ${RECHECK_MESSAGE_MAX} characters.`),
})

/** The staff answer to a re-check request (Markdown; sanitised when rendered). */
export const RecheckAnswerSchema = z.object({
  answer: z
    .string({ error: 'write an answer to the student.' })
    .trim()
    .min(1, 'write an answer to the student.')
    .max(10_000, 'at most 10 000 characters.'),
})

export const RecheckParamsSchema = z.object({
  courseId: z.coerce.number().int().positive('courseId must be a positive whole number.'),
  submissionId: z.coerce.number().int().positive('submissionId must be a positive whole number.'),
  requestId: z.coerce.number().int().positive('requestId must be a positive whole number.'),
})

/** The counting rule, in one sentence, shown wherever grades are. */
export const COUNTING_RULE =
  'For each module the latest graded attempt counts (your own, or your lab group’s for group hand-ins): its points after any late penalty, or the staff’s override of the total when there is one.'

/** How the course total treats modules without a counted hand-in. */
export const TOTAL_RULE =
  'The total is the weighted mean of the module percentages. A module past its due date without a graded hand-in counts as 0 %; a module not yet due is left out until it has one.'

/** One student's counted hand-in of one module. */
export interface GradebookCell {
  submissionId: number
  attempt: number
  points: number
  maxScore: number
  /** points / maxScore × 100; null when the module has no points at all. */
  percent: number | null
  /** The total was set by the staff. */
  overridden: boolean
  isLate: boolean
  daysLate: number
  reviewStatus: ReviewState
  recheckOpen: boolean
}

export interface GradebookModule {
  id: number
  title: string
  status: 'published' | 'closed'
  weight: number
  dueAt: string | null
  pastDue: boolean
  releasedAt: string | null
  results: 'immediately' | 'after-due' | 'when-final'
  groupSubmission: boolean
}

export interface GradebookStudent {
  userId: number
  name: string
  email: string
  sectionId: number | null
  sectionName: string | null
  labGroupId: number | null
  labGroupName: string | null
  /** Keyed by module id; a module without a counted hand-in has no entry. */
  cells: Record<string, GradebookCell>
  /** Weighted total in percent; null when no module counts yet. */
  totalPercent: number | null
  /** Modules (by id) whose due date this student has had extended to a time not yet reached. */
  extendedOpen: number[]
}

export interface CheckFailures {
  key: string
  label: string
  fails: number
  /** Counted hand-ins that had this check. */
  attempts: number
}

export interface ModuleStats {
  moduleId: number
  /** Students with a counted hand-in. */
  n: number
  /** Mean and median of the students' percentages; null when n = 0. */
  meanPercent: number | null
  medianPercent: number | null
  /** Ten bins of 10 %: [0, 10), [10, 20), …, [90, 100]. */
  histogram: number[]
  /** Checks failed most often among the counted hand-ins (each group hand-in once), worst first. */
  hardestChecks: CheckFailures[]
}

export interface Gradebook {
  modules: GradebookModule[]
  students: GradebookStudent[]
  stats: ModuleStats[]
  /** What the filters may choose from (a TA: their own section only). */
  sections: { id: number; name: string }[]
  labGroups: { id: number; name: string; sectionId: number | null }[]
  /** The instructor may change weights and release grades. */
  canManage: boolean
  /** Students of the course a release would e-mail. */
  enrolledStudents: number
}

export interface ReleaseResult {
  moduleId: number
  releasedAt: string | null
  /** E-mails queued by this call (0 on a repeat release or a withdrawal). */
  emailed: number
}

export type MyGradeState = 'not-handed-in' | 'awaiting-grade' | 'hidden' | 'provisional' | 'released'

export interface RecheckView {
  id: number
  submissionId: number
  requestedBy: string
  message: string
  status: 'open' | 'answered'
  createdAt: string
  /** Sanitised HTML of the staff answer. */
  answerHtml: string | null
  answeredBy: string | null
  answeredAt: string | null
}

export interface MyGradeRow {
  moduleId: number
  title: string
  weight: number
  dueAt: string | null
  state: MyGradeState
  /** Why the score is not shown yet, in plain words. */
  hiddenReason: string | null
  submissionId: number | null
  attempt: number | null
  points: number | null
  maxScore: number | null
  isLate: boolean
  daysLate: number
  /** The latest re-check request on the counted hand-in (open or answered), if any. */
  recheck: RecheckView | null
}

export interface MyGrades {
  rows: MyGradeRow[]
  /** Weighted total over the modules whose scores are visible (percent); null when none. */
  totalPercent: number | null
}

export interface RecheckStatus {
  /** Whether the caller may ask for a re-check now; `reason` says why not. */
  canRequest: boolean
  reason: string | null
  requests: RecheckView[]
}

/** The review queue's reason for hand-ins with an open re-check request (beside the flag codes). */
export const RECHECK_REASON = 'recheck-requested'

import { z } from 'zod'
import type { UncertaintyContribution } from '../grading/uncertainty'
import type { FlagStatus } from './review'
import type { PressureSense } from '../units'
import { JetMarksSchema, type JetMarks } from '../images/jet-marks'
import { TableKeySchema } from '../modules/spec-names'

const finite = (what: string) =>
  z.number({ error: `${what}: enter a number.` }).refine(Number.isFinite, `${what}: enter a finite number.`)

/** The mapping of one uploaded file's headers onto the spec's columns, with the file's units. */
export const ColumnMappingSchema = z.record(
  z.string(),
  z.object({
    header: z.string().min(1, 'choose the file column that holds this quantity'),
    unit: z.string().min(1, 'choose the unit the file uses'),
    pressure: z.enum(['gauge', 'absolute']).optional(),
  }),
)
export type ColumnMapping = z.infer<typeof ColumnMappingSchema>

/**
 * The non-file part of a hand-in (sent as the JSON field `payload` of the multipart form):
 * each value as the student typed it, with its unit; the server converts to the spec's units.
 */
export const SubmissionPayloadSchema = z.object({
  mappings: z.record(z.string(), ColumnMappingSchema).default({}),
  measurements: z
    .record(
      z.string(),
      z.object({
        value: finite('measurement'),
        unit: z.string().min(1),
        pressure: z.enum(['gauge', 'absolute']).optional(),
      }),
    )
    .default({}),
  reported: z.record(z.string(), z.object({ value: finite('result'), unit: z.string().min(1) })).default({}),
  /** The marks on each photograph, by the photograph's key; the picture itself is the file `photo:<key>`. */
  images: z.record(z.string(), JetMarksSchema).optional(),
})
export type SubmissionPayload = z.infer<typeof SubmissionPayloadSchema>

export const SubmissionParamsSchema = z.object({
  courseId: z.coerce.number().int().positive('courseId must be a positive whole number.'),
  submissionId: z.coerce.number().int().positive('submissionId must be a positive whole number.'),
})
export const SubmissionFileParamsSchema = SubmissionParamsSchema.extend({
  fileId: z.coerce.number().int().positive('fileId must be a positive whole number.'),
})

/** A problem with one field of the hand-in; `field` is e.g. `measurements.throatDiameter` or `table:run`. */
export interface SubmissionFieldIssue {
  field: string
  message: string
  row?: number
  column?: string
}

export type CheckOutcome = 'pass' | 'partial' | 'fail' | 'error'

export interface CheckView {
  /** The stored check (staff override it by this id). */
  id: number
  key: string
  label: string
  unit: string
  reported: number | null
  /** Null when the module hides expected values from students. */
  expected: number | null
  absError: number | null
  relError: number | null
  tolerance: number | null
  pointsPossible: number
  pointsAwarded: number
  pass: boolean
  outcome: CheckOutcome
  /** The expected value's uncertainty; null when the module declares none or none reaches this result. */
  uncertainty: CheckUncertaintyView | null
  /** The result is an expansion-regime code (1–5), shown by its name. */
  regime: boolean
}

/** The uncertainty of a check's expected value, propagated from the module's instrument uncertainties. */
export interface CheckUncertaintyView {
  /** Combined standard uncertainty u_c, in the result's unit; null where expected values are hidden. */
  standard: number | null
  /** Expanded uncertainty U = k·u_c; null where expected values are hidden. */
  expanded: number | null
  /** Coverage factor k. */
  coverage: number
  /** The inputs that contribute most, largest first, with their share of the variance (shown always). */
  contributions: UncertaintyContribution[]
}

export interface FlagView {
  id: number
  code: string
  message: string
  status: FlagStatus
}

export interface ChartData {
  time: number[]
  thrust?: number[]
  chamberPressure?: number[]
  receiverPressure?: number[]
  idealThrust?: number[]
  /** The separated nozzle's thrust estimate where the flow separates from the wall, null where it runs full. */
  separatedThrust?: (number | null)[]
  supersonicSpans: [number, number][]
}

/**
 * The life of a hand-in: stored and waiting for the grader ('received'), claimed by a grading
 * worker ('grading'), 'graded', or 'grading-failed' (could not be graded automatically; staff grade it).
 */
export const SUBMISSION_STATUSES = ['received', 'grading', 'graded', 'grading-failed'] as const
export type SubmissionStatus = (typeof SUBMISSION_STATUSES)[number]

/** States that end on their own: the hand-in is stored and its grade is on the way. */
export const isAwaitingGrade = (status: SubmissionStatus) => status === 'received' || status === 'grading'

/**
 * What a person is told when a hand-in could not be graded automatically, wherever it shows (the
 * result, the flag, the e-mail, the report). The cause is logged on the server, never shown.
 */
export const GRADING_FAILED_MESSAGE =
  'This hand-in could not be graded automatically; the course staff have been told and will grade it.'

export interface SubmissionSummary {
  id: number
  attempt: number
  submittedAt: string
  submittedBy: string
  status: SubmissionStatus
  isLate: boolean
  daysLate: number
  latePenalty: number
  /** Null while results are not yet visible to the student. */
  score: number | null
  maxScore: number | null
  flagCount: number
}

/** A photograph of a hand-in, as stored: the re-encoded picture's size and hashes, and the student's marks. */
export interface SubmissionImageView {
  /** The photograph's key in the sheet's `images:`. */
  key: string
  contentType: 'image/png' | 'image/jpeg'
  /** Pixels of the stored picture (the marks are in these coordinates). */
  width: number
  height: number
  /** Bytes of the stored (re-encoded) picture. */
  size: number
  sha256: string
  /** sha256 of the file as the student uploaded it. */
  originalSha256: string
  marks: JetMarks
}

export const SubmissionImageParamsSchema = SubmissionParamsSchema.extend({
  imageKey: TableKeySchema,
})

export interface SubmissionDetail extends SubmissionSummary {
  courseId: number
  moduleId: number
  moduleTitle: string
  moduleVersion: number
  labGroupName: string | null
  resultsVisible: boolean
  /** Why results are hidden, in plain words, when they are. */
  resultsHiddenReason: string | null
  rawScore: number | null
  checks: CheckView[]
  flags: FlagView[]
  chart: ChartData | null
  files: { id: number; tableKey: string; filename: string; size: number; rowCount: number; sha256: string }[]
  /** The photographs with their marks; the picture is GET …/submissions/:submissionId/images/:imageKey. */
  images: SubmissionImageView[]
  inputs: {
    measurements: Record<string, { value: number; unit: string; pressure?: PressureSense }>
    reported: Record<string, { value: number; unit: string }>
  }
  attemptsAllowed: number
  attemptsUsed: number
  /** Staff comments to the student, as sanitised HTML. */
  comments: { id: number; author: string; at: string; html: string }[]
}

export interface MySubmissions {
  attemptsAllowed: number
  attemptsUsed: number
  canSubmit: boolean
  /** Why a new hand-in is not possible, in plain words. */
  blockedReason: string | null
  /** The due date for this person: their own extended one when they have an extension. */
  dueAt: string | null
  /** True when `dueAt` is this student's extension rather than the module's due date. */
  dueExtended?: boolean
  groupSubmission: boolean
  labGroupName: string | null
  submissions: SubmissionSummary[]
}

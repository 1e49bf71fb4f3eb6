import { z } from 'zod'
import { CreateCourseSchema } from './courses'

/** Largest shift a roll-over accepts, in weeks each way (two years). */
export const ROLLOVER_MAX_WEEKS = 104

const ISO_DATE = /^(\d{4})-(\d{2})-(\d{2})$/

/** Whether a string is a real calendar date written like 2027-08-30. */
export function isIsoDate(text: string): boolean {
  const m = ISO_DATE.exec(text)
  if (!m) return false
  const d = new Date(Date.UTC(Number(m[1]), Number(m[2]) - 1, Number(m[3])))
  return d.getUTCFullYear() === Number(m[1]) && d.getUTCMonth() === Number(m[2]) - 1 && d.getUTCDate() === Number(m[3])
}

/**
 * The whole weeks between two terms' start dates, rounded to the nearest week: what the form
 * proposes as the shift. Null when either date is not a date.
 */
export function weeksBetween(fromDate: string, toDate: string): number | null {
  if (!isIsoDate(fromDate) || !isIsoDate(toDate)) return null
  const days = (Date.parse(`${toDate}T00:00:00Z`) - Date.parse(`${fromDate}T00:00:00Z`)) / 86_400_000
  return Math.round(days / 7)
}

/**
 * Starting next term's course from this one. The same body is sent to the preview (nothing is
 * written) and to the confirm (which checks everything again and writes it in one transaction).
 */
export const RolloverRequestSchema = z.object({
  code: CreateCourseSchema.shape.code,
  title: CreateCourseSchema.shape.title,
  term: CreateCourseSchema.shape.term,
  /** The new term's first day; due dates moved before it are pointed out in the preview. */
  startDate: z
    .string({ error: 'Start date is required (a date like 2027-08-30).' })
    .trim()
    .refine(isIsoDate, 'Start date must be a date like 2027-08-30.'),
  /** Whole weeks by which every due date moves (negative moves them earlier). */
  shiftWeeks: z
    .number({ error: 'Shift must be a whole number of weeks.' })
    .int('Shift must be a whole number of weeks.')
    .min(-ROLLOVER_MAX_WEEKS, `Shift: at most ${ROLLOVER_MAX_WEEKS} weeks earlier.`)
    .max(ROLLOVER_MAX_WEEKS, `Shift: at most ${ROLLOVER_MAX_WEEKS} weeks later.`),
  /** Copy the teaching assistants (and the section each looks after) too. */
  copyTas: z.boolean({ error: 'copyTas must be true or false.' }).default(false),
})
export type RolloverRequest = z.input<typeof RolloverRequestSchema>
export type RolloverInput = z.infer<typeof RolloverRequestSchema>

/** One lab sheet as it will be copied: from its latest issued version, as a sheet being prepared. */
export interface RolloverSheet {
  slug: string
  title: string
  /** The issued version it is copied from. */
  fromVersion: number
  weight: number
  /** Local date-times in the sheet's zone, as its front matter states them; null when it has none. */
  oldDue: string | null
  newDue: string | null
  oldAcceptUntil: string | null
  newAcceptUntil: string | null
  /** The zone the dates are stated in (the sheet's own, or the course's). */
  timeZone: string
  /** What could not be moved, or needs a look (a due date before the new term starts). */
  problems: string[]
}

/** A sheet that is not copied, and why (never issued to the class). */
export interface RolloverSkippedSheet {
  slug: string
  title: string
  reason: string
}

export interface RolloverPlan {
  course: { code: string; title: string; term: string; institution: string; timeZone: string; startDate: string }
  shiftWeeks: number
  sheets: RolloverSheet[]
  skippedSheets: RolloverSkippedSheet[]
  sections: { name: string; meets: string }[]
  labGroups: { name: string; section: string | null }[]
  /** Empty unless copyTas was asked. */
  tas: { name: string; email: string; section: string | null }[]
  /** What is never copied, in words for the page. */
  notCopied: string
}

export interface RolloverResult extends RolloverPlan {
  courseId: number
  /** The new course's key in page addresses. */
  slug: string
}

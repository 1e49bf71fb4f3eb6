/**
 * Run records at the stand: the pre-run checklist as ticked, the append-only history of a run, and
 * its one sign-off. The checklist supports the institution's own procedures; it does not replace them.
 */
import { z } from 'zod'

const positive = (name: string) =>
  z.coerce
    .number({ error: `${name} must be a number.` })
    .int(`${name} must be a whole number.`)
    .positive(`${name} must be a positive whole number.`)

export const BookingRunParamsSchema = z.object({ courseId: positive('courseId'), bookingId: positive('bookingId') })
export const RunParamsSchema = z.object({ courseId: positive('courseId'), runId: positive('runId') })

export const RUN_OUTCOMES = ['completed', 'aborted', 'hang-fire', 'misfire'] as const
export type RunOutcome = (typeof RUN_OUTCOMES)[number]
export const RUN_ENTRY_KINDS = ['tick', 'untick', 'sign-off', 'correction', 'note'] as const
export type RunEntryKind = (typeof RUN_ENTRY_KINDS)[number]
/** The kinds a person writes; the sign-off entry is written by the sign-off itself. */
export const WRITABLE_ENTRY_KINDS = ['tick', 'untick', 'note', 'correction'] as const

/** Words for an outcome, as pages and the review page show it. */
export const OUTCOME_WORDS: Record<RunOutcome, string> = {
  completed: 'Completed',
  aborted: 'Aborted',
  'hang-fire': 'Hang-fire',
  misfire: 'Misfire',
}

export const RunEntryInputSchema = z
  .strictObject({
    kind: z.enum(WRITABLE_ENTRY_KINDS, { error: 'kind must be one of tick, untick, note or correction.' }),
    itemKey: z
      .string()
      .trim()
      .min(1, 'itemKey must not be empty.')
      .max(60, 'itemKey has at most 60 characters.')
      .optional(),
    text: z.string().trim().max(2000, 'text has at most 2000 characters.').optional(),
  })
  .superRefine((v, ctx) => {
    if ((v.kind === 'tick' || v.kind === 'untick') && !v.itemKey) {
      ctx.addIssue({ code: 'custom', path: ['itemKey'], message: `itemKey: a ${v.kind} names the checklist item.` })
    }
    if ((v.kind === 'note' || v.kind === 'correction') && !v.text) {
      ctx.addIssue({ code: 'custom', path: ['text'], message: `text: a ${v.kind} needs its words.` })
    }
  })
export type RunEntryInput = z.infer<typeof RunEntryInputSchema>

const instant = (name: string) =>
  z.iso.datetime({ offset: true, error: `${name} must be a date and time (ISO 8601 with a time zone).` })

export const SignOffSchema = z
  .strictObject({
    outcome: z.enum(RUN_OUTCOMES, { error: 'outcome must be completed, aborted, hang-fire or misfire.' }),
    reason: z.string().trim().max(500, 'reason has at most 500 characters.').optional(),
    waitMinutes: z.coerce
      .number({ error: 'waitMinutes must be a number.' })
      .int('waitMinutes must be whole minutes.')
      .min(0, 'waitMinutes must be 0 or more.')
      .max(1440, 'waitMinutes must be at most 1440 (a day).')
      .optional(),
    startedAt: instant('startedAt'),
    endedAt: instant('endedAt'),
    people: z
      .array(positive('people'), { error: 'people must be a list of person ids.' })
      .min(1, 'people: name at least one person who was at the stand.')
      .max(50, 'people: at most 50 people.'),
    notes: z.string().trim().max(5000, 'notes have at most 5000 characters.').optional(),
  })
  .superRefine((v, ctx) => {
    if (v.outcome === 'aborted' && !v.reason) {
      ctx.addIssue({
        code: 'custom',
        path: ['reason'],
        message: 'reason: an aborted run needs the reason it was aborted.',
      })
    }
    if ((v.outcome === 'hang-fire' || v.outcome === 'misfire') && v.waitMinutes === undefined) {
      ctx.addIssue({
        code: 'custom',
        path: ['waitMinutes'],
        message: `waitMinutes: after a ${v.outcome}, note how many minutes were waited before anyone approached.`,
      })
    }
    if (Date.parse(v.endedAt) <= Date.parse(v.startedAt)) {
      ctx.addIssue({ code: 'custom', path: ['endedAt'], message: 'endedAt must be after startedAt.' })
    }
  })
export type SignOffInput = z.infer<typeof SignOffSchema>

/** The hand-in form's `runRecordId` field (multipart text): the signed-off run it is handed in against. */
export const HandInRunFieldSchema = z.object({ runRecordId: positive('runRecordId').optional() })

/** The booking a run belongs to, as the run page shows it. */
export interface RunBookingView {
  id: number
  status: 'active' | 'cancelled' | 'moved'
  startsAt: string
  minutes: number
  standName: string
  standLocation: string
  labGroupId: number
  labGroupName: string
  sectionId: number
  moduleId: number
  moduleTitle: string
  /** The course's time zone, for showing times. */
  timeZone: string
}

export interface RunPersonView {
  id: number
  name: string
  role: 'student' | 'ta' | 'instructor'
}

export interface RunEntryView {
  id: number
  kind: RunEntryKind
  itemKey: string | null
  text: string | null
  by: string
  at: string
}

export interface RunChecklistItemView {
  key: string
  text: string
  staff: boolean
  hold: boolean
  /** The item's state from its latest tick or untick. */
  ticked: boolean
  /** Who made the latest tick or untick, and when (null: never touched). */
  by: string | null
  at: string | null
}

export interface RunSignOffView {
  outcome: RunOutcome
  reason: string | null
  waitMinutes: number | null
  startedAt: string
  endedAt: string
  notes: string | null
  by: string
  at: string
  people: RunPersonView[]
}

export interface RunView {
  id: number
  booking: RunBookingView
  openedBy: string
  openedAt: string
  checklist: RunChecklistItemView[]
  entries: RunEntryView[]
  signOff: RunSignOffView | null
  /** Who may be marked present: the group's members and the course's staff. */
  candidates: RunPersonView[]
  /** What the caller may do. */
  can: { tickStudentItems: boolean; tickStaffItems: boolean; signOff: boolean; correct: boolean }
}

/** The 404 answer's details for a booking whose run is not opened yet. */
export interface RunNotOpenedDetails {
  booking: RunBookingView
  canOpen: boolean
}

/** A signed-off run of the caller's group, to choose from in the hand-in form. */
export interface SignedRunView {
  id: number
  bookingId: number
  startsAt: string
  standName: string
  outcome: RunOutcome
  signedOffBy: string
  signedOffAt: string
}

/** The run a hand-in is linked to, as the review page shows it. */
export interface LinkedRunView {
  id: number
  bookingId: number
  startedAt: string
  outcome: RunOutcome
  reason: string | null
  waitMinutes: number | null
  signedOffBy: string
  signedOffAt: string
}

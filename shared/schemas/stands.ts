import { z } from 'zod'
import { CourseIdParamsSchema } from './courses'
import { singleLineName } from './names'

/**
 * Test stands, their bookable slots by section, lab-group bookings and waiting lists, and the
 * booking cut-off. Dates and clock times in requests are wall-clock values in the course's time
 * zone; the server stores UTC instants. The same schemas check the pages' forms and the requests.
 */

const idOf = (what: string) =>
  z.coerce
    .number({ error: `${what} must be a number.` })
    .int(`${what} must be a whole number.`)
    .positive(`${what} must be a positive whole number.`)

export const StandParamsSchema = CourseIdParamsSchema.extend({ standId: idOf('standId') })
export const SlotParamsSchema = CourseIdParamsSchema.extend({ slotId: idOf('slotId') })
export const BookingParamsSchema = CourseIdParamsSchema.extend({ bookingId: idOf('bookingId') })

/** Most slots one pattern may open (a long term of short slots on several days is still well below). */
export const MAX_PATTERN_SLOTS = 400
/** Longest slot, in minutes (a whole lab day). */
export const MAX_SLOT_MINUTES = 12 * 60
/** Most hours of cut-off an instructor may set (two weeks). */
export const MAX_CUTOFF_HOURS = 336

const DATE = /^\d{4}-\d{2}-\d{2}$/
const TIME = /^([01]\d|2[0-3]):[0-5]\d$/

const isRealDate = (s: string) => {
  const [y, m, d] = s.split('-').map(Number) as [number, number, number]
  const t = new Date(Date.UTC(y, m - 1, d))
  return t.getUTCFullYear() === y && t.getUTCMonth() === m - 1 && t.getUTCDate() === d
}

const dateField = (field: string) =>
  z
    .string({ error: `${field}: give a date like 2027-03-02.` })
    .trim()
    .regex(DATE, `${field}: give a date like 2027-03-02.`)
    .refine(isRealDate, `${field}: that date does not exist.`)

const timeField = (field: string) =>
  z
    .string({ error: `${field}: give a time like 13:00 (24-hour clock).` })
    .trim()
    .regex(TIME, `${field}: give a time like 13:00 (24-hour clock).`)

const minutesField = (field: string) =>
  z
    .number({ error: `${field}: give the length in minutes.` })
    .int(`${field}: a whole number of minutes.`)
    .positive(`${field}: the length must be more than 0 minutes.`)
    .max(MAX_SLOT_MINUTES, `${field}: at most ${MAX_SLOT_MINUTES} minutes.`)

const sectionIdField = z
  .number({ error: 'sectionId: choose the section the slots are for.' })
  .int('sectionId must be a whole number.')
  .positive('sectionId must be a positive whole number.')

const moduleIdsField = z
  .array(z.number().int().positive('moduleIds: each must be a sheet id.'), {
    error: 'moduleIds: a list of lab sheet ids.',
  })
  .max(100, 'moduleIds: at most 100 sheets.')

const standName = singleLineName({
  field: 'stand name',
  max: 80,
  messages: { missing: 'name: give the stand a name.', tooShort: 'name: give the stand a name.' },
})
const location = z
  .string({ error: 'location: where the stand is, or leave it empty.' })
  .trim()
  .max(120, 'location: at most 120 characters.')
const maxPressureNote = z
  .string({ error: 'maxPressureNote: a plain note, or leave it empty.' })
  .trim()
  .max(120, 'maxPressureNote: at most 120 characters.')

/** A new stand: its name (unique in the course), where it is, its pressure note and allowed sheets. */
export const StandCreateSchema = z.object({
  name: standName,
  location: location.default(''),
  maxPressureNote: maxPressureNote.default(''),
  moduleIds: moduleIdsField.default([]),
})
export type StandCreate = z.infer<typeof StandCreateSchema>

/** Changing a stand; `moduleIds` replaces the allowed sheets. At least one field. */
export const StandUpdateSchema = z
  .object({
    name: standName.optional(),
    location: location.optional(),
    maxPressureNote: maxPressureNote.optional(),
    moduleIds: moduleIdsField.optional(),
  })
  .refine((v) => Object.values(v).some((x) => x !== undefined), 'Send at least one field to change.')
export type StandUpdate = z.infer<typeof StandUpdateSchema>

/** One slot on one date. */
export const OneSlotSchema = z.object({
  kind: z.literal('one'),
  sectionId: sectionIdField,
  date: dateField('date'),
  start: timeField('start'),
  minutes: minutesField('minutes'),
})

/** ISO weekday numbers, Monday = 1 … Sunday = 7. */
export const WEEKDAYS = ['Monday', 'Tuesday', 'Wednesday', 'Thursday', 'Friday', 'Saturday', 'Sunday'] as const

/**
 * A weekly pattern for a term: on `weekday` between `from` and `to` (both included), back-to-back
 * slots of `slotMinutes` from `start` until `end`, skipping the `except` dates (holidays).
 */
export const SlotPatternSchema = z
  .object({
    kind: z.literal('pattern'),
    sectionId: sectionIdField,
    weekday: z
      .number({ error: 'weekday: choose a day of the week.' })
      .int('weekday: choose a day of the week.')
      .min(1, 'weekday: 1 (Monday) to 7 (Sunday).')
      .max(7, 'weekday: 1 (Monday) to 7 (Sunday).'),
    from: dateField('from'),
    to: dateField('to'),
    start: timeField('start'),
    end: timeField('end'),
    slotMinutes: minutesField('slotMinutes'),
    except: z.array(dateField('except'), { error: 'except: a list of dates.' }).max(100).default([]),
  })
  .superRefine((p, ctx) => {
    if (p.to < p.from) ctx.addIssue({ code: 'custom', path: ['to'], message: 'to: the last day comes before from.' })
    if (p.end <= p.start) ctx.addIssue({ code: 'custom', path: ['end'], message: 'end: must be later than start.' })
  })

export const SlotCreateSchema = z.discriminatedUnion('kind', [OneSlotSchema, SlotPatternSchema], {
  error: 'kind: "one" for a single slot or "pattern" for a weekly pattern.',
})
export type SlotCreate = z.infer<typeof SlotCreateSchema>
export type SlotPattern = z.infer<typeof SlotPatternSchema>

const reasonField = (what: string) =>
  z
    .string({ error: `reason: say why the ${what}.` })
    .trim()
    .min(3, `reason: say why the ${what} (at least 3 characters).`)
    .max(500, 'reason: at most 500 characters.')

export const SlotCancelSchema = z.object({ reason: reasonField('slot is cancelled') })

export const SlotsQuerySchema = z
  .object({ from: dateField('from').optional(), to: dateField('to').optional() })
  .superRefine((q, ctx) => {
    if (q.from && q.to && q.to < q.from)
      ctx.addIssue({ code: 'custom', path: ['to'], message: 'to: the last day comes before from.' })
  })
export type SlotsQuery = z.infer<typeof SlotsQuerySchema>

const moduleIdField = z
  .number({ error: 'moduleId: choose the lab sheet the run is for.' })
  .int('moduleId must be a whole number.')
  .positive('moduleId must be a positive whole number.')

export const BookSchema = z.object({ moduleId: moduleIdField })
export type BookInput = z.infer<typeof BookSchema>

/** A group cancels without a reason; staff must give one (the service checks who calls). */
export const BookingCancelSchema = z.object({
  reason: z.string().trim().max(500, 'reason: at most 500 characters.').optional(),
})
export type BookingCancel = z.infer<typeof BookingCancelSchema>

export const BookingMoveSchema = z.object({
  slotId: z
    .number({ error: 'slotId: choose the slot to move the booking to.' })
    .int('slotId must be a whole number.')
    .positive('slotId must be a positive whole number.'),
  reason: reasonField('booking is moved'),
})
export type BookingMove = z.infer<typeof BookingMoveSchema>

export const BookingSettingsSchema = z.object({
  cutoffHours: z
    .number({ error: 'cutoffHours: give the number of hours.' })
    .int('cutoffHours: a whole number of hours.')
    .min(0, 'cutoffHours: 0 or more.')
    .max(MAX_CUTOFF_HOURS, `cutoffHours: at most ${MAX_CUTOFF_HOURS} (two weeks).`),
})
export type BookingSettings = z.infer<typeof BookingSettingsSchema>

/** The minimum reason a staff cancellation needs (the same words as the schema above). */
export const STAFF_REASON_MIN = 3

// ---- What the API answers ----

export interface StandView {
  id: number
  name: string
  location: string
  maxPressureNote: string
  modules: { id: number; title: string }[]
}

export interface StandsOverview {
  stands: StandView[]
  /** Sheets issued to the class that run on a stand (standRuns ≥ 1): what a stand may allow. */
  standSheets: { id: number; title: string; standRuns: number }[]
  sections: { id: number; name: string }[]
  cutoffHours: number
  timeZone: string
}

export type BookingStatus = 'active' | 'cancelled' | 'moved'

export interface BookingView {
  id: number
  slotId: number
  status: BookingStatus
  labGroup: { id: number; name: string }
  module: { id: number; title: string }
  startsAt: string
  minutes: number
  stand: { id: number; name: string; location: string }
  sectionId: number
  reason: string | null
  endedAt: string | null
  createdAt: string
}

/**
 * A slot as the caller may see it. Students see only whether it is free, taken, theirs, and
 * their place on its waiting list; staff see who holds it and who waits.
 */
export interface SlotView {
  id: number
  stand: { id: number; name: string; location: string }
  section: { id: number; name: string }
  startsAt: string
  minutes: number
  cancelled: boolean
  cancelReason: string | null
  state: 'free' | 'taken' | 'mine' | 'cancelled'
  /** The active booking (staff: anyone's; students: their group's only). */
  booking: { id: number; labGroup: { id: number; name: string }; module: { id: number; title: string } } | null
  /** The caller's group's place on the waiting list (1 = next), or null. */
  myWaitPlace: number | null
  /** Staff only: how many groups wait. */
  waiting: number
  /** Sheets that may be booked on this slot's stand. */
  moduleIds: number[]
}

export interface SlotList {
  from: string
  to: string
  timeZone: string
  cutoffHours: number
  slots: SlotView[]
  /** The caller's lab group (students), or null. */
  labGroup: { id: number; name: string } | null
  /** Sheets the caller's group may book, with runs left (students); every stand sheet for staff. */
  sheets: { id: number; title: string; standRuns: number; booked: number }[]
}

export interface SlotsCreated {
  created: number
  slots: { id: number; startsAt: string; minutes: number }[]
}

export interface BookingList {
  bookings: BookingView[]
  timeZone: string
}

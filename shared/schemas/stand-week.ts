import { z } from 'zod'

/**
 * The course home's "this week at the stand": the stand sessions of one week, as the caller may see
 * them. A week runs from a day's midnight to the same time seven days later in the course's zone.
 */

const DAY = /^(\d{4})-(\d{2})-(\d{2})$/

/** A real calendar day written YYYY-MM-DD (no 2027-02-30). */
export function isCalendarDay(text: string): boolean {
  const m = DAY.exec(text)
  if (!m) return false
  const [y, mo, d] = [Number(m[1]), Number(m[2]), Number(m[3])]
  const t = new Date(Date.UTC(y, mo - 1, d))
  return y >= 2000 && y <= 2200 && t.getUTCMonth() === mo - 1 && t.getUTCDate() === d
}

/** The day `days` after a YYYY-MM-DD day (negative for before), in the same form. */
export function addDays(day: string, days: number): string {
  const [y, mo, d] = day.split('-').map(Number) as [number, number, number]
  return new Date(Date.UTC(y, mo - 1, d + days)).toISOString().slice(0, 10)
}

export const StandWeekQuerySchema = z.strictObject({
  /** The week's first day; without it, the Monday of the current week in the course's zone. */
  start: z.string().refine(isCalendarDay, 'start must be a day written YYYY-MM-DD, for example 2027-03-01').optional(),
})
export type StandWeekQuery = z.infer<typeof StandWeekQuerySchema>

export interface StandWeekSession {
  slotId: number
  /** ISO instants. */
  startsAt: string
  endsAt: string
  standName: string
  location: string
  sectionName: string
  /** Whether some lab group holds the slot. */
  booked: boolean
  /** Whether the caller's own lab group holds it (students; always false for staff). */
  mine: boolean
  /** Who holds it: for staff any group, for a student only their own group; null otherwise. */
  groupName: string | null
  /** The sheet the holder booked it for, under the same rule as groupName. */
  sheetTitle: string | null
}

export interface StandWeek {
  /** The first day of the week (YYYY-MM-DD) and the first day of the next. */
  start: string
  next: string
  previous: string
  timeZone: string
  sessions: StandWeekSession[]
}

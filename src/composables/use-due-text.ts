import { formatInZone } from '@shared/time'

/** "Due Tue 9 Feb 2027, 17:00 MST" in the course's zone, or a plain phrase when there is none. */
export function dueText(dueAt: string | null, timeZone: string): string {
  return dueAt ? formatInZone(new Date(dueAt), timeZone) : 'No due date'
}

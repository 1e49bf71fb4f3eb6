import type { StandWeek } from '@shared/schemas/stand-week'
import { http } from './http'

/** One week of stand sessions; without `start`, the week holding today in the course's zone. */
export const fetchStandWeek = (courseId: number, start: string | null) =>
  http<StandWeek>('GET', `/api/courses/${courseId}/week${start ? `?start=${encodeURIComponent(start)}` : ''}`)

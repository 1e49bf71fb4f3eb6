import type { CalendarFeedCreated, CalendarFeedStatus } from '@shared/schemas/calendar-feed'
import { http } from './http'

const base = '/api/me/calendar-feed'

export const getCalendarFeed = () => http<CalendarFeedStatus>('GET', base)
export const postCalendarFeed = () => http<CalendarFeedCreated>('POST', base)
export const deleteCalendarFeed = () => http<void>('DELETE', base)

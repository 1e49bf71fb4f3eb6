import type {
  BookingList,
  BookingMove,
  BookingSettings,
  BookingView,
  SlotCreate,
  SlotList,
  SlotsCreated,
  StandCreate,
  StandUpdate,
  StandView,
  StandsOverview,
} from '@shared/schemas/stands'
import { http } from './http'

const base = (courseId: number) => `/api/courses/${courseId}`

export const fetchStands = (courseId: number) => http<StandsOverview>('GET', `${base(courseId)}/stands`)
export const postStand = (courseId: number, body: StandCreate) =>
  http<StandView>('POST', `${base(courseId)}/stands`, body)
export const patchStand = (courseId: number, standId: number, body: StandUpdate) =>
  http<StandView>('PATCH', `${base(courseId)}/stands/${standId}`, body)
export const postSlots = (courseId: number, standId: number, body: SlotCreate) =>
  http<SlotsCreated>('POST', `${base(courseId)}/stands/${standId}/slots`, body)
export const deleteSlot = (courseId: number, slotId: number, reason: string) =>
  http<{ slotId: number; cancelledBookings: number }>('DELETE', `${base(courseId)}/slots/${slotId}`, { reason })
export const fetchSlots = (courseId: number, from?: string, to?: string) => {
  const q = new URLSearchParams()
  if (from) q.set('from', from)
  if (to) q.set('to', to)
  const qs = q.toString()
  return http<SlotList>('GET', `${base(courseId)}/slots${qs ? `?${qs}` : ''}`)
}
export const postBooking = (courseId: number, slotId: number, moduleId: number) =>
  http<BookingView>('POST', `${base(courseId)}/slots/${slotId}/bookings`, { moduleId })
export const postWait = (courseId: number, slotId: number, moduleId: number) =>
  http<{ place: number }>('POST', `${base(courseId)}/slots/${slotId}/waitlist`, { moduleId })
export const deleteWait = (courseId: number, slotId: number) =>
  http<void>('DELETE', `${base(courseId)}/slots/${slotId}/waitlist`)
export const fetchBookings = (courseId: number) => http<BookingList>('GET', `${base(courseId)}/bookings`)
export const postCancelBooking = (courseId: number, bookingId: number, reason?: string) =>
  http<BookingView>('POST', `${base(courseId)}/bookings/${bookingId}/cancel`, reason ? { reason } : {})
export const postMoveBooking = (courseId: number, bookingId: number, body: BookingMove) =>
  http<BookingView>('POST', `${base(courseId)}/bookings/${bookingId}/move`, body)
export const patchBookingSettings = (courseId: number, body: BookingSettings) =>
  http<BookingSettings>('PATCH', `${base(courseId)}/booking-settings`, body)

/**
 * Test stands and stand time: the staff page's stands, slots and cut-off, and the stand-time page's
 * slots and bookings. Views take everything from here; only this file talks to `api/stands.ts`.
 */
import { computed, ref, toValue } from 'vue'
import type { MaybeRefOrGetter } from 'vue'
import type { BookingMove, SlotCreate, StandCreate, StandUpdate } from '@shared/schemas/stands'
import {
  deleteSlot,
  deleteWait,
  fetchBookings,
  fetchSlots,
  fetchStands,
  patchBookingSettings,
  patchStand,
  postBooking,
  postCancelBooking,
  postMoveBooking,
  postSlots,
  postStand,
  postWait,
} from '@/api/stands'
import { useAction } from './use-action'
import { useResource } from './use-resource'

/** The staff page: stands with their sheets, opening slots, the cut-off. */
export function useStandsAdmin(courseId: MaybeRefOrGetter<number>) {
  const id = () => toValue(courseId)
  const overview = useResource(() => fetchStands(id()), id)
  const after = async <T>(p: Promise<T>) => {
    const out = await p
    await overview.refresh()
    return out
  }
  const addStand = useAction((body: StandCreate) => after(postStand(id(), body)), {
    success: (s) => ({ summary: `Stand “${s.name}” added` }),
    failure: 'Stand not added',
    inPlace: (e) => e.code === 'validation_failed' || e.code === 'stand_exists',
  })
  const changeStand = useAction((standId: number, body: StandUpdate) => after(patchStand(id(), standId, body)), {
    success: 'Stand saved',
    failure: 'Stand not saved',
  })
  const openSlots = useAction((standId: number, body: SlotCreate) => postSlots(id(), standId, body), {
    success: (r) => ({ summary: `${r.created} slot${r.created === 1 ? '' : 's'} opened` }),
    inPlace: () => true,
  })
  const setCutoff = useAction((cutoffHours: number) => after(patchBookingSettings(id(), { cutoffHours })), {
    success: 'Cut-off saved',
    inPlace: () => true,
  })
  return { overview, addStand, changeStand, openSlots, setCutoff }
}

/** Today in a time zone, as YYYY-MM-DD. */
export function todayIn(timeZone: string, now = new Date()): string {
  return new Intl.DateTimeFormat('en-CA', { timeZone }).format(now)
}

/** A date plus `days`, as YYYY-MM-DD (calendar arithmetic, no time zone). */
export function addDays(date: string, days: number): string {
  const [y, m, d] = date.split('-').map(Number) as [number, number, number]
  return new Date(Date.UTC(y, m - 1, d + days)).toISOString().slice(0, 10)
}

/** The stand-time page: the slots of a week or of the term, the group's bookings, and the actions on them. */
export function useStandTime(courseId: MaybeRefOrGetter<number>) {
  const id = () => toValue(courseId)
  /** null: the default range (today and the following weeks of the term). */
  const weekStart = ref<string | null>(null)
  const range = computed(() => (weekStart.value ? { from: weekStart.value, to: addDays(weekStart.value, 6) } : null))
  const slots = useResource(
    () => fetchSlots(id(), range.value?.from, range.value?.to),
    () => [id(), weekStart.value],
  )
  const bookings = useResource(() => fetchBookings(id()), id)
  const refresh = async () => {
    await Promise.all([slots.refresh(), bookings.refresh()])
  }
  const after = async <T>(p: Promise<T>) => {
    try {
      return await p
    } finally {
      await refresh()
    }
  }
  const book = useAction((slotId: number, moduleId: number) => after(postBooking(id(), slotId, moduleId)), {
    success: 'Slot booked for your group',
    failure: 'Not booked',
  })
  const wait = useAction((slotId: number, moduleId: number) => after(postWait(id(), slotId, moduleId)), {
    success: (r) => ({ summary: `Your group is number ${r.place} on the waiting list` }),
    failure: 'Not added to the waiting list',
  })
  const leave = useAction((slotId: number) => after(deleteWait(id(), slotId)), {
    success: 'Left the waiting list',
    failure: 'Still on the waiting list',
  })
  const cancel = useAction((bookingId: number, reason?: string) => after(postCancelBooking(id(), bookingId, reason)), {
    success: 'Booking cancelled',
    inPlace: () => true,
  })
  const move = useAction((bookingId: number, body: BookingMove) => after(postMoveBooking(id(), bookingId, body)), {
    success: 'Booking moved',
    inPlace: () => true,
  })
  const cancelSlot = useAction((slotId: number, reason: string) => after(deleteSlot(id(), slotId, reason)), {
    success: 'Slot cancelled',
    inPlace: () => true,
  })
  return { weekStart, slots, bookings, book, wait, leave, cancel, move, cancelSlot }
}

/**
 * The course home's week at the stand: one week of sessions at a time, the current one first, with
 * a step back or on. Only this file talks to `api/stand-week.ts`.
 */
import { computed, ref, toValue, type MaybeRefOrGetter } from 'vue'
import type { StandWeekSession } from '@shared/schemas/stand-week'
import { fetchStandWeek } from '@/api/stand-week'
import { useCourseKeysStore } from '@/stores/course-keys'
import { useResource } from './use-resource'

export interface StandDay {
  /** The day in the course's zone, e.g. "Tuesday 2 March". */
  label: string
  sessions: (StandWeekSession & { time: string })[]
}

export function useStandWeek(courseId: MaybeRefOrGetter<number>) {
  /** The week's first day; null for the week holding today (the server decides it in the course's zone). */
  const start = ref<string | null>(null)
  const week = useResource(
    () => fetchStandWeek(toValue(courseId), start.value),
    () => [toValue(courseId), start.value],
  )
  const keys = useCourseKeysStore()

  /** The sessions grouped by day, with times in the course's zone. */
  const days = computed<StandDay[]>(() => {
    const w = week.data.value
    if (!w) return []
    const dayFmt = new Intl.DateTimeFormat('en-GB', {
      timeZone: w.timeZone,
      weekday: 'long',
      day: 'numeric',
      month: 'long',
    })
    const timeFmt = new Intl.DateTimeFormat('en-GB', {
      timeZone: w.timeZone,
      hour: '2-digit',
      minute: '2-digit',
      hourCycle: 'h23',
    })
    const out: StandDay[] = []
    for (const s of w.sessions) {
      const label = dayFmt.format(new Date(s.startsAt))
      let day = out.at(-1)
      if (!day || day.label !== label) {
        day = { label, sessions: [] }
        out.push(day)
      }
      day.sessions.push({ ...s, time: `${timeFmt.format(new Date(s.startsAt))}–${timeFmt.format(new Date(s.endsAt))}` })
    }
    return out
  })

  /** "1 March – 7 March 2027" for the heading of the week shown. */
  const span = computed(() => {
    const w = week.data.value
    if (!w) return ''
    const fmt = (day: string, year: boolean) =>
      new Intl.DateTimeFormat('en-GB', {
        timeZone: 'UTC',
        day: 'numeric',
        month: 'long',
        ...(year ? { year: 'numeric' } : {}),
      }).format(new Date(`${day}T12:00:00Z`))
    const last = new Date(Date.parse(`${w.next}T12:00:00Z`) - 86_400_000).toISOString().slice(0, 10)
    return `${fmt(w.start, false)} – ${fmt(last, true)}`
  })

  /** The stand-time page (booking and the group's runs), by the course's address key once it is known. */
  const standTimeLink = computed(() => {
    const slug = keys.courseSlug(toValue(courseId))
    return slug ? `/c/${slug}/stand-time` : null
  })

  return {
    week,
    days,
    span,
    standTimeLink,
    previous: () => {
      if (week.data.value) start.value = week.data.value.previous
    },
    next: () => {
      if (week.data.value) start.value = week.data.value.next
    },
  }
}

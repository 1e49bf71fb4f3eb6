/**
 * A run at the stand: the run record of a booking (or the booking, while its run is not opened),
 * and the writes on it: open, tick, untick, note, correction and the one sign-off. Only this file
 * talks to `api/runs.ts`.
 */
import { computed } from 'vue'
import type { Ref } from 'vue'
import type { RunEntryInput, RunNotOpenedDetails, RunView, SignOffInput } from '@shared/schemas/runs'
import { fetchRun, fetchSignedRuns, openRun, postRunEntry, postSignOff } from '@/api/runs'
import { useCourseKeysStore } from '@/stores/course-keys'
import type { LoadState } from './use-resource'
import { useResource } from './use-resource'
import { useAction } from './use-action'

export function useStandRun(courseId: Ref<number>, bookingId: Ref<number>) {
  const run = useResource(
    () => fetchRun(courseId.value, bookingId.value),
    () => [courseId.value, bookingId.value],
  )
  /** The booking and whether the caller may open its run, while it is not opened. */
  const notOpened = computed<RunNotOpenedDetails | null>(() =>
    run.error.value?.code === 'run_not_opened' ? (run.error.value.details as RunNotOpenedDetails) : null,
  )
  const state = computed<LoadState>(() => (notOpened.value ? 'done' : run.state.value))

  /** Every write answers with the whole run: show it at once. */
  const show = (v: RunView) => {
    run.data.value = v
    run.error.value = null
    run.state.value = 'done'
    return v
  }

  const open = useAction(async () => show(await openRun(courseId.value, bookingId.value)), {
    success: 'Run opened',
    failure: 'The run was not opened',
  })
  const entry = useAction(async (e: RunEntryInput) => show(await postRunEntry(courseId.value, run.data.value!.id, e)), {
    failure: 'Not saved',
  })
  const signOff = useAction(
    async (input: SignOffInput) => show(await postSignOff(courseId.value, run.data.value!.id, input)),
    { success: 'Run signed off', failure: 'Not signed off', inPlace: () => true },
  )

  return { run, notOpened, state, open, entry, signOff }
}

/** The lab group's signed-off runs of a sheet, to hand in against. */
export function useSignedRuns(courseId: Ref<number>, moduleId: Ref<number>, enabled: Ref<boolean>) {
  return useResource(
    () => (enabled.value ? fetchSignedRuns(courseId.value, moduleId.value) : Promise.resolve([])),
    () => [courseId.value, moduleId.value, enabled.value],
  )
}

/** Addresses of the stand pages (by the course's slug once it is known). */
export function useStandLinks(courseId: Ref<number>) {
  const keys = useCourseKeysStore()
  const base = () => `/c/${keys.courseSlug(courseId.value) ?? courseId.value}/stand-time`
  return { standTime: () => base(), run: (bookingId: number) => `${base()}/${bookingId}` }
}

/** An instant as the `YYYY-MM-DDTHH:mm` a datetime-local field holds, in the course's zone. */
export function localInputValue(instant: Date, timeZone: string): string {
  const parts = new Intl.DateTimeFormat('en-CA', {
    timeZone,
    hourCycle: 'h23',
    year: 'numeric',
    month: '2-digit',
    day: '2-digit',
    hour: '2-digit',
    minute: '2-digit',
  }).formatToParts(instant)
  const get = (t: string) => parts.find((p) => p.type === t)?.value ?? '00'
  return `${get('year')}-${get('month')}-${get('day')}T${get('hour')}:${get('minute')}`
}

import type { RunEntryInput, RunView, SignOffInput, SignedRunView } from '@shared/schemas/runs'
import { http } from './http'

const base = (courseId: number) => `/api/courses/${courseId}`

/** The run of a booking; a 404 `run_not_opened` carries the booking in its details. */
export const fetchRun = (courseId: number, bookingId: number) =>
  http<RunView>('GET', `${base(courseId)}/bookings/${bookingId}/run`)

export const openRun = (courseId: number, bookingId: number) =>
  http<RunView>('POST', `${base(courseId)}/bookings/${bookingId}/run`)

export const postRunEntry = (courseId: number, runId: number, entry: RunEntryInput) =>
  http<RunView>('POST', `${base(courseId)}/runs/${runId}/entries`, entry)

export const postSignOff = (courseId: number, runId: number, input: SignOffInput) =>
  http<RunView>('POST', `${base(courseId)}/runs/${runId}/sign-off`, input)

/** The caller's lab group's signed-off runs of a sheet. */
export const fetchSignedRuns = (courseId: number, moduleId: number) =>
  http<SignedRunView[]>('GET', `${base(courseId)}/modules/${moduleId}/signed-runs`)

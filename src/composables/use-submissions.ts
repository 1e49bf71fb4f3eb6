/**
 * Loading hand-ins and their results, for the hand-in page, the result page and the module's
 * hand-in panel. The form lives in `use-hand-in-form.ts` (with `use-log-upload.ts` for each log)
 * and sending in `use-hand-in-send.ts`; views and components take everything from these files.
 */
import { computed, onScopeDispose, watch } from 'vue'
import type { Ref } from 'vue'
import { formatScore, percentText, unitText, valueText, withUnit } from '@shared/format'
import { StudentModuleSpecSchema } from '@shared/schemas/student-module-spec'
import type { StudentAssignment, StudentResultSpec } from '@shared/schemas/student-module-spec'
import { isAwaitingGrade } from '@shared/schemas/submissions'
import { ApiError } from '@/api/http'
import { fetchModule } from '@/api/modules'
import { feedbackReportUrl } from '@/api/reports'
import { fetchSubmission, submissionFileUrl, submissionImageUrl } from '@/api/submissions'
import { useModuleReading } from './use-modules'
import { useResource } from './use-resource'
import type { LoadState } from './use-resource'
import { useMySubmissions } from './use-my-submissions'

// The shared wording of values, units and scores, for the hand-in and result pages.
export { formatScore, percentText, unitText, valueText, withUnit }
// Where a hand-in's file and its feedback report are downloaded from.
export { feedbackReportUrl, submissionFileUrl, submissionImageUrl }
export type { StudentAssignment, StudentResultSpec }
// Here too for the views that already import it from this file.
export { useMySubmissions }

/** Looks again at 1 s, 2 s, 3 s … up to every 5 s, for at most this long. */
const GRADE_WAIT_MS = 5 * 60_000

export function useSubmission(courseId: Ref<number>, submissionId: Ref<number>) {
  const resource = useResource(
    () => fetchSubmission(courseId.value, submissionId.value),
    () => [courseId.value, submissionId.value],
  )
  let timer: ReturnType<typeof setTimeout> | null = null
  let waitedMs = 0
  const stop = () => {
    if (timer) clearTimeout(timer)
    timer = null
  }
  watch(resource.data, (d) => {
    stop()
    if (!d || !isAwaitingGrade(d.status) || waitedMs >= GRADE_WAIT_MS) return
    const delay = Math.min(5000, 1000 + waitedMs / 4)
    waitedMs += delay
    timer = setTimeout(() => void resource.refresh(), delay)
  })
  watch([courseId, submissionId], () => (waitedMs = 0))
  onScopeDispose(stop)
  return resource
}

/**
 * Everything a result page shows: the submission, then (once its module is known) the module as
 * students read it (labels, the course's time zone) and the attempts history.
 */
export function useSubmissionPage(courseId: Ref<number>, submissionId: Ref<number>) {
  const detail = useSubmission(courseId, submissionId)
  const moduleId = computed(() => detail.data.value?.moduleId ?? null)
  const reading = useResource(
    async () => (moduleId.value === null ? null : fetchModule(courseId.value, moduleId.value)),
    () => [courseId.value, moduleId.value],
  )
  const mine = useMySubmissions(courseId, moduleId)
  // When the grade arrives, the attempts list shows it too.
  watch(
    () => detail.data.value?.status,
    (now, before) => {
      if (before && isAwaitingGrade(before) && now && !isAwaitingGrade(now)) void mine.refresh()
    },
  )
  return { detail, reading, mine }
}

/**
 * The assignment of a module's front matter as a student receives it, read with the schema the
 * server strips it with; null when the module has none. A malformed one throws (the view shows it
 * as a load error).
 */
export function studentAssignment(frontMatter: Record<string, unknown> | null | undefined): StudentAssignment | null {
  if (!frontMatter) return null
  const parsed = StudentModuleSpecSchema.safeParse(frontMatter)
  if (!parsed.success) {
    throw new Error(
      `This module's hand-in form could not be read: ${parsed.error.issues[0]?.message ?? 'unknown problem'}.`,
    )
  }
  const a = parsed.data.assignment
  return a && a.tables.length + a.measurements.length + a.images.length + a.results.length > 0 ? a : null
}

/**
 * The hand-in page: the module as students read it, my attempts, and its assignment, with one
 * loading state for the two requests.
 */
export function useHandInPage(courseId: Ref<number>, moduleId: Ref<number>) {
  const reading = useModuleReading(courseId, moduleId)
  const mine = useMySubmissions(
    courseId,
    computed(() => moduleId.value),
  )
  const parsed = computed<{ assignment: StudentAssignment | null; error: string | null }>(() => {
    try {
      return { assignment: studentAssignment(reading.data.value?.frontMatter), error: null }
    } catch (err) {
      return { assignment: null, error: err instanceof Error ? err.message : String(err) }
    }
  })
  const state = computed<LoadState>(() => {
    const states = [reading.state.value, mine.state.value]
    if (states.includes('error') || parsed.value.error) return 'error'
    if (states.every((s) => s === 'done')) return 'done'
    return 'loading'
  })
  const error = computed(
    () =>
      reading.error.value ??
      mine.error.value ??
      (parsed.value.error ? new ApiError(0, 'bad_assignment', parsed.value.error) : null),
  )
  function retry() {
    void reading.reload()
    void mine.reload()
  }
  return { reading, mine, assignment: computed(() => parsed.value.assignment), state, error, retry }
}

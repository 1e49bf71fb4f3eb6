/**
 * Grades: the staff gradebook (weights, release, CSV), a student's own grades, and re-check
 * requests. Views and components take everything from here; only this file talks to `api/grades.ts`.
 */
import { computed, ref, shallowRef } from 'vue'
import type { Ref } from 'vue'
import type { GradebookQuery, MyGradeState, RecheckStatus } from '@shared/schemas/grades'
import { RecheckAnswerSchema, RecheckRequestSchema, WeightSchema } from '@shared/schemas/grades'
import { ApiError } from '@/api/http'
import {
  deleteRelease,
  fetchGradebook,
  fetchMyGrades,
  fetchRecheck,
  gradebookCsvUrl,
  postRecheck,
  postRecheckAnswer,
  postRelease,
  putWeight,
} from '@/api/grades'
import { useResource } from './use-resource'

export const MY_GRADE_STATE_WORDS: Record<MyGradeState, string> = {
  'not-handed-in': 'not handed in',
  'awaiting-grade': 'waiting for a grade',
  hidden: 'shown once the marks are final',
  provisional: 'marked, not final yet',
  released: 'final',
}

/** A percentage for tables: one decimal, or a dash. */
export function percentText(p: number | null | undefined): string {
  return p === null || p === undefined || !Number.isFinite(p) ? '—' : `${p.toFixed(1)} %`
}

const asApiError = (err: unknown) => (err instanceof ApiError ? err : new ApiError(0, 'client_error', String(err)))

/** A first letter in capitals, for a schema message shown under its own labelled field. */
const sentence = (s: string) => s.charAt(0).toUpperCase() + s.slice(1)

/** The staff gradebook with its filters, and the instructor's actions on it. */
export function useGradebook(courseId: Ref<number>, filters: Ref<GradebookQuery>) {
  const book = useResource(
    () => fetchGradebook(courseId.value, filters.value),
    () => [courseId.value, filters.value.sectionId, filters.value.labGroupId],
  )
  const busy = ref(false)
  const actionError = shallowRef<ApiError | null>(null)
  /** A weight problem per module id. */
  const weightErrors = ref<Record<number, string>>({})
  const csvUrl = computed(() => gradebookCsvUrl(courseId.value, filters.value))

  async function run(action: () => Promise<unknown>): Promise<boolean> {
    busy.value = true
    actionError.value = null
    try {
      await action()
      await book.reload()
      return true
    } catch (err) {
      actionError.value = asApiError(err)
      return false
    } finally {
      busy.value = false
    }
  }

  /** Checks the weight with the server's own schema, then saves it. */
  async function setWeight(moduleId: number, weight: number | null): Promise<boolean> {
    const parsed = WeightSchema.safeParse({ weight: weight ?? Number.NaN })
    if (!parsed.success) {
      weightErrors.value = {
        ...weightErrors.value,
        [moduleId]: sentence(parsed.error.issues[0]?.message ?? 'enter a number.'),
      }
      return false
    }
    const next = { ...weightErrors.value }
    delete next[moduleId]
    weightErrors.value = next
    return run(() => putWeight(courseId.value, moduleId, parsed.data.weight))
  }

  const release = (moduleId: number) => run(() => postRelease(courseId.value, moduleId))
  const withdraw = (moduleId: number) => run(() => deleteRelease(courseId.value, moduleId))

  return { book, busy, actionError, weightErrors, csvUrl, setWeight, release, withdraw }
}

export function useMyGrades(courseId: Ref<number>) {
  return useResource(
    () => fetchMyGrades(courseId.value),
    () => courseId.value,
  )
}

/**
 * The re-check requests of one hand-in: the student asks, the staff answer. A 400 lands at the
 * form's field, anything else (409: not released, one already open) as a message above it.
 */
export function useRecheck(courseId: Ref<number>, submissionId: Ref<number>) {
  const status = useResource(
    () => fetchRecheck(courseId.value, submissionId.value),
    () => [courseId.value, submissionId.value],
  )
  const busy = ref(false)
  const fieldError = ref<string | null>(null)
  const actionError = shallowRef<ApiError | null>(null)

  async function send(action: () => Promise<RecheckStatus>): Promise<boolean> {
    busy.value = true
    actionError.value = null
    fieldError.value = null
    try {
      status.data.value = await action()
      return true
    } catch (err) {
      const e = asApiError(err)
      if (e.status === 400) fieldError.value = e.message
      else actionError.value = e
      return false
    } finally {
      busy.value = false
    }
  }

  async function ask(message: string): Promise<boolean> {
    const parsed = RecheckRequestSchema.safeParse({ message })
    if (!parsed.success) {
      fieldError.value = sentence(parsed.error.issues[0]?.message ?? '')
      return false
    }
    return send(() => postRecheck(courseId.value, submissionId.value, parsed.data.message))
  }

  async function answer(requestId: number, text: string): Promise<boolean> {
    const parsed = RecheckAnswerSchema.safeParse({ answer: text })
    if (!parsed.success) {
      fieldError.value = sentence(parsed.error.issues[0]?.message ?? '')
      return false
    }
    return send(() => postRecheckAnswer(courseId.value, submissionId.value, requestId, parsed.data.answer))
  }

  return { status, busy, fieldError, actionError, ask, answer }
}

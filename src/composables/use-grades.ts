/**
 * Grades: the staff gradebook (weights, release, CSV), a student's own grades, and re-check
 * requests. Views and components take everything from here; only this file talks to `api/grades.ts`.
 */
import { computed, ref } from 'vue'
import type { Ref } from 'vue'
import type { GradebookQuery, MyGradeState, RecheckStatus } from '@shared/schemas/grades'
import { RecheckAnswerSchema, RecheckRequestSchema, WeightSchema } from '@shared/schemas/grades'
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
import { useAction } from './use-action'
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

/** A first letter in capitals, for a schema message shown under its own labelled field. */
const sentence = (s: string) => s.charAt(0).toUpperCase() + s.slice(1)

/** The staff gradebook with its filters, and the instructor's actions on it. */
export function useGradebook(courseId: Ref<number>, filters: Ref<GradebookQuery>) {
  const book = useResource(
    () => fetchGradebook(courseId.value, filters.value),
    () => [courseId.value, filters.value.sectionId, filters.value.labGroupId],
  )
  // Failures show above the table (`actionError`), not as a toast.
  const action = useAction(async (write: () => Promise<unknown>) => {
    await write()
    await book.reload()
    return true
  })
  /** A weight problem per module id. */
  const weightErrors = ref<Record<number, string>>({})
  const csvUrl = computed(() => gradebookCsvUrl(courseId.value, filters.value))

  const run = async (write: () => Promise<unknown>): Promise<boolean> => (await action.run(write)) === true

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

  return { book, busy: action.busy, actionError: action.error, weightErrors, csvUrl, setWeight, release, withdraw }
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
  const fieldError = ref<string | null>(null)
  // No toast: a 400 is the field's message, anything else shows above the form.
  const action = useAction((write: () => Promise<RecheckStatus>) => write())
  const actionError = computed(() => (action.error.value?.status === 400 ? null : action.error.value))

  async function send(write: () => Promise<RecheckStatus>): Promise<boolean> {
    fieldError.value = null
    const next = await action.run(write)
    if (next) status.data.value = next
    else if (action.error.value?.status === 400) fieldError.value = action.error.value.message
    return next !== undefined
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

  return { status, busy: action.busy, fieldError, actionError, ask, answer }
}

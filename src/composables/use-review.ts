/**
 * Staff review of submissions: the queue and the actions on one submission. Views and
 * components take everything from here; only this file talks to `api/review.ts`.
 */
import { computed, ref, shallowRef } from 'vue'
import type { Ref } from 'vue'
import type { ReviewExtras, ReviewQuery, ReviewState, SettableReviewState } from '@shared/schemas/review'
import { OverrideSchema } from '@shared/schemas/review'
import type { ApiError } from '@/api/http'
import { fetchModules } from '@/api/modules'
import {
  fetchReviewExtras,
  fetchReviewQueue,
  postComment,
  postFlagAction,
  postOverride,
  postReviewStatus,
} from '@/api/review'
import { useAction } from './use-action'
import { useSubmission } from './use-submissions'
import { useResource } from './use-resource'

/** Flag codes in plain words, for the queue's tags; an unknown code is shown as it is. */
const FLAG_WORDS: Record<string, string> = {
  'thrust-above-ideal': 'thrust above ideal',
  'rule:thrust_above_ideal': 'thrust above ideal (module rule)',
  'pressure-looks-gauge': 'pressure looks gauge',
  'expression-failed': 'a check could not be worked out',
  'identical-file': 'identical file',
  'near-copy': 'near-copy of another log',
  'thrust-below-ideal': 'thrust far below ideal',
  'recheck-requested': 're-check requested',
}
export const flagWords = (code: string) => FLAG_WORDS[code] ?? code

export const REVIEW_STATUS_WORDS: Record<ReviewState, string> = {
  none: 'not flagged',
  open: 'open',
  'in-review': 'in review',
  resolved: 'resolved',
}

export type QueueQuery = Required<Pick<ReviewQuery, 'page' | 'pageSize' | 'sort' | 'order' | 'status'>> &
  Pick<ReviewQuery, 'moduleId' | 'sectionId' | 'reason'>

/** One page of the review queue; re-loads whenever the query changes (server-side paging, sorting, filters). */
export function useReviewQueue(courseId: Ref<number>, query: Ref<QueueQuery>) {
  const page = useResource(
    () => fetchReviewQueue(courseId.value, query.value),
    () => [courseId.value, JSON.stringify(query.value)],
  )
  const modules = useResource(
    () => fetchModules(courseId.value),
    () => courseId.value,
  )
  return { page, modules }
}

/** The field problem of a 400 answer: AppError's `{ field }`, or the first zod issue's path. */
function fieldProblem(err: ApiError): { field: string; message: string } | null {
  const d = err.details as { field?: unknown } | { path?: unknown; message?: unknown }[] | undefined
  if (Array.isArray(d)) {
    const first = d[0]
    if (typeof first?.path === 'string' && typeof first.message === 'string')
      return { field: first.path, message: first.message }
    return null
  }
  if (typeof d?.field === 'string') return { field: d.field, message: err.message }
  return null
}

/**
 * One submission under review: the detail (as the student sees it, with expected values), the
 * review extras, and the actions. Every action sends the revision last seen; a 409 becomes
 * `conflict` (the view offers a reload), a 400 is put at its field.
 */
export function useReviewSubmission(courseId: Ref<number>, submissionId: Ref<number>) {
  const detail = useSubmission(courseId, submissionId)
  const extras = useResource<ReviewExtras>(
    () => fetchReviewExtras(courseId.value, submissionId.value),
    () => [courseId.value, submissionId.value],
  )
  // Failures land at a field, as a conflict banner or above the forms, so no toast.
  const action = useAction(async (write: () => Promise<ReviewExtras>) => {
    extras.data.value = await write()
    // Scores, checks and flags live on the detail: fetch it again so the page shows the new state.
    await detail.reload()
    return true
  })
  const conflict = shallowRef<ApiError | null>(null)
  const actionError = shallowRef<ApiError | null>(null)
  /** Problems by form field: `points`, `reason`, `body`. */
  const fieldErrors = ref<Record<string, string>>({})
  const revision = computed(() => extras.data.value?.revision ?? 0)

  async function run(write: () => Promise<ReviewExtras>, fields: readonly string[]): Promise<boolean> {
    if (action.busy.value) return false
    actionError.value = null
    conflict.value = null
    for (const f of fields) delete fieldErrors.value[f]
    if (await action.run(write)) return true
    const e = action.error.value
    if (e?.status === 409) conflict.value = e
    else if (e) {
      const p = e.status === 400 ? fieldProblem(e) : null
      if (p && fields.includes(p.field)) fieldErrors.value[p.field] = p.message
      else actionError.value = e
    }
    return false
  }

  /** Checks the override in the browser with the server's own schema and range, then sends it. */
  async function override(
    checkId: number | null,
    points: number | null,
    reason: string,
    maxPoints: number,
  ): Promise<boolean> {
    const parsed = OverrideSchema.safeParse({ checkId, points: points ?? Number.NaN, reason, revision: revision.value })
    const errs: Record<string, string> = {}
    if (!parsed.success) {
      for (const i of parsed.error.issues) {
        const f = String(i.path[0] ?? '')
        if ((f === 'points' || f === 'reason') && !errs[f]) errs[f] = i.message
      }
    }
    if (!errs.points && points !== null && (points < 0 || points > maxPoints)) {
      errs.points =
        checkId === null
          ? `points: the total must be between 0 and ${maxPoints}.`
          : `points: this check is worth between 0 and ${maxPoints} points.`
    }
    if (points === null) errs.points = 'points: enter a number.'
    if (Object.keys(errs).length) {
      fieldErrors.value = { ...fieldErrors.value, ...errs }
      return false
    }
    fieldErrors.value = {}
    return run(() => postOverride(courseId.value, submissionId.value, parsed.data!), ['points', 'reason'])
  }

  async function comment(body: string): Promise<boolean> {
    if (body.trim() === '') {
      fieldErrors.value = { ...fieldErrors.value, body: 'body: the comment is empty.' }
      return false
    }
    return run(() => postComment(courseId.value, submissionId.value, body, revision.value), ['body'])
  }

  const flag = (flagId: number, action: 'resolve' | 'reopen') =>
    run(() => postFlagAction(courseId.value, submissionId.value, flagId, action, revision.value), [])

  const setStatus = (status: SettableReviewState) =>
    run(() => postReviewStatus(courseId.value, submissionId.value, status, revision.value), [])

  async function reloadAll() {
    conflict.value = null
    await Promise.all([detail.reload(), extras.reload()])
  }

  return {
    detail,
    extras,
    busy: action.busy,
    conflict,
    actionError,
    fieldErrors,
    override,
    comment,
    flag,
    setStatus,
    reloadAll,
  }
}

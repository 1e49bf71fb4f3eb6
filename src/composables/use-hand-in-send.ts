/**
 * Sending a hand-in: a write through `useAction` (busy, error, one request at a time) that also
 * reports how far it has got, the upload percentage and then grading. Failures are shown in place
 * by the form (its error summary), so there is no toast.
 */
import { computed, ref } from 'vue'
import type { ApiError } from '@/api/http'
import { submitHandIn } from '@/api/submissions'
import type { HandInFile } from '@/api/submissions'
import type { SubmissionFieldIssue, SubmissionPayload } from '@shared/schemas/submissions'
import type { Ref } from 'vue'
import { useAction } from './use-action'

export type { HandInFile }

export type SendState = 'idle' | 'uploading' | 'grading' | 'error'

export function useHandInSend(courseId: Ref<number>, moduleId: Ref<number>) {
  const phase = ref<'uploading' | 'grading'>('uploading')
  /** Upload progress 0–100, or null while the size is not known yet. */
  const percent = ref<number | null>(null)

  const action = useAction((files: HandInFile[], payload: SubmissionPayload, runRecordId: number | null) => {
    phase.value = 'uploading'
    percent.value = null
    return submitHandIn(
      courseId.value,
      moduleId.value,
      files,
      payload,
      (p) => {
        if (p.phase === 'grading') {
          percent.value = 100
          phase.value = 'grading'
        } else if (p.total > 0) {
          percent.value = Math.min(100, Math.round((100 * p.loaded) / p.total))
        }
      },
      runRecordId,
    )
  })

  const state = computed<SendState>(() => (action.busy.value ? phase.value : action.error.value ? 'error' : 'idle'))

  /** Sends the hand-in; the graded submission, or null when it failed (the reason is in `error`). */
  async function send(files: HandInFile[], payload: SubmissionPayload, runRecordId: number | null = null) {
    return (await action.run(files, payload, runRecordId)) ?? null
  }

  return { state, percent, error: action.error, send }
}

/**
 * The field problems of a refused hand-in, checked before use: a 422 `invalid_submission` answer's
 * list; a refused photograph (400 `photo_refused`, details `{ field: 'photo:<key>' }`); and marks the
 * server found wrong (400 `validation_failed` whose issues name `images.<key>.<mark>`).
 */
export function invalidSubmissionIssues(err: ApiError): { issues: SubmissionFieldIssue[]; more: number } | null {
  if (err.code === 'photo_refused') {
    const field = (err.details as { field?: unknown } | undefined)?.field
    return typeof field === 'string' ? { issues: [{ field, message: err.message }], more: 0 } : null
  }
  if (err.code === 'validation_failed') {
    const d = err.details as { issues?: unknown } | unknown[] | undefined
    const list: unknown[] = Array.isArray(d) ? d : Array.isArray(d?.issues) ? d.issues : []
    const issues = list.flatMap((i) => {
      const o = i as { field?: unknown; path?: unknown; message?: unknown }
      const field = typeof o.field === 'string' ? o.field : typeof o.path === 'string' ? o.path : ''
      return (field.startsWith('images.') || field.startsWith('photo:')) && typeof o.message === 'string'
        ? [{ field, message: o.message }]
        : []
    })
    return issues.length ? { issues, more: 0 } : null
  }
  if (err.code !== 'invalid_submission') return null
  const d = err.details as { issues?: unknown; more?: unknown } | undefined
  const issues = Array.isArray(d?.issues)
    ? (d.issues as unknown[]).filter(
        (i): i is SubmissionFieldIssue =>
          typeof i === 'object' &&
          i !== null &&
          typeof (i as SubmissionFieldIssue).field === 'string' &&
          typeof (i as SubmissionFieldIssue).message === 'string',
      )
    : []
  return { issues, more: typeof d?.more === 'number' ? d.more : 0 }
}

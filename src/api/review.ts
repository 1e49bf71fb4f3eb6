import type { Override, ReviewExtras, ReviewPage, ReviewQuery, SettableReviewState } from '@shared/schemas/review'
import { http } from './http'

const submissionBase = (courseId: number, submissionId: number) =>
  `/api/courses/${courseId}/submissions/${submissionId}`

/** The review queue; undefined filters are left out of the query string. */
export function fetchReviewQueue(courseId: number, q: Partial<ReviewQuery>): Promise<ReviewPage> {
  const params = new URLSearchParams()
  for (const [k, v] of Object.entries(q)) if (v !== undefined && v !== '') params.set(k, String(v))
  return http<ReviewPage>('GET', `/api/courses/${courseId}/review?${params.toString()}`)
}

export const fetchReviewExtras = (courseId: number, submissionId: number) =>
  http<ReviewExtras>('GET', `${submissionBase(courseId, submissionId)}/review`)

export const postOverride = (courseId: number, submissionId: number, o: Override) =>
  http<ReviewExtras>('POST', `${submissionBase(courseId, submissionId)}/overrides`, o)

export const postComment = (courseId: number, submissionId: number, body: string, revision: number) =>
  http<ReviewExtras>('POST', `${submissionBase(courseId, submissionId)}/comments`, { body, revision })

export const postFlagAction = (
  courseId: number,
  submissionId: number,
  flagId: number,
  action: 'resolve' | 'reopen',
  revision: number,
) => http<ReviewExtras>('POST', `${submissionBase(courseId, submissionId)}/flags/${flagId}`, { action, revision })

export const postReviewStatus = (
  courseId: number,
  submissionId: number,
  status: SettableReviewState,
  revision: number,
) => http<ReviewExtras>('POST', `${submissionBase(courseId, submissionId)}/review-status`, { status, revision })

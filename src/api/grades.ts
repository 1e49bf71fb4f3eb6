import type { Gradebook, GradebookQuery, MyGrades, RecheckStatus, ReleaseResult } from '@shared/schemas/grades'
import { http } from './http'

const courseBase = (courseId: number) => `/api/courses/${courseId}`

function filterQuery(q: GradebookQuery): string {
  const params = new URLSearchParams()
  if (q.sectionId !== undefined) params.set('sectionId', String(q.sectionId))
  if (q.labGroupId !== undefined) params.set('labGroupId', String(q.labGroupId))
  const s = params.toString()
  return s ? `?${s}` : ''
}

export const fetchGradebook = (courseId: number, q: GradebookQuery) =>
  http<Gradebook>('GET', `${courseBase(courseId)}/gradebook${filterQuery(q)}`)

/** Where the browser downloads the gradebook as CSV (same filters; served as an attachment). */
export const gradebookCsvUrl = (courseId: number, q: GradebookQuery) =>
  `${courseBase(courseId)}/gradebook.csv${filterQuery(q)}`

export const putWeight = (courseId: number, moduleId: number, weight: number) =>
  http<{ moduleId: number; weight: number }>('PUT', `${courseBase(courseId)}/gradebook/modules/${moduleId}/weight`, {
    weight,
  })

export const postRelease = (courseId: number, moduleId: number) =>
  http<ReleaseResult>('POST', `${courseBase(courseId)}/gradebook/modules/${moduleId}/release`)

export const deleteRelease = (courseId: number, moduleId: number) =>
  http<ReleaseResult>('DELETE', `${courseBase(courseId)}/gradebook/modules/${moduleId}/release`)

export const fetchMyGrades = (courseId: number) => http<MyGrades>('GET', `${courseBase(courseId)}/my-grades`)

export const fetchRecheck = (courseId: number, submissionId: number) =>
  http<RecheckStatus>('GET', `${courseBase(courseId)}/submissions/${submissionId}/recheck`)

export const postRecheck = (courseId: number, submissionId: number, message: string) =>
  http<RecheckStatus>('POST', `${courseBase(courseId)}/submissions/${submissionId}/recheck`, { message })

export const postRecheckAnswer = (courseId: number, submissionId: number, requestId: number, answer: string) =>
  http<RecheckStatus>('POST', `${courseBase(courseId)}/submissions/${submissionId}/recheck/${requestId}/answer`, {
    answer,
  })

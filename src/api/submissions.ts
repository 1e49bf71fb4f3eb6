import type { MySubmissions, SubmissionDetail, SubmissionPayload } from '@shared/schemas/submissions'
import { ApiError, apiErrorFrom, csrfHeader, http } from './http'

const moduleBase = (courseId: number, moduleId: number) => `/api/courses/${courseId}/modules/${moduleId}/submissions`
const submissionBase = (courseId: number, submissionId: number) =>
  `/api/courses/${courseId}/submissions/${submissionId}`

export const fetchMySubmissions = (courseId: number, moduleId: number) =>
  http<MySubmissions>('GET', `${moduleBase(courseId, moduleId)}/mine`)

export const fetchSubmission = (courseId: number, submissionId: number) =>
  http<SubmissionDetail>('GET', submissionBase(courseId, submissionId))

/** Where a hand-in's photograph is shown from (the stored, re-encoded picture, inline). */
export const submissionImageUrl = (courseId: number, submissionId: number, imageKey: string) =>
  `${submissionBase(courseId, submissionId)}/images/${encodeURIComponent(imageKey)}`

/** Where the raw uploaded file is downloaded from (served as an attachment). */
export const submissionFileUrl = (courseId: number, submissionId: number, fileId: number) =>
  `${submissionBase(courseId, submissionId)}/files/${fileId}`

/** One file of a hand-in: a log for a table of the assignment, or a photograph (`photo:<key>`). */
export type HandInFile =
  { tableKey: string; file: Blob; filename: string } | { photoKey: string; file: Blob; filename: string }

/** How far a hand-in has got: bytes sent, then waiting for the server to grade it. */
export type HandInProgress = { phase: 'uploading'; loaded: number; total: number } | { phase: 'grading' }

/**
 * Sends a hand-in as multipart/form-data: the JSON `payload` field, one `table:<key>` file per
 * table and one `photo:<key>` file per photograph. XMLHttpRequest rather than fetch because only it reports upload progress.
 * https://developer.mozilla.org/en-US/docs/Web/API/XMLHttpRequest/upload
 *
 * @returns the graded submission (201)
 * @throws ApiError with the server's code, message and details (422 lists the field problems)
 */
export function submitHandIn(
  courseId: number,
  moduleId: number,
  files: readonly HandInFile[],
  payload: SubmissionPayload,
  onProgress: (p: HandInProgress) => void,
  runRecordId: number | null = null,
): Promise<SubmissionDetail> {
  const form = new FormData()
  form.append('payload', JSON.stringify(payload))
  // The signed-off stand run the hand-in is made against (sheets that require one).
  if (runRecordId !== null) form.append('runRecordId', String(runRecordId))
  for (const f of files) {
    form.append('photoKey' in f ? `photo:${f.photoKey}` : `table:${f.tableKey}`, f.file, f.filename)
  }

  return new Promise((resolve, reject) => {
    const xhr = new XMLHttpRequest()
    xhr.open('POST', moduleBase(courseId, moduleId))
    xhr.setRequestHeader('Accept', 'application/json')
    for (const [name, value] of Object.entries(csrfHeader())) xhr.setRequestHeader(name, value)
    xhr.responseType = 'text'

    let grading = false
    const toGrading = () => {
      if (grading) return
      grading = true
      onProgress({ phase: 'grading' })
    }
    // Upload listeners must be attached before send(), or the browser may not report progress.
    xhr.upload.addEventListener('progress', (e) => {
      if (grading) return
      onProgress({ phase: 'uploading', loaded: e.loaded, total: e.lengthComputable ? e.total : 0 })
    })
    xhr.upload.addEventListener('load', toGrading)
    xhr.addEventListener('readystatechange', () => {
      // Headers back before the upload reported its end: the server answered early (e.g. a refusal).
      if (xhr.readyState >= XMLHttpRequest.HEADERS_RECEIVED) toGrading()
    })
    xhr.addEventListener('load', () => {
      const text = typeof xhr.response === 'string' ? xhr.response : ''
      if (xhr.status >= 200 && xhr.status < 300) {
        try {
          resolve(JSON.parse(text) as SubmissionDetail)
        } catch {
          reject(
            new ApiError(
              xhr.status,
              'bad_response',
              'The server accepted the hand-in but its answer could not be read. Open the module to see your attempts.',
            ),
          )
        }
        return
      }
      reject(apiErrorFrom(xhr.status, xhr.statusText, text))
    })
    xhr.addEventListener('error', () =>
      reject(
        new ApiError(
          0,
          'network_error',
          'The connection to the Isentrope server broke off while sending. A file over the server’s size limit (20 MB unless your course set another) is refused this way; otherwise check your connection. Open the module to see whether the attempt was recorded before trying again.',
        ),
      ),
    )
    xhr.addEventListener('abort', () =>
      reject(new ApiError(0, 'aborted', 'The hand-in was cancelled before it was sent.')),
    )
    onProgress({ phase: 'uploading', loaded: 0, total: 0 })
    xhr.send(form)
  })
}

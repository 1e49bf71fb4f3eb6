import type { CloseCourse, CourseClosedState } from '@shared/schemas/course-closing'
import { http } from './http'

const base = (courseId: number) => `/api/courses/${courseId}`

/** The whole course as one zip (instructors, site administrators): a plain download link. */
export const courseArchiveUrl = (courseId: number) => `${base(courseId)}/archive.zip`
export const postCloseCourse = (courseId: number, body: CloseCourse) =>
  http<CourseClosedState>('POST', `${base(courseId)}/close`, body)
export const postReopenCourse = (courseId: number) => http<CourseClosedState>('POST', `${base(courseId)}/reopen`)

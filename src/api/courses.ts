import type { CourseHome, CourseKeys, CourseSummary, RosterEntry } from '@shared/schemas/courses'
import { http } from './http'

export const fetchMyCourses = () => http<CourseSummary[]>('GET', '/api/courses')
export const fetchCourseHome = (courseId: number) => http<CourseHome>('GET', `/api/courses/${courseId}`)
export const fetchRoster = (courseId: number) => http<RosterEntry[]>('GET', `/api/courses/${courseId}/roster`)
export const fetchCourseKeys = (courseSlug: string) =>
  http<CourseKeys>('GET', `/api/course-keys/${encodeURIComponent(courseSlug)}`)
export const fetchCourseKeysById = (courseId: number) => http<CourseKeys>('GET', `/api/course-keys/by-id/${courseId}`)

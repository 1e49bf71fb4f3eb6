import type { Ref } from 'vue'
import { fetchCourseHome, fetchMyCourses, fetchRoster } from '@/api/courses'
import { useResource } from './use-resource'

export function useMyCourses() {
  return useResource(fetchMyCourses)
}

export function useCourseHome(courseId: Ref<number>) {
  return useResource(() => fetchCourseHome(courseId.value), courseId)
}

export function useRoster(courseId: Ref<number>) {
  return useResource(() => fetchRoster(courseId.value), courseId)
}

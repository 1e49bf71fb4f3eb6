import { computed } from 'vue'
import type { ComputedRef, Ref } from 'vue'
import type { CourseRole } from '@shared/schemas/auth'
import { useCourseRolesStore } from '@/stores/course-roles'
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

/**
 * The signed-in person's role in a course (null until known), from the shared roles store: no
 * extra request per page once "my courses" has been read.
 */
export function useCourseRole(courseId: Ref<number>): ComputedRef<CourseRole | null> {
  const roles = useCourseRolesStore()
  return computed(() => roles.roleIn(courseId.value))
}

/**
 * The course's time zone (null until known), from the shared roles store: times on every page are
 * shown in the course's zone, with the zone named, whatever the viewer's own clock says.
 */
export function useCourseTimeZone(courseId: Ref<number>): ComputedRef<string | null> {
  const roles = useCourseRolesStore()
  return computed(() => roles.timeZoneIn(courseId.value))
}

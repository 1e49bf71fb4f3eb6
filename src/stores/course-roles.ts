import { defineStore } from 'pinia'
import { ref, watch } from 'vue'
import type { CourseRole } from '@shared/schemas/auth'
import { fetchMyCourses } from '@/api/courses'
import { useSessionStore } from './session'

/**
 * The signed-in person's role in each of their courses, loaded once from "my courses" and shared
 * by every course page's navigation. Forgotten when a different person signs in (or out).
 */
export const useCourseRolesStore = defineStore('course-roles', () => {
  const session = useSessionStore()
  const roles = ref<Record<number, CourseRole>>({})
  /** Each course's IANA time zone, from the same list: pages show times in it. */
  const zones = ref<Record<number, string>>({})
  let loadedFor: number | null = null
  let loading: Promise<void> | null = null
  /** Courses missing from a loaded list that were asked about once more (a newer enrollment). */
  const rechecked = new Set<number>()

  watch(
    () => session.user?.id ?? null,
    () => {
      roles.value = {}
      zones.value = {}
      loadedFor = null
      rechecked.clear()
    },
  )

  function load(again = false): Promise<void> {
    const userId = session.user?.id ?? null
    if (userId === null || (loadedFor === userId && !again)) return Promise.resolve()
    loading ??= fetchMyCourses()
      .then((list) => {
        if ((session.user?.id ?? null) !== userId) return
        roles.value = Object.fromEntries(list.map((c) => [c.id, c.role]))
        zones.value = Object.fromEntries(list.map((c) => [c.id, c.timeZone]))
        loadedFor = userId
      })
      // Navigation falls back to the links every member has; the page itself reports errors.
      .catch(() => undefined)
      .finally(() => {
        loading = null
      })
    return loading
  }

  /**
   * The role in one course, or null until it is known (starts loading on first ask). A course
   * the loaded list lacks is looked up once more, for someone enrolled since the list was read.
   */
  function roleIn(courseId: number): CourseRole | null {
    const known = roles.value[courseId]
    if (known === undefined) {
      const userId = session.user?.id ?? null
      if (loadedFor !== null && loadedFor === userId && !rechecked.has(courseId)) {
        rechecked.add(courseId)
        void load(true)
      } else void load()
    }
    return known ?? null
  }

  /** The course's time zone, or null until known (loads like `roleIn`). */
  function timeZoneIn(courseId: number): string | null {
    roleIn(courseId)
    return zones.value[courseId] ?? null
  }

  return { roleIn, timeZoneIn }
})

import { defineStore } from 'pinia'
import { ref, watch } from 'vue'
import type { CourseKeys } from '@shared/schemas/courses'
import { fetchCourseKeys, fetchCourseKeysById } from '@/api/courses'
import { useSessionStore } from './session'

/**
 * How page addresses map to ids: `/c/<course slug>/sheets/<sheet slug>` for people, numeric ids for
 * the API. The router fills this before it opens a course page, so views keep their numeric props
 * and links can be written from ids. Forgotten when a different person signs in (or out).
 */
export const useCourseKeysStore = defineStore('course-keys', () => {
  const session = useSessionStore()
  const byId = ref<Record<number, CourseKeys>>({})

  watch(
    () => session.user?.id ?? null,
    () => {
      byId.value = {}
    },
  )

  function keep(keys: CourseKeys): CourseKeys {
    byId.value = { ...byId.value, [keys.courseId]: keys }
    return keys
  }

  const known = (slug: string) => Object.values(byId.value).find((k) => k.slug === slug)

  /**
   * The keys of the course with this slug. A sheet slug (or sheet id) it does not list yet asks the
   * server again: a sheet made or issued since the keys were read. Throws the server's 404.
   */
  async function bySlug(courseSlug: string, sheet?: { slug?: string; id?: number }): Promise<CourseKeys> {
    const have = known(courseSlug)
    if (have && !missing(have, sheet)) return have
    return keep(await fetchCourseKeys(courseSlug))
  }

  /** The same for an old numeric address. */
  async function byCourseId(courseId: number, sheet?: { slug?: string; id?: number }): Promise<CourseKeys> {
    const have = byId.value[courseId]
    if (have && !missing(have, sheet)) return have
    return keep(await fetchCourseKeysById(courseId))
  }

  function missing(k: CourseKeys, sheet?: { slug?: string; id?: number }): boolean {
    if (!sheet) return false
    return !k.sheets.some(
      (s) => (sheet.slug === undefined || s.slug === sheet.slug) && (sheet.id === undefined || s.id === sheet.id),
    )
  }

  const courseId = (courseSlug: string): number | undefined => known(courseSlug)?.courseId
  const sheetId = (courseSlug: string, sheetSlug: string): number | undefined =>
    known(courseSlug)?.sheets.find((s) => s.slug === sheetSlug)?.id
  const courseSlug = (id: number): string | undefined => byId.value[id]?.slug
  const sheetSlug = (id: number, moduleId: number): string | undefined =>
    byId.value[id]?.sheets.find((s) => s.id === moduleId)?.slug

  return { bySlug, byCourseId, courseId, sheetId, courseSlug, sheetSlug }
})

import { toValue, type MaybeRefOrGetter } from 'vue'
import type { RouteLocationRaw } from 'vue-router'
import { useCourseKeysStore } from '@/stores/course-keys'

/**
 * Links to a course's pages, written from the numeric ids views hold. The addresses people see use
 * the course's and the sheet's slugs (from the keys store, which the router fills); a sheet whose
 * slug is not known yet (just created) gets its numeric address, which the router turns into the
 * readable one.
 */
export function useCourseLinks(courseId: MaybeRefOrGetter<number>) {
  const keys = useCourseKeysStore()
  const course = (): string | undefined => keys.courseSlug(toValue(courseId))
  const legacy = (rest: string): string => `/courses/${toValue(courseId)}${rest}`

  const page = (name: string, rest: string): RouteLocationRaw => {
    const c = course()
    return c ? { name, params: { course: c } } : legacy(rest)
  }
  const sheetPage = (name: string, moduleId: number, rest: string): RouteLocationRaw => {
    const c = course()
    const s = keys.sheetSlug(toValue(courseId), moduleId)
    return c && s ? { name, params: { course: c, sheet: s } } : legacy(`/modules/${moduleId}${rest}`)
  }
  const numbered = (name: string, submissionId: number, rest: string): RouteLocationRaw => {
    const c = course()
    return c ? { name, params: { course: c, submissionId } } : legacy(`${rest}/${submissionId}`)
  }

  return {
    home: () => page('course-home', ''),
    roster: () => page('course-roster', '/roster'),
    rosterImport: () => page('roster-import', '/roster/import'),
    sections: () => page('course-sections', '/sections'),
    rollover: () => page('course-rollover', '/next-term'),
    reviewQueue: () => page('review-queue', '/review'),
    marks: () => page('marks', '/gradebook'),
    myMarks: () => page('my-marks', '/grades'),
    stands: () => page('stands', '/stands'),
    standTime: () => page('stand-time', '/stand-time'),
    sheet: (moduleId: number) => sheetPage('sheet', moduleId, ''),
    sheetEdit: (moduleId: number) => sheetPage('sheet-edit', moduleId, '/edit'),
    handIn: (moduleId: number) => sheetPage('hand-in', moduleId, '/hand-in'),
    result: (submissionId: number) => numbered('hand-in-result', submissionId, '/submissions'),
    review: (submissionId: number) => numbered('review-submission', submissionId, '/review'),
  }
}

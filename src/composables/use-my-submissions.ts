import { ref } from 'vue'
import type { Ref } from 'vue'
import { fetchMySubmissions } from '@/api/submissions'
import { useResource } from './use-resource'

// Apart from use-submissions.ts so that a module's reading page, which lists the attempts, does not
// download the hand-in form's CSV reader and schemas with it.

/** My (or my lab group's) attempts at a module; nothing is loaded while `enabled` is false. */
export function useMySubmissions(
  courseId: Ref<number>,
  moduleId: Ref<number | null>,
  enabled: Ref<boolean> = ref(true),
) {
  return useResource(
    async () => (enabled.value && moduleId.value !== null ? fetchMySubmissions(courseId.value, moduleId.value) : null),
    () => [courseId.value, moduleId.value, enabled.value],
  )
}

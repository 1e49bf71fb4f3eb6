import type { Ref } from 'vue'
import { fetchModule, fetchModuleForEditing, fetchModules, fetchVersions } from '@/api/modules'
import { useResource } from './use-resource'

export function useModuleList(courseId: Ref<number>) {
  return useResource(() => fetchModules(courseId.value), courseId)
}

export function useModuleReading(courseId: Ref<number>, moduleId: Ref<number>) {
  return useResource(() => fetchModule(courseId.value, moduleId.value), () => [courseId.value, moduleId.value])
}

export function useModuleEditing(courseId: Ref<number>, moduleId: Ref<number>) {
  return useResource(() => fetchModuleForEditing(courseId.value, moduleId.value), () => [courseId.value, moduleId.value])
}

export function useModuleVersions(courseId: Ref<number>, moduleId: Ref<number>) {
  return useResource(() => fetchVersions(courseId.value, moduleId.value), () => [courseId.value, moduleId.value])
}

import type { Ref } from 'vue'
import {
  createModule,
  exportUrl,
  fetchDiff,
  fetchModule,
  fetchModuleForEditing,
  fetchModules,
  fetchVersions,
  publishModule,
  saveModule,
  unpublishModule,
} from '@/api/modules'
import { useResource } from './use-resource'

export function useModuleList(courseId: Ref<number>) {
  return useResource(() => fetchModules(courseId.value), courseId)
}

export function useModuleReading(courseId: Ref<number>, moduleId: Ref<number>) {
  return useResource(
    () => fetchModule(courseId.value, moduleId.value),
    () => [courseId.value, moduleId.value],
  )
}

export function useModuleEditing(courseId: Ref<number>, moduleId: Ref<number>) {
  return useResource(
    () => fetchModuleForEditing(courseId.value, moduleId.value),
    () => [courseId.value, moduleId.value],
  )
}

export function useModuleVersions(courseId: Ref<number>, moduleId: Ref<number>) {
  return useResource(
    () => fetchVersions(courseId.value, moduleId.value),
    () => [courseId.value, moduleId.value],
  )
}

/** A new module in the course (from the starter text or an imported file). */
export function useModuleCreate(courseId: Ref<number>) {
  return { create: (source: string) => createModule(courseId.value, source) }
}

/** The line diff between two versions of a module. */
export function useVersionDiff(courseId: Ref<number>, moduleId: Ref<number>) {
  return { compare: (from: number, to: number) => fetchDiff(courseId.value, moduleId.value, from, to) }
}

/** The editor's writes: save a draft on top of a version, publish a version, withdraw, and the export link. */
export function useModuleWrites(courseId: Ref<number>, moduleId: Ref<number>) {
  return {
    save: (source: string, baseVersionId: number) => saveModule(courseId.value, moduleId.value, source, baseVersionId),
    publish: (versionId: number) => publishModule(courseId.value, moduleId.value, versionId),
    unpublish: () => unpublishModule(courseId.value, moduleId.value),
    exportHref: () => exportUrl(courseId.value, moduleId.value),
  }
}

import type {
  ModuleDiff,
  ModuleEditing,
  ModuleListItem,
  ModulePreview,
  ModuleReading,
  PublishResult,
  VersionSummary,
} from '@shared/schemas/modules'
import { http } from './http'

const base = (courseId: number) => `/api/courses/${courseId}/modules`

export const fetchModules = (courseId: number) => http<ModuleListItem[]>('GET', base(courseId))
export const fetchModule = (courseId: number, moduleId: number) =>
  http<ModuleReading>('GET', `${base(courseId)}/${moduleId}`)
export const fetchModuleForEditing = (courseId: number, moduleId: number) =>
  http<ModuleEditing>('GET', `${base(courseId)}/${moduleId}/edit`)
export const createModule = (courseId: number, source: string) =>
  http<ModuleEditing>('POST', base(courseId), { source })
export const saveModule = (courseId: number, moduleId: number, source: string, baseVersionId: number) =>
  http<ModuleEditing>('PUT', `${base(courseId)}/${moduleId}`, { source, baseVersionId })
export const previewModule = (courseId: number, moduleId: number, source: string) =>
  http<ModulePreview>('POST', `${base(courseId)}/${moduleId}/preview`, { source })
export const publishModule = (courseId: number, moduleId: number, versionId: number) =>
  http<PublishResult>('POST', `${base(courseId)}/${moduleId}/publish`, { versionId })
export const unpublishModule = (courseId: number, moduleId: number) =>
  http<ModuleListItem>('POST', `${base(courseId)}/${moduleId}/unpublish`)
export const fetchVersions = (courseId: number, moduleId: number) =>
  http<VersionSummary[]>('GET', `${base(courseId)}/${moduleId}/versions`)
export const fetchDiff = (courseId: number, moduleId: number, from: number, to: number) =>
  http<ModuleDiff>('GET', `${base(courseId)}/${moduleId}/diff?from=${from}&to=${to}`)
export const exportUrl = (courseId: number, moduleId: number) => `${base(courseId)}/${moduleId}/export`

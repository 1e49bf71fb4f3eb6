import type { RosterImportPreview, RosterImportRequest, RosterImportResult } from '@shared/schemas/roster-import'
import { http } from './http'

const base = (courseId: number) => `/api/courses/${courseId}/roster/import`

export const previewRosterImport = (courseId: number, body: RosterImportRequest) =>
  http<RosterImportPreview>('POST', `${base(courseId)}/preview`, body)
export const confirmRosterImport = (courseId: number, body: RosterImportRequest) =>
  http<RosterImportResult>('POST', base(courseId), body)

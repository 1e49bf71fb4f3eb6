import type { RosterImportPreview, RosterImportResult } from '@shared/schemas/roster-import'
import { http } from './http'

const base = (courseId: number) => `/api/courses/${courseId}/roster/import`

export const previewRosterImport = (courseId: number, csv: string) =>
  http<RosterImportPreview>('POST', `${base(courseId)}/preview`, { csv })
export const confirmRosterImport = (courseId: number, csv: string) =>
  http<RosterImportResult>('POST', base(courseId), { csv })

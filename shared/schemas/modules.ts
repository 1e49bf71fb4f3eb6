import { z } from 'zod'
import { utf8ByteLength } from '../text'

/** 1 MB of Markdown is the most a module may hold. */
export const MODULE_SOURCE_LIMIT_BYTES = 1_048_576

export const ModuleSourceSchema = z
  .string({ error: 'source: the module text is missing.' })
  .min(1, 'source: the module text is empty.')
  .refine((s) => utf8ByteLength(s) <= MODULE_SOURCE_LIMIT_BYTES, {
    message: 'source: the module is larger than 1 MB; split it into smaller modules.',
  })

export const CreateModuleSchema = z.object({ source: ModuleSourceSchema })
export const SaveModuleSchema = z.object({
  source: ModuleSourceSchema,
  /** The version the editor started from; a different current version means someone else saved. */
  baseVersionId: z.number().int().positive(),
})
/** The editor's unsaved text, to preview. */
export const PreviewModuleSchema = z.object({ source: ModuleSourceSchema })
export const PublishModuleSchema = z.object({ versionId: z.number().int().positive() })

export const ModuleParamsSchema = z.object({
  courseId: z.coerce.number().int().positive('courseId must be a positive whole number.'),
  moduleId: z.coerce.number().int().positive('moduleId must be a positive whole number.'),
})
export const VersionParamsSchema = ModuleParamsSchema.extend({
  versionId: z.coerce.number().int().positive('versionId must be a positive whole number.'),
})
export const DiffQuerySchema = z.object({
  from: z.coerce.number().int().positive('from must be a version id.'),
  to: z.coerce.number().int().positive('to must be a version id.'),
})

export type ModuleStatus = 'draft' | 'published' | 'closed'
export type VersionStatus = 'draft' | 'published' | 'superseded'

export interface ModuleIssue {
  path: string
  message: string
  line?: number
}

export interface ModuleListItem {
  id: number
  slug: string
  title: string
  status: ModuleStatus
  dueAt: string | null
  /** Staff only: the version being edited, and whether it differs from what students read. */
  currentVersion?: { id: number; number: number; status: VersionStatus; valid: boolean }
  publishedVersionNumber: number | null
  hasAssignment: boolean
  /** Staff only: hand-ins so far. */
  submissionCount?: number
}

export interface VersionSummary {
  id: number
  number: number
  status: VersionStatus
  title: string
  valid: boolean
  createdBy: string | null
  createdAt: string
  updatedBy: string | null
  updatedAt: string
  publishedBy: string | null
  publishedAt: string | null
}

/** What a student reads: the published version, without the grading expressions. */
export interface ModuleReading {
  id: number
  courseId: number
  slug: string
  status: ModuleStatus
  title: string
  html: string
  dueAt: string | null
  timeZone: string
  version: { id: number; number: number; publishedAt: string | null }
  frontMatter: Record<string, unknown> | null
}

/** What staff edit: the current version's source with its validation issues. */
/** What saving the editor's text would store (title, HTML, due date, problems), without storing it. */
export interface ModulePreview {
  title: string
  html: string
  dueAt: string | null
  issues: ModuleIssue[]
}

export interface ModuleEditing {
  id: number
  courseId: number
  slug: string
  status: ModuleStatus
  timeZone: string
  current: VersionSummary & { source: string; html: string; issues: ModuleIssue[]; dueAt: string | null }
  published: VersionSummary | null
  /** How many students a publish would e-mail. */
  studentCount: number
}

export interface PublishResult {
  module: ModuleListItem
  emailed: number
}

export interface ModuleDiff {
  from: VersionSummary
  to: VersionSummary
  added: number
  removed: number
  hunks: { oldStart: number; newStart: number; lines: { kind: 'add' | 'del' | 'ctx'; text: string }[] }[]
}

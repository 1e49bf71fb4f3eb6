import { z } from 'zod'

/** At most this many people in one import (split bigger classes into several files). */
export const ROSTER_IMPORT_MAX_ROWS = 2000
/** At most this many bytes of CSV text (UTF-8): 2000 rows of about 130 characters. */
export const ROSTER_IMPORT_MAX_BYTES = 256 * 1024

/** Roles an import may give; instructors are never added or changed by an import. */
export const ImportRoleSchema = z.enum(['student', 'ta'])
export type ImportRole = z.infer<typeof ImportRoleSchema>

/**
 * Body of both the preview and the confirm request: the CSV text itself. The character limit
 * here is a first guard (UTF-8 never has fewer bytes than UTF-16 code units); the parser checks
 * the exact byte size.
 */
export const RosterImportRequestSchema = z.object({
  csv: z
    .string({ error: 'csv: send the roster as CSV text.' })
    .min(1, 'csv: the roster is empty. Choose a CSV file or paste the rows.')
    .max(ROSTER_IMPORT_MAX_BYTES, `csv: the roster is larger than ${ROSTER_IMPORT_MAX_BYTES / 1024} KB.`),
})
export type RosterImportRequest = z.infer<typeof RosterImportRequestSchema>

/** A problem with the file as a whole: nothing of it can be imported. */
export interface RosterFileProblem {
  message: string
  /** Columns concerned, e.g. the missing required ones. */
  columns?: string[]
}

/** A problem with one cell of one row; `column` is the roster column's name (email, name, role, section, group). */
export interface RosterRowProblem {
  column: 'email' | 'name' | 'role' | 'section' | 'group'
  message: string
}

/**
 * One person of the file as the server will treat them:
 * - `new`: no account yet; one is created (no password), enrolled and sent an invitation.
 * - `existing`: an account exists; `changes` lists what the import does (empty: nothing).
 * - `invalid`: refused; `problems` say why, each naming its column.
 */
export interface RosterImportRow {
  /** The row as a spreadsheet numbers it (the header is row 1). */
  row: number
  email: string
  displayName: string
  role: ImportRole
  section: string | null
  group: string | null
  kind: 'new' | 'existing' | 'invalid'
  changes: string[]
  problems: RosterRowProblem[]
  /** A set-password invitation will be e-mailed to this person. */
  invite: boolean
  /** An e-mail saying they were added to the course will be sent (accounts that already have a password). */
  notify: boolean
}

export interface RosterImportCounts {
  rows: number
  new: number
  /** Existing accounts the import changes (enrolment, role, section or group). */
  changed: number
  /** Existing accounts already enrolled exactly as the file says. */
  unchanged: number
  invalid: number
  invitations: number
  enrollmentMails: number
}

export interface RosterImportPreview {
  /** True when no row is invalid, so the import can be confirmed. */
  ok: boolean
  rows: RosterImportRow[]
  counts: RosterImportCounts
  /** Sections and lab groups the import will create (named in the file, not yet in the course). */
  newSections: string[]
  newGroups: string[]
  /** Header cells that were not read (not one of the roster's columns). */
  ignoredColumns: string[]
  /** How long each set-password link stays valid, in hours (the server's setting). */
  invitationValidHours: number
}

export interface RosterImportResult {
  created: number
  enrolled: number
  updated: number
  unchanged: number
  invitationsSent: number
  enrollmentMailsSent: number
  sectionsCreated: string[]
  groupsCreated: string[]
}

/** `details` of a refused file (code `roster_file_refused`). */
export interface RosterFileRefusal {
  problems: RosterFileProblem[]
}

/** `details` of a refused confirm with invalid rows (code `roster_rows_invalid`). */
export interface RosterRowsRefusal {
  preview: RosterImportPreview
}

import { z } from 'zod'

/** At most this many people in one import (split bigger classes into several files). */
export const ROSTER_IMPORT_MAX_ROWS = 2000
/** At most this many bytes of CSV text (UTF-8): 2000 rows of about 130 characters. */
export const ROSTER_IMPORT_MAX_BYTES = 256 * 1024

/** Roles an import may give; instructors are never added or changed by an import. */
export const ImportRoleSchema = z.enum(['student', 'ta'])
export type ImportRole = z.infer<typeof ImportRoleSchema>

/** Base64 of at most ROSTER_IMPORT_MAX_BYTES bytes (4 characters per 3 bytes). */
const MAX_BASE64_CHARS = Math.ceil(ROSTER_IMPORT_MAX_BYTES / 3) * 4

/** How a roster's text was obtained: the file's bytes as detected, or text typed or pasted on the page. */
export const RosterEncodingSchema = z.enum(['utf-8', 'utf-8-bom', 'utf-16', 'windows-1252', 'text'])
export type RosterEncoding = z.infer<typeof RosterEncodingSchema>

/**
 * Languages whose names are written family name first; a file declared as one of these joins
 * separate name columns that way. Any other tag (en, de-AT, …) means given name first.
 */
export const FAMILY_NAME_FIRST_LANGUAGES = ['zh', 'ja', 'ko', 'hu', 'vi', 'mn'] as const

/** A row the instructor unticked in the preview: a move that is not to be made. */
export const RosterSkipSchema = z.object({
  row: z
    .number({ error: 'skip: each entry needs its row number.' })
    .int()
    .min(2)
    .max(ROSTER_IMPORT_MAX_ROWS + 10_000),
  email: z.string({ error: 'skip: each entry needs the e-mail address of its row.' }).max(254),
})
export type RosterSkip = z.infer<typeof RosterSkipSchema>

/**
 * Body of both the preview and the confirm request: the file's bytes (base64, decoded and read by
 * the server itself) or text typed or pasted on the page. The length limits here are a first
 * guard; the reader checks the exact byte size. `locale` declares the file's language when the
 * header does not show it (a BCP 47 tag such as "hu" or "ja-JP"); `skip` (confirm only) lists the
 * moves the instructor unticked.
 */
export const RosterImportRequestSchema = z
  .object({
    csv: z
      .string({ error: 'csv: send the roster as CSV text.' })
      .min(1, 'csv: the roster is empty. Choose a CSV file or paste the rows.')
      .max(ROSTER_IMPORT_MAX_BYTES, `csv: the roster is larger than ${ROSTER_IMPORT_MAX_BYTES / 1024} KB.`)
      .optional(),
    file: z
      .string({ error: 'file: send the file as base64 text.' })
      .min(1, 'file: the file is empty. Choose a CSV file with a header row and one row per person.')
      .max(MAX_BASE64_CHARS, `file: the file is larger than ${ROSTER_IMPORT_MAX_BYTES / 1024} KB.`)
      .regex(/^[A-Za-z0-9+/]*={0,2}$/, 'file: not base64 text.')
      .optional(),
    locale: z
      .string()
      .regex(/^[A-Za-z]{2,3}(?:-[A-Za-z0-9]{2,8})*$/, 'locale: a language tag such as en, hu or ja-JP.')
      .optional(),
    skip: z.array(RosterSkipSchema).max(ROSTER_IMPORT_MAX_ROWS, 'skip: more entries than rows.').default([]),
  })
  .refine((b) => (b.csv === undefined) !== (b.file === undefined), {
    message: 'csv: send either the CSV text (csv) or the file (file), one of the two.',
    path: ['csv'],
  })
export type RosterImportRequest = z.input<typeof RosterImportRequestSchema>

/** Which header cell each roster field was read from, and how the file was read. */
export interface RosterFileReading {
  encoding: RosterEncoding
  /** The field separator found: ",", ";" or a tab. */
  delimiter: string
  /** Field → the header cell(s) it came from, e.g. name → ["Last name", "First name"] in joining order. */
  columns: Partial<Record<'email' | 'name' | 'role' | 'section' | 'group', string[]>>
  /** Set when the name is joined from two columns: which part comes first, and why. */
  nameOrder: { order: 'given-first' | 'family-first'; because: string } | null
}

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
  /**
   * The row moves an enrolled person out of their section or lab group, in words ("moves from
   * Group A1 to Group A3"); empty when it does not. Such rows can be left out of the confirm.
   */
  moves: string[]
  problems: RosterRowProblem[]
  /** A set-password invitation will be e-mailed to this person. */
  invite: boolean
  /** An e-mail saying they were added to the course will be sent (accounts that already have a password). */
  notify: boolean
}

export interface RosterImportCounts {
  rows: number
  new: number
  /** Existing accounts the import changes (enrolment, role, a first section or group), moves not included. */
  changed: number
  /** Enrolled people the import moves to another section or lab group. */
  moves: number
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
  /** How the file was read: encoding, separator, and the header cell behind each field. */
  reading: RosterFileReading
  /** How long each set-password link stays valid, in hours (the server's setting). */
  invitationValidHours: number
}

export interface RosterImportResult {
  created: number
  enrolled: number
  updated: number
  unchanged: number
  /** Moves left out because the instructor unticked them. */
  skipped: number
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

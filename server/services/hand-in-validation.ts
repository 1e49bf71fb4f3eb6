import { checkHandIn } from '../../shared/grading/check-hand-in'
import type { HandInLog } from '../../shared/grading/check-hand-in'
import { parseLog } from '../../shared/grading/csv'
import { count } from '../../shared/grading/csv-limits'
import type { ModuleFrontMatter, TableSpec } from '../../shared/modules/schema'
import type { SubmissionFieldIssue, SubmissionPayload } from '../../shared/schemas/submissions'
import type { SubmissionInputs } from '../db/schema'
import { AppError } from '../errors'

export { readingSense } from '../../shared/grading/check-hand-in'

/** A file part of a hand-in as the route received it. */
export interface UploadedTable {
  field: string
  filename: string
  contentType: string
  bytes: Buffer
}

/** At most this many problems go back with a refused hand-in; `more` counts the others. */
export const MAX_SHOWN_ISSUES = 20

/**
 * The hand-in check of shared/grading/check-hand-in.ts run on the bytes the server received (the
 * form ran the same check in the browser), plus what the service stores: the values as typed and
 * each accepted file with its parsed columns.
 */
export function validateHandIn(fm: ModuleFrontMatter, payload: SubmissionPayload, uploads: UploadedTable[]) {
  const a = fm.assignment!
  const logs: Record<string, HandInLog> = {}
  for (const t of a.tables) {
    const upload = uploads.find((u) => u.field === `table:${t.key}`)
    if (!upload) continue
    logs[t.key] = {
      state: 'read',
      filename: upload.filename,
      size: upload.bytes.length,
      head: new Uint8Array(upload.bytes.buffer, upload.bytes.byteOffset, upload.bytes.byteLength),
      parse: () => parseLog(upload.bytes.toString('utf8'), t, payload.mappings[t.key] ?? {}),
    }
  }
  const v = checkHandIn(a, payload, logs)

  const inputs: SubmissionInputs = { measurements: {}, reported: {} }
  for (const m of a.measurements) {
    const typed = payload.measurements[m.key]
    if (typed) inputs.measurements[m.key] = typed
  }
  for (const r of a.results) {
    const typed = payload.reported[r.key]
    if (typed) inputs.reported[r.key] = typed
  }
  const files: {
    table: TableSpec
    upload: UploadedTable
    mapping: SubmissionPayload['mappings'][string]
    columns: Record<string, number[]>
    rowCount: number
  }[] = a.tables.flatMap((t) => {
    const parsed = v.logs[t.key]
    const upload = uploads.find((u) => u.field === `table:${t.key}`)
    const mapping = payload.mappings[t.key]
    return parsed && upload && mapping
      ? [{ table: t, upload, mapping, columns: parsed.columns, rowCount: parsed.rowCount }]
      : []
  })
  return { ...v, inputs, files }
}

/**
 * The 422 for a hand-in with problems, or null when there are none: the first
 * {@link MAX_SHOWN_ISSUES} problems, and `more`, how many others there are (each problem counted
 * once, whether it concerns a field, the whole file or one of its rows).
 */
export function handInRefusal(v: { issues: SubmissionFieldIssue[]; totalIssues: number }): AppError | null {
  const first = v.issues[0]
  if (!first) return null
  const shown = v.issues.slice(0, MAX_SHOWN_ISSUES)
  return new AppError(
    'invalid_submission',
    `${v.totalIssues === 1 ? 'One problem' : `${count(v.totalIssues)} problems`} to fix before this can be handed in: ${first.message}`,
    422,
    { issues: shown, more: v.totalIssues - shown.length },
  )
}

/**
 * The hand-in form: its typed values, one log upload per table, and the problems to show at each
 * control. The rules are the hand-in's one check (shared/grading/check-hand-in.ts), the same the
 * server runs again on what it receives, so the form and the server say the same thing.
 */
import { computed, reactive, ref, shallowRef, watch } from 'vue'
import { checkHandIn, handInField } from '@shared/grading/check-hand-in'
import type { HandInIssue, HandInLog, HandInPayload, TypedValue } from '@shared/grading/check-hand-in'
import { parseDecimal } from '@shared/grading/csv'
import type { LogIssue } from '@shared/grading/csv'
import { isPressureUnit } from '@shared/modules/quantities'
import type { StudentAssignment } from '@shared/schemas/student-module-spec'
import type { SubmissionFieldIssue, SubmissionPayload } from '@shared/schemas/submissions'
import type { HandInFile } from '@/api/submissions'
import { draftMarks, problemText, typedScale } from '@/components/photo/mark-draft'
import type { ScaleLength } from '@/components/photo/mark-draft'
import type { JetMarks, MarkProblem } from '@shared/images/jet-marks'
import { valueToSI } from '@shared/modules/quantities'
import { useLogUpload } from './use-log-upload'
import type { LogUpload } from './use-log-upload'
import { usePhotoUpload } from './use-photo-upload'
import type { PhotoUpload } from './use-photo-upload'

export interface TypedEntry {
  text: string
  unit: string
  pressure?: 'gauge' | 'absolute'
}

/** Ids of the form's controls, so messages and the error summary can point at them. */
export const fieldId = {
  measurement: (key: string) => `hand-in-m-${key}`,
  result: (key: string) => `hand-in-r-${key}`,
  table: (key: string) => `hand-in-t-${key}`,
  /** A photograph's file picker; the measuring tool's ids start with it too. */
  photo: (key: string) => `hand-in-p-${key}`,
  /** The picture in the measuring tool (focusable), where problems with the marks are shown. */
  photoMarks: (key: string) => `hand-in-p-${key}-marks`,
  /** From a hand-in issue's `field` (`measurements.x`, `reported.x`, `table:x`, `photo:x`, `images.x.mark`). */
  of(field: string): string {
    if (field.startsWith('photo:')) return this.photo(field.slice('photo:'.length))
    if (field.startsWith('images.')) return this.photoMarks(field.slice('images.'.length).split('.')[0] ?? '')
    if (field.startsWith('measurements.')) return this.measurement(field.slice('measurements.'.length))
    if (field.startsWith('reported.')) return this.result(field.slice('reported.'.length))
    if (field.startsWith('table:')) return this.table(field.slice('table:'.length))
    return 'hand-in-form'
  },
}

/** A problem to show in the error summary, linked to the control it concerns. */
export interface SummaryItem {
  message: string
  /** Id of the control, for the link; absent for a problem with the whole hand-in. */
  target?: string
}

/** Problems with one uploaded file: listed ones and how many more there are. */
export interface FileIssues {
  items: LogIssue[]
  more: number
}

function typedNumber(text: string): number {
  return text.trim() === '' ? Number.NaN : parseDecimal(text)
}

/** A typed entry as the check reads it; an empty field is a missing value. */
function typedValue(e: TypedEntry | undefined, withPressure: boolean): TypedValue | undefined {
  if (!e || e.text.trim() === '') return undefined
  return {
    value: typedNumber(e.text),
    unit: e.unit,
    text: e.text,
    ...(withPressure && e.pressure ? { pressure: e.pressure } : {}),
  }
}

/** A photograph's marks as far as they go, and what is missing or wrong, in words naming the mark. */
export interface PhotoCheck {
  marks: JetMarks | null
  problems: MarkProblem[]
}

export function useHandInForm(assignment: StudentAssignment) {
  const uploads = assignment.tables.map((t) => useLogUpload(t))
  const photos = (assignment.images ?? []).map((spec) => usePhotoUpload(spec))
  const measurements = reactive<Record<string, TypedEntry>>(
    Object.fromEntries(
      assignment.measurements.map((m) => [
        m.key,
        {
          text: '',
          unit: m.unit,
          ...(isPressureUnit(m.unit)
            ? { pressure: m.role === 'ambient-pressure' ? 'absolute' : (m.pressure ?? 'absolute') }
            : {}),
        },
      ]),
    ),
  )
  const results = reactive<Record<string, TypedEntry>>(
    Object.fromEntries(assignment.results.map((r) => [r.key, { text: '', unit: r.unit }])),
  )
  /** True after the first attempt to send: from then on, problems are shown as they are fixed. */
  const attempted = ref(false)
  /** The server's problems of the last refused attempt, by field. */
  const serverIssues = shallowRef<SubmissionFieldIssue[]>([])
  const serverMore = ref(0)

  /** The form's fields as the hand-in check reads them (what was typed, with the text). */
  function checkedPayload(): HandInPayload {
    const mappings: HandInPayload['mappings'] = {}
    for (const u of uploads) {
      const m: HandInPayload['mappings'][string] = {}
      for (const c of u.table.columns) {
        const e = u.mapping.value[c.key]
        if (!e || e.header === '') continue
        m[c.key] = {
          header: e.header,
          unit: e.unit,
          ...(isPressureUnit(c.unit) && e.pressure ? { pressure: e.pressure } : {}),
        }
      }
      mappings[u.table.key] = m
    }
    const ms: HandInPayload['measurements'] = {}
    for (const m of assignment.measurements) {
      const v = typedValue(measurements[m.key], isPressureUnit(m.unit))
      if (v) ms[m.key] = v
    }
    const rs: HandInPayload['reported'] = {}
    for (const r of assignment.results) {
      const v = typedValue(results[r.key], false)
      if (v) rs[r.key] = v
    }
    return { mappings, measurements: ms, reported: rs }
  }

  /**
   * The scale length a photograph's marks default to: the measurement its sheet names (`scaleFrom`,
   * the exit diameter), as typed; null when the sheet names none or it is not typed yet.
   */
  function scaleDefault(p: PhotoUpload): (ScaleLength & { words: string }) | null {
    const key = p.spec.scaleFrom
    const m = key ? assignment.measurements.find((x) => x.key === key) : undefined
    const e = key ? measurements[key] : undefined
    if (!m || !e || e.text.trim() === '') return null
    const value = typedNumber(e.text)
    if (!Number.isFinite(value) || value <= 0) return null
    return { value, unit: e.unit, words: `the ${m.label.toLowerCase()} typed above` }
  }

  /** The exit diameter for the readout (m): the `scaleFrom` measurement when typed, else the scale's length. */
  function exitDiameter(p: PhotoUpload): number | undefined {
    const d = scaleDefault(p)
    if (!d) return undefined
    try {
      return valueToSI(d.value, d.unit)
    } catch {
      return undefined
    }
  }

  /** Each photograph's marks checked with the sheet's rules (shared/images/jet-marks.ts checkMarks), by key. */
  const photoChecks = computed<Record<string, PhotoCheck>>(() => {
    const out: Record<string, PhotoCheck> = {}
    for (const p of photos) {
      const size = p.size.value
      if (!size) continue
      const scale = typedScale(p.scaleText.value, p.scaleUnit.value, scaleDefault(p))
      out[p.spec.key] = draftMarks(p.editor.value.draft, scale, size, {
        cells: p.spec.cells,
        machDisk: p.spec.machDisk,
      })
    }
    return out
  })

  /** The problems with each photograph: the file at its picker, the marks at the picture. */
  function photoProblems(): Record<string, string> {
    const out: Record<string, string> = {}
    for (const p of photos) {
      const label = p.spec.label
      if (p.fileProblem.value) out[fieldId.photo(p.spec.key)] = p.fileProblem.value
      else if (!p.file.value) out[fieldId.photo(p.spec.key)] = `${label}: choose the photograph (PNG or JPEG).`
      else if (!p.size.value) out[fieldId.photo(p.spec.key)] = `${label}: the picture is still being read.`
      else {
        const problems = photoChecks.value[p.spec.key]?.problems ?? []
        if (problems.length) out[fieldId.photoMarks(p.spec.key)] = `${label}: ${problems.map(problemText).join(' ')}`
      }
    }
    return out
  }

  /** The hand-in check over the form as it stands. */
  const check = computed(() => {
    const logs: Record<string, HandInLog | undefined> = {}
    for (const u of uploads) logs[u.table.key] = u.log.value
    return checkHandIn(assignment, checkedPayload(), logs)
  })

  /** The check's problems by control id; a log with problems of its own points to its list. */
  const clientProblems = computed<Record<string, string>>(() => {
    const out: Record<string, string> = {}
    const byField = new Map<string, HandInIssue[]>()
    for (const issue of check.value.issues) byField.set(issue.field, [...(byField.get(issue.field) ?? []), issue])
    for (const u of uploads) {
      const issues = byField.get(handInField.table(u.table.key))
      const r = u.result.value
      if (!issues) continue
      out[fieldId.table(u.table.key)] =
        r && !r.ok && !u.fileProblem.value
          ? `${u.table.label}: the file has ${r.totalErrors === 1 ? 'a problem' : `${r.totalErrors} problems`}; see the list under the upload.`
          : (issues[0]?.message ?? '')
    }
    for (const [field, issues] of byField) {
      if (field.startsWith('table:')) continue
      out[fieldId.of(field)] = issues.map((i) => i.message).join(' ')
    }
    Object.assign(out, photoProblems())
    return out
  })

  /** The server's problems with one file, by table key, with how many it did not list. */
  const serverFileIssues = computed<Record<string, FileIssues>>(() => {
    const out: Record<string, FileIssues> = {}
    for (const issue of serverIssues.value) {
      if (!issue.field.startsWith('table:')) continue
      const list = (out[issue.field.slice('table:'.length)] ??= { items: [], more: 0 })
      list.items.push({
        message: issue.message,
        ...(issue.row !== undefined ? { row: issue.row } : {}),
        ...(issue.column !== undefined ? { column: issue.column } : {}),
      })
    }
    // The server counts the unlisted file problems over the whole hand-in; an assignment has one log as a rule.
    const first = Object.values(out)[0]
    if (first) first.more = serverMore.value
    return out
  })

  /** The message shown at each control: the browser's once a send was tried, else the server's. */
  const fieldErrors = computed<Record<string, string>>(() => {
    const out: Record<string, string> = {}
    for (const issue of serverIssues.value) {
      if (issue.field.startsWith('table:')) continue
      const id = fieldId.of(issue.field)
      out[id] = out[id] ? `${out[id]} ${issue.message}` : issue.message
    }
    for (const u of uploads) {
      const listed = serverFileIssues.value[u.table.key]
      if (!listed) continue
      const n = listed.items.length + listed.more
      out[fieldId.table(u.table.key)] =
        n === 1
          ? (listed.items[0]?.message ?? '')
          : `${u.table.label}: the server found ${n} problems in the file; see the list under the upload.`
    }
    if (attempted.value) Object.assign(out, clientProblems.value)
    return out
  })

  /** Problems inside each file, by table key: the browser's own parse, else the server's refusal. */
  const fileIssues = computed<Record<string, FileIssues>>(() => {
    const out: Record<string, FileIssues> = {}
    for (const u of uploads) {
      const r = u.result.value
      if (r && !r.ok) out[u.table.key] = { items: r.errors, more: Math.max(0, r.totalErrors - r.errors.length) }
      else {
        // A single server problem is the upload's own message; a list is for several.
        const listed = serverFileIssues.value[u.table.key]
        if (listed && listed.items.length + listed.more > 1) out[u.table.key] = listed
      }
    }
    return out
  })

  /** What is sent: every value as typed, with its unit (the server checks it again). */
  function payload(): SubmissionPayload {
    const p = checkedPayload()
    const strip = (v: TypedValue) => ({ value: v.value, unit: v.unit, ...(v.pressure ? { pressure: v.pressure } : {}) })
    const images: Record<string, JetMarks> = {}
    for (const photo of photos) {
      const marks = photoChecks.value[photo.spec.key]?.marks
      if (marks) images[photo.spec.key] = marks
    }
    return {
      mappings: p.mappings,
      measurements: Object.fromEntries(Object.entries(p.measurements).map(([k, v]) => [k, strip(v)])),
      reported: Object.fromEntries(Object.entries(p.reported).map(([k, v]) => [k, { value: v.value, unit: v.unit }])),
      ...(photos.length ? { images } : {}),
    }
  }

  function files(): HandInFile[] {
    return [
      ...uploads.flatMap((u) =>
        u.file.value ? [{ tableKey: u.table.key, file: u.file.value, filename: u.file.value.name }] : [],
      ),
      ...photos.flatMap((p) =>
        p.file.value ? [{ photoKey: p.spec.key, file: p.file.value, filename: p.file.value.name }] : [],
      ),
    ]
  }

  /** The problems to list in the error summary, in form order (each linked to its control). */
  function summaryOf(errors: Record<string, string>): SummaryItem[] {
    const order = [
      ...uploads.map((u) => fieldId.table(u.table.key)),
      ...assignment.measurements.map((m) => fieldId.measurement(m.key)),
      ...photos.flatMap((p) => [fieldId.photo(p.spec.key), fieldId.photoMarks(p.spec.key)]),
      ...assignment.results.map((r) => fieldId.result(r.key)),
    ]
    return order.flatMap((id) => (errors[id] ? [{ message: errors[id] as string, target: id }] : []))
  }

  /** Records the server's refusal: field problems at their fields, file problems under the uploads. */
  function applyServerIssues(issues: SubmissionFieldIssue[], more: number) {
    serverIssues.value = issues
    serverMore.value = more
  }

  function clearServerIssues() {
    serverIssues.value = []
    serverMore.value = 0
  }

  // A new photograph or new marks make the server's problems with that photograph stale.
  watch(
    () => photos.map((p) => [p.file.value, p.editor.value, p.scaleText.value, p.scaleUnit.value]),
    () => {
      const stale = (f: string) => f.startsWith('photo:') || f.startsWith('images.')
      if (serverIssues.value.some((i) => stale(i.field)))
        serverIssues.value = serverIssues.value.filter((i) => !stale(i.field))
    },
  )

  // A new file or mapping makes the server's earlier file problems stale.
  watch(
    () => uploads.map((u) => [u.file.value, u.mapping.value]),
    () => {
      if (serverIssues.value.some((i) => i.field.startsWith('table:'))) {
        serverIssues.value = serverIssues.value.filter((i) => !i.field.startsWith('table:'))
        serverMore.value = 0
      }
    },
  )

  return {
    uploads,
    photos,
    photoChecks,
    scaleDefault,
    exitDiameter,
    measurements,
    results,
    attempted,
    check,
    clientProblems,
    fieldErrors,
    fileIssues,
    payload,
    files,
    summaryOf,
    applyServerIssues,
    clearServerIssues,
  }
}

export type { LogUpload, PhotoUpload }

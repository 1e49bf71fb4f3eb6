/**
 * Hand-ins and their results, for the hand-in form, the result page and the module's hand-in
 * panel. Views and components take everything from here; only this file talks to
 * `api/submissions.ts`.
 */
import Papa from 'papaparse/papaparse.min.js'
import { computed, onScopeDispose, reactive, ref, shallowRef, watch } from 'vue'
import type { ComputedRef, Ref, ShallowRef } from 'vue'
import { z } from 'zod'
import { parseDecimal, parseLog, sniffBinary, suggestMapping } from '@shared/grading/csv'
import { regimeCodeProblem } from '@shared/grading/regime'
import type { ColumnMappingEntry, LogIssue, LogParseResult } from '@shared/grading/csv'
import { DIMENSIONLESS, dataUnitKind, isPressureUnit, valueFromSI } from '@shared/modules/quantities'
import { MeasurementSchema, StudentResultSpecSchema, TableSchema } from '@shared/modules/schema'
import type { MeasurementSpec, TableSpec } from '@shared/modules/schema'
import { isAwaitingGrade } from '@shared/schemas/submissions'
import type { SubmissionDetail, SubmissionFieldIssue, SubmissionPayload } from '@shared/schemas/submissions'
import { compatibleUnits, isCompatibleUnit, toSpecSense, toSpecUnit } from '@shared/typed-values'
import { UNITS, isUnitSymbol } from '@shared/units'
import { ApiError } from '@/api/http'
import { fetchModule } from '@/api/modules'
import { fetchSubmission, submitHandIn } from '@/api/submissions'
import type { HandInFile } from '@/api/submissions'
import type { ChartSeries } from '@/components/calculators/chart-series'
import { formatCompact, formatScore, percentText, unitText, valueText, withUnit } from '@shared/format'
import { useResource } from './use-resource'
import { useMySubmissions } from './use-my-submissions'

// The shared wording of values, units and scores, for the hand-in and result pages.
export { formatScore, percentText, unitText, valueText, withUnit }
// Here too for the views that already import it from this file.
export { useMySubmissions }

// ---------------------------------------------------------------------------------------------
// Loading.

/** Looks again at 1 s, 2 s, 3 s … up to every 5 s, for at most this long. */
const GRADE_WAIT_MS = 5 * 60_000

export function useSubmission(courseId: Ref<number>, submissionId: Ref<number>) {
  const resource = useResource(
    () => fetchSubmission(courseId.value, submissionId.value),
    () => [courseId.value, submissionId.value],
  )
  let timer: ReturnType<typeof setTimeout> | null = null
  let waitedMs = 0
  const stop = () => {
    if (timer) clearTimeout(timer)
    timer = null
  }
  watch(resource.data, (d) => {
    stop()
    if (!d || !isAwaitingGrade(d.status) || waitedMs >= GRADE_WAIT_MS) return
    const delay = Math.min(5000, 1000 + waitedMs / 4)
    waitedMs += delay
    timer = setTimeout(() => void resource.refresh(), delay)
  })
  watch([courseId, submissionId], () => (waitedMs = 0))
  onScopeDispose(stop)
  return resource
}

/**
 * Everything a result page shows: the submission, then (once its module is known) the module as
 * students read it (labels, the course's time zone) and the attempts history.
 */
export function useSubmissionPage(courseId: Ref<number>, submissionId: Ref<number>) {
  const detail = useSubmission(courseId, submissionId)
  const moduleId = computed(() => detail.data.value?.moduleId ?? null)
  const reading = useResource(
    async () => (moduleId.value === null ? null : fetchModule(courseId.value, moduleId.value)),
    () => [courseId.value, moduleId.value],
  )
  const mine = useMySubmissions(courseId, moduleId)
  // When the grade arrives, the attempts list shows it too.
  watch(
    () => detail.data.value?.status,
    (now, before) => {
      if (before && isAwaitingGrade(before) && now && !isAwaitingGrade(now)) void mine.refresh()
    },
  )
  return { detail, reading, mine }
}

// ---------------------------------------------------------------------------------------------
// The assignment as a student receives it (expected-value expressions and review rules removed).

const StudentResultSchema = StudentResultSpecSchema

const StudentAssignmentSchema = z.object({
  tables: z.array(TableSchema).default([]),
  measurements: z.array(MeasurementSchema).default([]),
  results: z.array(StudentResultSchema).default([]),
})
export type StudentAssignment = z.output<typeof StudentAssignmentSchema>
export type StudentResultSpec = StudentAssignment['results'][number]

/**
 * The assignment of a module's front matter, checked with the same schemas the module was saved
 * with; null when the module has none. A malformed one throws (the view shows it as a load error).
 */
export function studentAssignment(frontMatter: Record<string, unknown> | null | undefined): StudentAssignment | null {
  const raw = frontMatter?.assignment
  if (raw === undefined || raw === null) return null
  const parsed = StudentAssignmentSchema.safeParse(raw)
  if (!parsed.success) {
    throw new Error(
      `This module's hand-in form could not be read: ${parsed.error.issues[0]?.message ?? 'unknown problem'}.`,
    )
  }
  const a = parsed.data
  return a.tables.length + a.measurements.length + a.results.length > 0 ? a : null
}

// ---------------------------------------------------------------------------------------------
// Units as written on the page.

/** Its name, for a tooltip or a screen reader. */
export function unitName(unit: string): string {
  if (unit === DIMENSIONLESS) return 'no unit (a pure number)'
  if (isUnitSymbol(unit)) return UNITS[unit].name
  const names: Record<string, string> = {
    'N*s': 'newton-second',
    'N·s': 'newton-second',
    'lbf*s': 'pound-force second',
    'lbf·s': 'pound-force second',
    'kg/s': 'kilogram per second',
    'g/s': 'gram per second',
    'm/s': 'metre per second',
    rad: 'radian',
    deg: 'degree (angle)',
  }
  return names[unit] ?? unit
}

export interface UnitOption {
  label: string
  value: string
  name: string
}

/** The units a value of `specUnit` may be typed in, for a unit picker (spec's own unit first). */
export function unitOptions(specUnit: string): UnitOption[] {
  return compatibleUnits(specUnit).map((u) => ({ label: unitText(u), value: u, name: unitName(u) }))
}

export const PRESSURE_SENSES: readonly { label: string; value: 'gauge' | 'absolute' }[] = [
  { label: 'gauge', value: 'gauge' },
  { label: 'absolute', value: 'absolute' },
]

/** A measurement's plausible range in words, e.g. "Plausible range: 60 to 110 kPa absolute". */
export function rangeText(m: MeasurementSpec): string | null {
  const sense = m.pressure ? ` ${m.pressure}` : ''
  const u = unitText(m.unit)
  const unit = u ? ` ${u}` : ''
  if (m.min !== undefined && m.max !== undefined)
    return `Plausible range: ${formatCompact(m.min)} to ${formatCompact(m.max)}${unit}${sense}`
  if (m.min !== undefined) return `Plausible range: at least ${formatCompact(m.min)}${unit}${sense}`
  if (m.max !== undefined) return `Plausible range: at most ${formatCompact(m.max)}${unit}${sense}`
  return null
}

// ---------------------------------------------------------------------------------------------
// One log file: read in the browser, previewed, mapped onto the table's columns and checked.

/** How many data rows the preview table shows. */
export const PREVIEW_ROWS = 8
/** At most this many points per line in the preview plot (the whole log is checked regardless). */
const PREVIEW_POINTS = 600

export interface LogUpload {
  table: TableSpec
  file: ShallowRef<File | null>
  /** True while the file is being read. */
  reading: Ref<boolean>
  /** Why the file cannot be used at all (empty, not text), or null. */
  fileProblem: Ref<string | null>
  headers: Ref<string[]>
  /** The first {@link PREVIEW_ROWS} data rows, cells as written in the file. */
  previewRows: Ref<PreviewRow[]>
  mapping: Ref<Record<string, ColumnMappingEntry>>
  /** Column keys whose mapping came from the file's headers (suggestMapping). */
  suggested: Ref<string[]>
  /** parseLog over the whole file with the current mapping; null before a usable file is chosen. */
  result: ComputedRef<LogParseResult | null>
  /** The mapped columns against time, in the spec's units, for the preview plot. */
  previewSeries: ComputedRef<{ series: ChartSeries[]; xTitle: string; leftTitle: string; rightTitle?: string } | null>
  setFile: (file: File | null) => Promise<void>
  setMapping: (columnKey: string, patch: Partial<ColumnMappingEntry>) => void
}

/** A row of the preview: its line in the file (header = 1, as the problems count) and its cells. */
export interface PreviewRow {
  line: number
  cells: string[]
}

/**
 * The header and first rows of a text, for the preview (papaparse guesses the separator). Line
 * numbers count blank lines, as parseLog's do; a quoted cell spanning lines is rare enough in a
 * logger's export that the preview does not follow it.
 */
function previewOf(text: string): { headers: string[]; rows: PreviewRow[] } {
  let end = 0
  // Enough lines for the header, a few blank lines and the preview rows.
  for (let lines = 0; lines < PREVIEW_ROWS + 12 && end >= 0; lines++) end = text.indexOf('\n', end + 1)
  const head = end < 0 ? text : text.slice(0, end)
  const parsed = Papa.parse(head.replace(/^\uFEFF/, ''), { header: false, skipEmptyLines: false }).data
  const rows = parsed.map((cells, i) => ({ line: i + 1, cells })).filter((r) => r.cells.some((c) => c.trim() !== ''))
  const [header, ...rest] = rows
  return { headers: (header?.cells ?? []).map((h) => h.trim()), rows: rest.slice(0, PREVIEW_ROWS) }
}

function thin(xs: readonly number[], ys: readonly number[], scale: (v: number) => number): { x: number; y: number }[] {
  const step = Math.max(1, Math.ceil(xs.length / PREVIEW_POINTS))
  const out: { x: number; y: number }[] = []
  for (let i = 0; i < xs.length; i += step) out.push({ x: xs[i] as number, y: scale(ys[i] as number) })
  return out
}

export function useLogUpload(table: TableSpec): LogUpload {
  const file = shallowRef<File | null>(null)
  const text = shallowRef<string | null>(null)
  const reading = ref(false)
  const fileProblem = ref<string | null>(null)
  const headers = ref<string[]>([])
  const previewRows = ref<PreviewRow[]>([])
  const mapping = ref<Record<string, ColumnMappingEntry>>({})
  const suggested = ref<string[]>([])
  let run = 0

  async function setFile(next: File | null) {
    const mine = ++run
    file.value = next
    text.value = null
    fileProblem.value = null
    headers.value = []
    previewRows.value = []
    mapping.value = {}
    suggested.value = []
    if (!next) return
    reading.value = true
    try {
      if (next.size === 0) {
        fileProblem.value = `${next.name} is empty: choose the CSV file the data logger wrote.`
        return
      }
      const sniff = sniffBinary(new Uint8Array(await next.slice(0, 8192).arrayBuffer()))
      if (mine !== run) return
      if (sniff.binary) {
        fileProblem.value = `${next.name}: ${sniff.message}`
        return
      }
      const content = await next.text()
      if (mine !== run) return
      const preview = previewOf(content)
      headers.value = preview.headers
      previewRows.value = preview.rows
      const guess = suggestMapping(preview.headers, table)
      mapping.value = guess
      suggested.value = Object.keys(guess)
      text.value = content
    } catch (err) {
      if (mine === run)
        fileProblem.value = `${next.name} could not be read (${err instanceof Error ? err.message : String(err)}); choose it again.`
    } finally {
      if (mine === run) reading.value = false
    }
  }

  function setMapping(columnKey: string, patch: Partial<ColumnMappingEntry>) {
    const spec = table.columns.find((c) => c.key === columnKey)
    if (!spec) return
    const before = mapping.value[columnKey] ?? {
      header: '',
      unit: spec.unit,
      ...(spec.pressure ? { pressure: spec.pressure } : {}),
    }
    mapping.value = { ...mapping.value, [columnKey]: { ...before, ...patch } }
  }

  const result = computed<LogParseResult | null>(() => {
    if (text.value === null) return null
    // Only the columns that have a header chosen: parseLog names the others as missing.
    const chosen = Object.fromEntries(Object.entries(mapping.value).filter(([, e]) => e.header !== ''))
    return parseLog(text.value, table, chosen)
  })

  const previewSeries = computed(() => {
    const r = result.value
    if (!r || !r.ok) return null
    const time =
      table.columns.find((c) => c.role === 'time') ?? table.columns.find((c) => dataUnitKind(c.unit) === 'time')
    const xs = time ? r.columns[time.key] : undefined
    if (!time || !xs) return null
    const others = table.columns.filter((c) => c !== time && r.columns[c.key])
    const units = [...new Set(others.map((c) => c.unit))]
    const [left, right] = units
    if (left === undefined) return null
    const colours: ChartSeries['colour'][] = ['ink', 'copper', 'muted']
    const series: ChartSeries[] = others
      .filter((c) => c.unit === left || c.unit === right)
      .map((c, i) => ({
        label: `${c.label} (${unitText(c.unit)}${r.pressures[c.key] ? ` ${r.pressures[c.key]}` : ''})`,
        axis: c.unit === left ? 'left' : 'right',
        points: thin(xs, r.columns[c.key] as number[], (v) => valueFromSI(v, c.unit)),
        colour: colours[i % colours.length] as ChartSeries['colour'],
      }))
    // One column: its label; several of one unit: the kind they share (axis titles must stay short).
    const title = (u: string) => {
      const cols = others.filter((c) => c.unit === u)
      const kind = dataUnitKind(u)
      const name =
        cols.length === 1 || !kind || kind === 'dimensionless'
          ? (cols[0]?.label ?? '')
          : kind[0]!.toUpperCase() + kind.slice(1)
      return `${name}${unitText(u) ? ` (${unitText(u)})` : ''}`
    }
    return {
      series,
      xTitle: `${time.label} (${unitText('s')})`,
      leftTitle: title(left),
      ...(right !== undefined ? { rightTitle: title(right) } : {}),
    }
  })

  return {
    table,
    file,
    reading,
    fileProblem,
    headers,
    previewRows,
    mapping,
    suggested,
    result,
    previewSeries,
    setFile,
    setMapping,
  }
}

// ---------------------------------------------------------------------------------------------
// The whole form.

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
  /** From a server issue's `field` (`measurements.x`, `reported.x`, `table:x`). */
  of(field: string): string {
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

export function useHandInForm(assignment: StudentAssignment) {
  const uploads = assignment.tables.map((t) => useLogUpload(t))
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

  const ambientSpec = assignment.measurements.find((m) => m.role === 'ambient-pressure')

  function measurementProblem(m: MeasurementSpec): string | null {
    const e = measurements[m.key]
    if (!e || e.text.trim() === '') return `${m.label}: enter a value.`
    const value = typedNumber(e.text)
    if (Number.isNaN(value))
      return `${m.label}: “${e.text.trim()}” is not a number; write it with a point for decimals, like 84.2.`
    if (!isCompatibleUnit(e.unit, m.unit))
      return `${m.label}: ${unitText(e.unit)} does not measure the same kind of quantity as ${unitText(m.unit)}; choose another unit.`
    let inSpec: number
    try {
      inSpec = toSpecUnit(value, e.unit, m.unit)
    } catch (err) {
      return `${m.label}: ${err instanceof Error ? err.message : String(err)}.`
    }
    const sense = m.role === 'ambient-pressure' ? 'absolute' : e.pressure
    if (m.pressure && sense && sense !== m.pressure) {
      const ambient = ambientSpec ? measurements[ambientSpec.key] : undefined
      const ambientValue = ambient ? typedNumber(ambient.text) : Number.NaN
      if (!ambientSpec || !ambient || Number.isNaN(ambientValue) || !isCompatibleUnit(ambient.unit, m.unit)) {
        return `${m.label}: enter the ${ambientSpec?.label.toLowerCase() ?? 'ambient pressure'} too, so a ${sense} reading can be taken as ${m.pressure}.`
      }
      inSpec = toSpecSense(inSpec, sense, m.pressure, toSpecUnit(ambientValue, ambient.unit, m.unit))
    }
    const shown = `${formatCompact(inSpec)} ${unitText(m.unit)}${m.pressure ? ` ${m.pressure}` : ''}`.trim()
    const inYourUnit =
      e.unit !== m.unit || (m.pressure && sense !== m.pressure)
        ? ` (your ${formatCompact(value)} ${unitText(e.unit)}${sense && m.pressure ? ` ${sense}` : ''} is ${shown})`
        : ''
    if (m.min !== undefined && inSpec < m.min)
      return `${m.label}: below the plausible minimum of ${formatCompact(m.min)} ${unitText(m.unit)}${inYourUnit}.`
    if (m.max !== undefined && inSpec > m.max)
      return `${m.label}: above the plausible maximum of ${formatCompact(m.max)} ${unitText(m.unit)}${inYourUnit}.`
    return null
  }

  function resultProblem(r: StudentResultSpec): string | null {
    const e = results[r.key]
    if (r.regime)
      return !e || e.text === '' ? `${r.label}: choose the regime.` : regimeCodeProblem(r.label, Number(e.text))
    if (!e || e.text.trim() === '') return `${r.label}: enter your result.`
    if (Number.isNaN(typedNumber(e.text)))
      return `${r.label}: “${e.text.trim()}” is not a number; write it with a point for decimals, like 0.672.`
    if (!isCompatibleUnit(e.unit, r.unit))
      return `${r.label}: ${unitText(e.unit)} is not a unit of the right kind; choose another unit.`
    return null
  }

  function tableProblem(u: LogUpload): string | null {
    if (u.reading.value) return `${u.table.label}: the file is still being read; wait a moment.`
    if (!u.file.value) return `${u.table.label}: choose the log file (CSV).`
    if (u.fileProblem.value) return u.fileProblem.value
    const r = u.result.value
    if (r && !r.ok) {
      return `${u.table.label}: the file has ${r.totalErrors === 1 ? 'a problem' : `${r.totalErrors} problems`}; see the list under the upload.`
    }
    return null
  }

  /** The browser's own check of everything, by field (the server checks again). */
  const clientProblems = computed<Record<string, string>>(() => {
    const out: Record<string, string> = {}
    for (const u of uploads) {
      const p = tableProblem(u)
      if (p) out[fieldId.table(u.table.key)] = p
    }
    for (const m of assignment.measurements) {
      const p = measurementProblem(m)
      if (p) out[fieldId.measurement(m.key)] = p
    }
    for (const r of assignment.results) {
      const p = resultProblem(r)
      if (p) out[fieldId.result(r.key)] = p
    }
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

  function payload(): SubmissionPayload {
    const mappings: SubmissionPayload['mappings'] = {}
    for (const u of uploads) {
      const m: Record<string, { header: string; unit: string; pressure?: 'gauge' | 'absolute' }> = {}
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
    const ms: SubmissionPayload['measurements'] = {}
    for (const m of assignment.measurements) {
      const e = measurements[m.key] as TypedEntry
      ms[m.key] = {
        value: typedNumber(e.text),
        unit: e.unit,
        ...(isPressureUnit(m.unit) && e.pressure ? { pressure: e.pressure } : {}),
      }
    }
    const rs: SubmissionPayload['reported'] = {}
    for (const r of assignment.results) {
      const e = results[r.key] as TypedEntry
      rs[r.key] = { value: typedNumber(e.text), unit: e.unit }
    }
    return { mappings, measurements: ms, reported: rs }
  }

  function files(): HandInFile[] {
    return uploads.flatMap((u) =>
      u.file.value ? [{ tableKey: u.table.key, file: u.file.value, filename: u.file.value.name }] : [],
    )
  }

  /** The problems to list in the error summary, in form order (each linked to its control). */
  function summaryOf(errors: Record<string, string>): SummaryItem[] {
    const order = [
      ...uploads.map((u) => fieldId.table(u.table.key)),
      ...assignment.measurements.map((m) => fieldId.measurement(m.key)),
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
    measurements,
    results,
    attempted,
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

// ---------------------------------------------------------------------------------------------
// Sending.

export type SendState = 'idle' | 'uploading' | 'grading' | 'error'

/** Sends a hand-in and reports how far it has got: upload percentage, then grading. */
export function useHandInSend(courseId: Ref<number>, moduleId: Ref<number>) {
  const state = ref<SendState>('idle')
  /** Upload progress 0–100, or null while the size is not known yet. */
  const percent = ref<number | null>(null)
  const error = shallowRef<ApiError | null>(null)

  async function send(files: HandInFile[], payload: SubmissionPayload): Promise<SubmissionDetail | null> {
    state.value = 'uploading'
    percent.value = null
    error.value = null
    try {
      const detail = await submitHandIn(courseId.value, moduleId.value, files, payload, (p) => {
        if (p.phase === 'grading') {
          percent.value = 100
          state.value = 'grading'
        } else if (p.total > 0) {
          percent.value = Math.min(100, Math.round((100 * p.loaded) / p.total))
        }
      })
      state.value = 'idle'
      return detail
    } catch (err) {
      error.value = err instanceof ApiError ? err : new ApiError(0, 'client_error', String(err))
      state.value = 'error'
      return null
    }
  }

  return { state, percent, error, send }
}

/** The field problems of a 422 `invalid_submission` answer, checked before use. */
export function invalidSubmissionIssues(err: ApiError): { issues: SubmissionFieldIssue[]; more: number } | null {
  if (err.code !== 'invalid_submission') return null
  const d = err.details as { issues?: unknown; more?: unknown } | undefined
  const issues = Array.isArray(d?.issues)
    ? (d.issues as unknown[]).filter(
        (i): i is SubmissionFieldIssue =>
          typeof i === 'object' &&
          i !== null &&
          typeof (i as SubmissionFieldIssue).field === 'string' &&
          typeof (i as SubmissionFieldIssue).message === 'string',
      )
    : []
  return { issues, more: typeof d?.more === 'number' ? d.more : 0 }
}

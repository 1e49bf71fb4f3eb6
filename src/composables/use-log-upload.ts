/**
 * One log file of a hand-in: read in the browser, previewed, mapped onto the table's columns and
 * checked with the hand-in's own rules (shared/grading/check-hand-in.ts), as the server will.
 */
import Papa from 'papaparse/papaparse.min.js'
import { computed, ref, shallowRef } from 'vue'
import type { ComputedRef, Ref, ShallowRef } from 'vue'
import { logFileProblem } from '@shared/grading/check-hand-in'
import type { HandInLog } from '@shared/grading/check-hand-in'
import { parseLog, suggestMapping } from '@shared/grading/csv'
import { checkLines } from '@shared/grading/csv-limits'
import type { ColumnMappingEntry, LogParseResult } from '@shared/grading/csv'
import { unitText } from '@shared/format'
import { dataUnitKind, valueFromSI } from '@shared/modules/quantities'
import type { TableSpec } from '@shared/modules/schema'
import type { ChartSeries } from '@/components/calculators/chart-series'

/** How many data rows the preview table shows. */
export const PREVIEW_ROWS = 8
/** At most this many points per line in the preview plot (the whole log is checked regardless). */
const PREVIEW_POINTS = 600
/** Bytes of the file's start that the binary check reads. */
const HEAD_BYTES = 8192

export interface LogUpload {
  table: TableSpec
  file: ShallowRef<File | null>
  /** True while the file is being read. */
  reading: Ref<boolean>
  /** Why the file cannot be used at all (empty, not text, unreadable), or null. */
  fileProblem: ComputedRef<string | null>
  headers: Ref<string[]>
  /** The first {@link PREVIEW_ROWS} data rows, cells as written in the file. */
  previewRows: Ref<PreviewRow[]>
  mapping: Ref<Record<string, ColumnMappingEntry>>
  /** Column keys whose mapping came from the file's headers (suggestMapping). */
  suggested: Ref<string[]>
  /** parseLog over the whole file with the current mapping; null before a usable file is chosen. */
  result: ComputedRef<LogParseResult | null>
  /** The file as the hand-in check reads it; undefined while none is chosen. */
  log: ComputedRef<HandInLog | undefined>
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
 * logger's export that the preview does not follow it. A text past the log's size limits
 * (csv-limits) gets no preview: papaparse never sees it, and parseLog names the limit.
 */
function previewOf(text: string): { headers: string[]; rows: PreviewRow[] } {
  if (text.trim() === '' || !checkLines(text).ok) return { headers: [], rows: [] }
  let end = 0
  // Enough lines for the header, a few blank lines and the preview rows.
  for (let lines = 0; lines < PREVIEW_ROWS + 12 && end >= 0; lines++) end = text.indexOf('\n', end + 1)
  const head = end < 0 ? text : text.slice(0, end)
  const parsed = Papa.parse(head.replace(/^\uFEFF/, ''), { header: false, skipEmptyLines: false }).data
  const rows = parsed.map((cells, i) => ({ line: i + 1, cells })).filter((r) => r.cells.some((c) => c.trim() !== ''))
  const [header, ...rest] = rows
  return { headers: (header?.cells ?? []).map((h) => h.trim()), rows: rest.slice(0, PREVIEW_ROWS) }
}

/**
 * Every `step`-th sample for the preview plot, and always the last one, so the line spans the
 * whole log.
 */
export function thinForPreview(
  xs: readonly number[],
  ys: readonly number[],
  scale: (v: number) => number,
  maxPoints = PREVIEW_POINTS,
): { x: number; y: number }[] {
  const step = Math.max(1, Math.ceil(xs.length / maxPoints))
  const out: { x: number; y: number }[] = []
  for (let i = 0; i < xs.length; i += step) out.push({ x: xs[i] as number, y: scale(ys[i] as number) })
  const last = xs.length - 1
  if (last > 0 && last % step !== 0) out.push({ x: xs[last] as number, y: scale(ys[last] as number) })
  return out
}

export function useLogUpload(table: TableSpec): LogUpload {
  const file = shallowRef<File | null>(null)
  const text = shallowRef<string | null>(null)
  const head = shallowRef<Uint8Array>(new Uint8Array())
  const reading = ref(false)
  /** Why the browser could not read the file, or null. */
  const readError = ref<string | null>(null)
  const headers = ref<string[]>([])
  const previewRows = ref<PreviewRow[]>([])
  const mapping = ref<Record<string, ColumnMappingEntry>>({})
  const suggested = ref<string[]>([])
  let run = 0

  async function setFile(next: File | null) {
    const mine = ++run
    file.value = next
    text.value = null
    head.value = new Uint8Array()
    readError.value = null
    headers.value = []
    previewRows.value = []
    mapping.value = {}
    suggested.value = []
    if (!next) return
    reading.value = true
    try {
      const start = new Uint8Array(await next.slice(0, HEAD_BYTES).arrayBuffer())
      if (mine !== run) return
      head.value = start
      // An empty or binary file is named by the hand-in check; its text is never read.
      if (logFileProblem(table.label, { state: 'read', filename: next.name, size: next.size, head: start, parse }))
        return
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
      if (mine === run) readError.value = err instanceof Error ? err.message : String(err)
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

  /** Only the columns that have a header chosen: parseLog names the others as missing. */
  const chosen = computed(() => Object.fromEntries(Object.entries(mapping.value).filter(([, e]) => e.header !== '')))

  const result = computed<LogParseResult | null>(() =>
    text.value === null ? null : parseLog(text.value, table, chosen.value),
  )

  function parse(): LogParseResult {
    return result.value ?? parseLog('', table, chosen.value)
  }

  const log = computed<HandInLog | undefined>(() => {
    const f = file.value
    if (!f) return undefined
    if (reading.value) return { state: 'reading', filename: f.name }
    if (readError.value !== null) return { state: 'unreadable', filename: f.name, reason: readError.value }
    return { state: 'read', filename: f.name, size: f.size, head: head.value, parse }
  })

  const fileProblem = computed(() => {
    const l = log.value
    return l && l.state !== 'reading' ? logFileProblem(table.label, l) : null
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
        points: thinForPreview(xs, r.columns[c.key] as number[], (v) => valueFromSI(v, c.unit)),
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
    log,
    previewSeries,
    setFile,
    setMapping,
  }
}

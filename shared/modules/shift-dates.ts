/**
 * Moves a lab sheet's front-matter dates (`due.at` and `late.acceptUntil`) by whole weeks, for a
 * course rolled over to a new term. The source text is edited in place, value by value, so the
 * author's comments, order and layout stay as they wrote them. Whole weeks keep the weekday and the
 * wall-clock time: 17:00 on a Tuesday stays 17:00 on a Tuesday whatever daylight saving does.
 */
import { isMap, isScalar, parseDocument } from 'yaml'
import type { Document } from 'yaml'

const LOCAL = /^(\d{4})-(\d{2})-(\d{2})(T\d{2}:\d{2}(?::\d{2})?)$/

/** `2027-02-23T17:00` moved by `weeks` whole weeks (negative: earlier), or null when it is not such a date. */
export function shiftLocalDateTime(local: string, weeks: number): string | null {
  const m = LOCAL.exec(local)
  if (!m) return null
  const [, y, mo, d, time] = m
  const base = Date.UTC(Number(y), Number(mo) - 1, Number(d))
  const moved = new Date(base + weeks * 7 * 86_400_000)
  // Reject impossible dates such as 2027-02-31, which Date.UTC would quietly roll forward.
  const check = new Date(base)
  if (check.getUTCDate() !== Number(d) || check.getUTCMonth() !== Number(mo) - 1) return null
  const pad = (n: number, w = 2) => String(n).padStart(w, '0')
  return `${pad(moved.getUTCFullYear(), 4)}-${pad(moved.getUTCMonth() + 1)}-${pad(moved.getUTCDate())}${time}`
}

/** One front-matter date and what became of it. */
export interface ShiftedDate {
  /** `due.at` or `late.acceptUntil`. */
  path: 'due.at' | 'late.acceptUntil'
  from: string
  /** The moved value, or null when it could not be moved (see `problem`). */
  to: string | null
  problem?: string
}

export interface ShiftResult {
  source: string
  dates: ShiftedDate[]
  /** Problems with the front matter as a whole (it could not be read). */
  problems: string[]
}

const FENCE = /^---[ \t]*$/

function scalarAt(doc: Document, path: readonly [string, string]) {
  const parent: unknown = doc.get(path[0], true)
  if (!isMap(parent)) return undefined
  const node: unknown = parent.get(path[1], true)
  return isScalar(node) ? node : undefined
}

/**
 * The source with `due.at` and `late.acceptUntil` moved by `weeks`. A date that is not a local
 * date-time (a typing error in an old version) is left as it is and reported, never guessed at.
 */
export function shiftFrontMatterDates(source: string, weeks: number): ShiftResult {
  const normalised = source.replace(/^\uFEFF/, '').replace(/\r\n?/g, '\n')
  const lines = normalised.split('\n')
  const close = FENCE.test(lines[0] ?? '') ? lines.findIndex((l, i) => i > 0 && FENCE.test(l)) : -1
  if (close < 0) return { source, dates: [], problems: ['the front matter cannot be found; no dates were moved'] }
  const yamlStart = lines[0]!.length + 1
  const yaml = lines.slice(1, close).join('\n')
  const doc = parseDocument(yaml, { uniqueKeys: true })
  if (doc.errors.length > 0) {
    return { source, dates: [], problems: ['the front matter cannot be read; no dates were moved'] }
  }
  const edits: { start: number; end: number; text: string }[] = []
  const dates: ShiftedDate[] = []
  for (const [path, key] of [
    [['due', 'at'], 'due.at'],
    [['late', 'acceptUntil'], 'late.acceptUntil'],
  ] as const) {
    const node = scalarAt(doc, path)
    if (!node) continue
    const from = String(node.value)
    const to = typeof node.value === 'string' ? shiftLocalDateTime(from, weeks) : null
    if (to === null || !node.range) {
      dates.push({
        path: key,
        from,
        to: null,
        problem: `${key} “${from}” is not a date like 2027-02-09T17:00; not moved`,
      })
      continue
    }
    const raw = yaml.slice(node.range[0], node.range[1])
    const at = raw.indexOf(from)
    if (at < 0) {
      dates.push({
        path: key,
        from,
        to: null,
        problem: `${key} “${from}” is written in a way that cannot be edited; not moved`,
      })
      continue
    }
    edits.push({ start: yamlStart + node.range[0] + at, end: yamlStart + node.range[0] + at + from.length, text: to })
    dates.push({ path: key, from, to })
  }
  let out = normalised
  for (const e of edits.sort((a, b) => b.start - a.start)) out = out.slice(0, e.start) + e.text + out.slice(e.end)
  return { source: out, dates, problems: [] }
}

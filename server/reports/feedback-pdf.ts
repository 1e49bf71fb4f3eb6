/**
 * The graded feedback report of one hand-in, as a PDF: a pure function of its data (no database, no
 * request). Layout, top to bottom: the course and module, who handed in and when, lateness, the
 * score (with a note when staff adjusted it), the checks table, the notes on the data (flags) with
 * their state, the staff comments as plain text, and the thrust and pressure against time drawn
 * as vector paths, and the photographs with their marks and the distances they measure
 * (./photo-section.ts). Every page has a footer with its number and the generation date.
 *
 * Type: serif (Noto Serif) for course text, sans (Source Sans 3) for labels and headings, mono
 * (JetBrains Mono) for every number; all embedded from the app's own font files (./fonts.ts).
 * https://pdfkit.org/docs/text.html, https://pdfkit.org/docs/vector.html
 */
import PDFDocument from 'pdfkit'
import { dominantInputsText, expectedWithUncertaintyText } from '../../shared/grading/uncertainty-text'
import type { ChartData, CheckOutcome, CheckUncertaintyView } from '../../shared/schemas/submissions'
import { formatInZone } from '../../shared/time'
import { allFaces, defaultFont } from './fonts'
import type { FontRole } from './fonts'
import { formatCompact, formatScore, percentText, valueText } from '../../shared/format'
import type { FlagStatus } from '../../shared/schemas/review'
import {
  COPPER,
  INK,
  INK_700,
  MUTED,
  PAPER_DEEP,
  RULE,
  SPAN,
  TEXT,
  bottomOf,
  contentWidth,
  ensure,
  heading,
  heightOf,
  paragraph,
  put,
  widthOf,
} from './pdf-layout'
import type { Doc } from './pdf-layout'
import { photoSection } from './photo-section'
import type { ReportImage } from './photo-section'

export type { ReportImage } from './photo-section'

export interface ReportCheck {
  label: string
  unit: string
  reported: number | null
  /** Null when the module does not show expected values to students. */
  expected: number | null
  relError: number | null
  tolerance: number | null
  pointsAwarded: number
  pointsPossible: number
  outcome: CheckOutcome
  /** Staff changed this check's points. */
  adjusted: boolean
  /** The expected value's uncertainty (figures null when expected values are not shown), if any. */
  uncertainty?: CheckUncertaintyView | null
}

export interface ReportFlag {
  message: string
  status: FlagStatus
  resolvedAt: Date | null
}

export interface ReportComment {
  author: string
  at: Date
  /** The comment's Markdown as plain paragraphs (./plain-text.ts). */
  paragraphs: string[]
}

export interface FeedbackReportData {
  course: { code: string; title: string; term: string; institution: string; timeZone: string }
  module: { title: string; version: number }
  owner: { kind: 'group'; name: string; members: string[] } | { kind: 'student'; name: string }
  attempt: number
  attemptsAllowed: number
  submittedAt: Date
  submittedBy: string
  lateness: { isLate: boolean; daysLate: number; penalty: number }
  score: {
    /** The score that counts: the staff's total when they set one. */
    score: number
    maxScore: number
    /** Points before the late penalty. */
    rawScore: number | null
    /** The automatic score when staff set the total, else null. */
    computedBeforeOverride: number | null
  }
  checks: ReportCheck[]
  flags: ReportFlag[]
  comments: ReportComment[]
  chart: ChartData | null
  /** The hand-in's photographs with their marks (none, or left out, for a sheet without photographs). */
  images?: ReportImage[]
  generatedAt: Date
}

const OUTCOME: Record<CheckOutcome, { word: string; colour: string }> = {
  pass: { word: 'Passed', colour: '#1f6b3a' },
  partial: { word: 'Partial credit', colour: '#7a4b00' },
  fail: { word: 'Failed', colour: '#a01c2c' },
  error: { word: 'Not checked', colour: MUTED },
}

const MARGIN = { top: 56, bottom: 64, left: 50, right: 50 }

function titleBlock(doc: Doc, d: FeedbackReportData): void {
  const x = doc.page.margins.left
  const w = contentWidth(doc)
  doc.fillColor(MUTED)
  put(doc, 'sans', 9.5, d.course.institution, x, doc.y, { width: w })
  doc.fillColor(COPPER)
  put(doc, 'sans-semibold', 11, 'Feedback report', x, doc.y + 4, { width: w })
  doc.fillColor(INK)
  put(doc, 'serif-bold', 18, d.module.title, x, doc.y + 2, { width: w, lineGap: 1 })
  doc.fillColor(TEXT)
  put(doc, 'sans', 10.5, `${d.course.code} · ${d.course.title} · ${d.course.term}`, x, doc.y + 2, { width: w })
  doc.y += 6
  doc
    .moveTo(x, doc.y)
    .lineTo(x + w, doc.y)
    .lineWidth(1.5)
    .strokeColor(INK)
    .stroke()
  doc.y += 10

  const rows: [string, string, FontRole][] = [['Module', `${d.module.title}, version ${d.module.version}`, 'serif']]
  if (d.owner.kind === 'group') {
    rows.push(['Lab group', d.owner.name, 'serif'])
    rows.push(['Members', d.owner.members.length ? d.owner.members.join(', ') : '—', 'serif'])
  } else {
    rows.push(['Student', d.owner.name, 'serif'])
  }
  rows.push(['Attempt', `${d.attempt} of ${d.attemptsAllowed}`, 'serif'])
  rows.push(['Handed in', `${formatInZone(d.submittedAt, d.course.timeZone)} by ${d.submittedBy}`, 'serif'])
  const late = d.lateness
  rows.push([
    'Lateness',
    late.isLate
      ? `${late.daysLate} day${late.daysLate === 1 ? '' : 's'} late: ${formatScore(late.penalty * 100)} % taken off the score`
      : 'On time',
    'serif',
  ])
  const labelW = 86
  for (const [label, value, role] of rows) {
    const h = Math.max(heightOf(doc, role, 10, value, w - labelW, { lineGap: 1 }), 12)
    ensure(doc, h)
    const y = doc.y
    doc.fillColor(MUTED)
    put(doc, 'sans-semibold', 9, label, x, y + 1.5, { lineBreak: false })
    doc.fillColor(TEXT)
    put(doc, role, 10, value, x + labelW, y, { width: w - labelW, lineGap: 1 })
    doc.y = Math.max(doc.y, y + h) + 2
  }
  doc.x = x
}

function scoreBox(doc: Doc, d: FeedbackReportData): void {
  const x = doc.page.margins.left
  const w = contentWidth(doc)
  const s = d.score
  const notes: string[] = []
  if (d.lateness.penalty > 0 && s.rawScore !== null) {
    notes.push(
      `Handed in ${d.lateness.daysLate} day${d.lateness.daysLate === 1 ? '' : 's'} late: ${formatScore(d.lateness.penalty * 100)} % taken off. Raw score ${formatScore(s.rawScore)} of ${formatScore(s.maxScore)}.`,
    )
  }
  if (s.computedBeforeOverride !== null) {
    notes.push(
      `The course staff adjusted this score. The automatic check gave ${formatScore(s.computedBeforeOverride)} of ${formatScore(s.maxScore)}.`,
    )
  }
  if (d.checks.some((c) => c.adjusted)) notes.push('The course staff changed the points of the checks marked * below.')
  const noteH = notes.reduce((h, n) => h + heightOf(doc, 'sans', 9.5, n, w - 28) + 2, 0)
  const boxH = 50 + noteH
  doc.moveDown(0.6)
  ensure(doc, boxH)
  const top = doc.y
  doc.rect(x, top, w, boxH).fillColor('#ffffff').fill()
  doc.rect(x, top, w, boxH).lineWidth(0.6).strokeColor(RULE).stroke()
  doc.rect(x, top, 5, boxH).fillColor(INK).fill()
  doc.fillColor(MUTED)
  put(doc, 'sans-semibold', 9, 'Score', x + 16, top + 8, { lineBreak: false })
  const big = formatScore(s.score)
  doc.fillColor(INK)
  put(doc, 'mono-bold', 22, big, x + 16, top + 20, { lineBreak: false })
  const bw = widthOf(doc, 'mono-bold', 22, big)
  doc.fillColor(MUTED)
  put(doc, 'sans', 12, `of ${formatScore(s.maxScore)} points`, x + 16 + bw + 8, top + 27, { lineBreak: false })
  doc.y = top + 48
  for (const n of notes) {
    doc.fillColor(s.computedBeforeOverride !== null && n.startsWith('The course staff adjusted') ? INK_700 : COPPER)
    put(doc, 'sans', 9.5, n, x + 16, doc.y, { width: w - 28 })
    doc.y += 2
  }
  doc.fillColor(TEXT)
  doc.y = top + boxH
  doc.x = x
}

interface Column {
  title: string
  width: number
  role: FontRole
  size: number
  align: 'left' | 'right'
  cell: (c: ReportCheck) => string
  colour?: (c: ReportCheck) => string
}

const CELL_PAD_X = 4
/** The result's name keeps at least this much room, pt; it wraps within it. */
const RESULT_MIN_WIDTH = 96
/** Columns that may wrap when the table is too wide, in this order: values with their uncertainty and unit. */
const MAY_WRAP = ['Expected', 'Tolerance', 'Your value']

/**
 * Each column as wide as its widest cell or title (measured in its own fonts), so a short cell
 * such as "< 0.01 %" or "Partial credit" never wraps. When they need more than `room`, the value
 * columns in MAY_WRAP give way, in that order, down to their titles' width, and wrap.
 */
function sizeToContent(doc: Doc, cols: Column[], checks: readonly ReportCheck[], room: number): void {
  for (const c of cols) {
    const widest = Math.max(
      widthOf(doc, 'sans-semibold', 8.5, c.title),
      ...checks.map((check) => widthOf(doc, c.role, c.size, c.cell(check))),
    )
    // A point to spare: pdfkit wraps a line whose width equals the box's to the last decimal.
    c.width = Math.ceil(widest + 2 * CELL_PAD_X + 1)
  }
  let over = cols.reduce((s, c) => s + c.width, 0) - room
  for (const title of MAY_WRAP) {
    const c = cols.find((col) => col.title === title)
    if (!c || over <= 0) continue
    const floor = Math.ceil(widthOf(doc, 'sans-semibold', 8.5, c.title) + 2 * CELL_PAD_X + 1)
    const give = Math.min(over, c.width - floor)
    c.width -= give
    over -= give
  }
}

function checksTable(doc: Doc, d: FeedbackReportData): void {
  const showExpected = d.checks.some((c) => c.expected !== null)
  const withU = d.checks.some((c) => c.expected !== null && (c.uncertainty?.expanded ?? 0) > 0)
  const w = contentWidth(doc)
  const fixed: Column[] = [
    {
      title: 'Your value',
      width: 0,
      role: 'mono',
      size: 8,
      align: 'right',
      cell: (c) => valueText(c.reported, c.unit),
    },
    ...(showExpected
      ? [
          {
            title: 'Expected',
            width: 0,
            role: 'mono' as const,
            size: 8,
            align: 'right' as const,
            cell: (c: ReportCheck) =>
              expectedWithUncertaintyText(
                c.expected,
                c.uncertainty?.expanded ?? null,
                c.uncertainty?.coverage ?? null,
                c.unit,
              ),
          },
        ]
      : []),
    { title: 'Error', width: 0, role: 'mono', size: 8, align: 'right', cell: (c) => percentText(c.relError) },
    {
      title: 'Tolerance',
      width: 0,
      role: 'mono',
      size: 8,
      align: 'right',
      cell: (c) => (c.tolerance === null ? '—' : `± ${valueText(c.tolerance, c.unit)}`),
    },
    {
      title: 'Points',
      width: 0,
      role: 'mono',
      size: 8,
      align: 'right',
      cell: (c) => `${formatScore(c.pointsAwarded)} / ${formatScore(c.pointsPossible)}${c.adjusted ? ' *' : ''}`,
    },
    {
      title: 'Outcome',
      width: 0,
      role: 'sans-semibold',
      size: 9,
      align: 'left',
      cell: (c) => OUTCOME[c.outcome].word,
      colour: (c) => OUTCOME[c.outcome].colour,
    },
  ]
  sizeToContent(doc, fixed, d.checks, w - RESULT_MIN_WIDTH)
  const used = fixed.reduce((s, c) => s + c.width, 0)
  const cols: Column[] = [
    { title: 'Result', width: w - used, role: 'sans-semibold', size: 9, align: 'left', cell: (c) => c.label },
    ...fixed,
  ]
  const padX = CELL_PAD_X
  const padY = 4
  const x0 = doc.page.margins.left

  const header = () => {
    const y = doc.y
    const h = 18
    doc.rect(x0, y, w, h).fillColor(INK).fill()
    let x = x0
    doc.fillColor('#ffffff')
    for (const c of cols) {
      put(doc, 'sans-semibold', 8.5, c.title, x + padX, y + 5, {
        width: c.width - 2 * padX,
        align: c.align,
        lineBreak: false,
      })
      x += c.width
    }
    doc.fillColor(TEXT)
    doc.y = y + h
  }

  ensure(doc, 18 + 26)
  header()
  d.checks.forEach((check, i) => {
    const texts = cols.map((c) => c.cell(check))
    const h = Math.max(...cols.map((c, k) => heightOf(doc, c.role, c.size, texts[k]!, c.width - 2 * padX))) + 2 * padY
    if (doc.y + h > bottomOf(doc)) {
      doc.addPage()
      header()
    }
    const y = doc.y
    if (i % 2 === 1) doc.rect(x0, y, w, h).fillColor(PAPER_DEEP).fill()
    doc
      .moveTo(x0, y + h)
      .lineTo(x0 + w, y + h)
      .lineWidth(0.4)
      .strokeColor(RULE)
      .stroke()
    let x = x0
    cols.forEach((c, k) => {
      doc.fillColor(c.colour ? c.colour(check) : TEXT)
      put(doc, c.role, c.size, texts[k]!, x + padX, y + padY + (c.role.startsWith('mono') ? 1 : 0), {
        width: c.width - 2 * padX,
        align: c.align,
      })
      x += c.width
    })
    doc.fillColor(TEXT)
    doc.y = y + h
  })
  doc.x = x0
  doc.y += 4
  if (!showExpected) {
    paragraph(
      doc,
      'sans',
      8.5,
      'This module does not show the expected values; the error and the tolerance tell how close each result came.',
      MUTED,
    )
  }
  uncertaintySources(doc, d, withU)
}

/** Which inputs dominate each expected value's uncertainty, in words (as on the result page). */
function uncertaintySources(doc: Doc, d: FeedbackReportData, withU: boolean): void {
  const items = d.checks.flatMap((c) => {
    const text = c.uncertainty ? dominantInputsText(c.uncertainty.contributions) : null
    return text ? [`${c.label}: ${text}.`] : []
  })
  if (items.length === 0) return
  doc.y += 6
  ensure(doc, 50)
  paragraph(doc, 'sans-semibold', 9.5, 'Where the uncertainty comes from')
  doc.y += 1
  paragraph(
    doc,
    'serif',
    8.5,
    `The instruments' uncertainties, as the module declares them, carry through to each expected value.${
      withU
        ? ' An expected value is shown as ± U, where U is k times its combined standard uncertainty (k = 2 covers about 95 %).'
        : ''
    } The inputs that contribute most, with their share of the variance:`,
    MUTED,
  )
  doc.y += 2
  for (const item of items) paragraph(doc, 'serif', 9, `• ${item}`, TEXT, 8)
}

function flagsSection(doc: Doc, d: FeedbackReportData): void {
  const x = doc.page.margins.left
  const w = contentWidth(doc)
  for (const f of d.flags) {
    const state =
      f.status === 'resolved'
        ? `Resolved: looked at and closed by the course staff${f.resolvedAt ? ` on ${formatInZone(f.resolvedAt, d.course.timeZone)}` : ''}.`
        : 'Open: waiting for a teaching assistant to look at it.'
    const h =
      heightOf(doc, 'serif', 9.5, f.message, w - 18, { lineGap: 1.5 }) + heightOf(doc, 'sans', 8.5, state, w - 18) + 12
    ensure(doc, Math.min(h, bottomOf(doc) - doc.page.margins.top))
    const top = doc.y
    const resolved = f.status === 'resolved'
    doc
      .rect(x, top, w, h)
      .fillColor(resolved ? '#e6f1e9' : '#f8eedb')
      .fill()
    doc
      .rect(x, top, 4, h)
      .fillColor(resolved ? OUTCOME.pass.colour : OUTCOME.partial.colour)
      .fill()
    doc.fillColor(TEXT)
    put(doc, 'serif', 9.5, f.message, x + 12, top + 5, { width: w - 18, lineGap: 1.5 })
    doc.fillColor(MUTED)
    put(doc, 'sans-semibold', 8.5, state, x + 12, doc.y + 1, { width: w - 18 })
    doc.fillColor(TEXT)
    doc.y = Math.max(doc.y, top + h) + 6
  }
  doc.x = x
}

function commentsSection(doc: Doc, d: FeedbackReportData): void {
  const x = doc.page.margins.left
  for (const c of d.comments) {
    ensure(doc, 40)
    const top = doc.y
    doc.rect(x, top, 3, 12).fillColor(INK_700).fill()
    doc.fillColor(MUTED)
    put(doc, 'sans-semibold', 9, `${c.author} · ${formatInZone(c.at, d.course.timeZone)}`, x + 10, top + 1, {
      width: contentWidth(doc) - 10,
    })
    doc.y += 3
    for (const p of c.paragraphs) {
      paragraph(doc, 'serif', 10, p, TEXT, 10)
      doc.y += 4
    }
    doc.y += 6
  }
}

// ---------------------------------------------------------------------------------------------
// The chart, as vector paths.

/** Round tick steps (1, 2, 2.5, 5 × 10ⁿ) covering [lo, hi] with at most about `count` ticks. */
export function niceTicks(lo: number, hi: number, count: number): { ticks: number[]; lo: number; hi: number } {
  if (!(hi > lo)) hi = lo + 1
  const raw = (hi - lo) / Math.max(1, count)
  const power = 10 ** Math.floor(Math.log10(raw))
  const step = ([1, 2, 2.5, 5, 10].find((m) => m * power >= raw) ?? 10) * power
  const start = Math.floor(lo / step + 1e-9) * step
  const end = Math.ceil(hi / step - 1e-9) * step
  const ticks: number[] = []
  for (let v = start; v <= end + step / 2; v += step)
    ticks.push(Math.abs(v) < step * 1e-9 ? 0 : Number(v.toPrecision(12)))
  return { ticks, lo: start, hi: end }
}

function finiteMax(...series: (readonly (number | null)[] | undefined)[]): number {
  let m = -Infinity
  for (const s of series) for (const v of s ?? []) if (typeof v === 'number' && Number.isFinite(v) && v > m) m = v
  return m
}

interface Series {
  label: string
  values: readonly (number | null)[]
  scale: number
  axis: 'force' | 'pressure'
  colour: string
  width: number
  dash: [number, number] | null
}

/**
 * Logged thrust (N, left axis) and chamber and receiver pressure (kPa absolute, right axis) against
 * time, the ideal thrust dashed, the supersonic spans shaded; as on the result page.
 */
function chart(doc: Doc, c: ChartData, x: number, y: number, w: number, h: number): number {
  const t = c.time
  const series: Series[] = []
  if (c.thrust)
    series.push({
      label: 'Thrust, logged (N)',
      values: c.thrust,
      scale: 1,
      axis: 'force',
      colour: INK_700,
      width: 1.3,
      dash: null,
    })
  if (c.idealThrust)
    series.push({
      label: 'Ideal thrust for the logged chamber pressure (N)',
      values: c.idealThrust,
      scale: 1,
      axis: 'force',
      colour: INK_700,
      width: 0.9,
      dash: [4, 2.5],
    })
  if (c.chamberPressure)
    series.push({
      label: 'Chamber pressure (kPa absolute)',
      values: c.chamberPressure,
      scale: 1e-3,
      axis: 'pressure',
      colour: COPPER,
      width: 1.2,
      dash: null,
    })
  if (c.receiverPressure)
    series.push({
      label: 'Receiver pressure (kPa absolute)',
      values: c.receiverPressure,
      scale: 1e-3,
      axis: 'pressure',
      colour: MUTED,
      width: 0.9,
      dash: [1.5, 2],
    })
  const hasForce = series.some((s) => s.axis === 'force')
  const hasPressure = series.some((s) => s.axis === 'pressure')

  const left = x + 44
  const right = x + w - (hasPressure ? 48 : 8)
  const top = y + 6
  const bottom = y + h - 30
  const tx = niceTicks(t[0] ?? 0, t[t.length - 1] ?? 1, 8)
  const xLo = t[0] ?? 0
  const xHi = t[t.length - 1] ?? 1
  const fy = niceTicks(0, Math.max(finiteMax(c.thrust, c.idealThrust), 1e-9) * 1.05, 6)
  const py = niceTicks(0, Math.max(finiteMax(c.chamberPressure, c.receiverPressure) * 1e-3, 1e-9) * 1.05, 6)
  const X = (v: number) => left + ((v - xLo) / (xHi - xLo || 1)) * (right - left)
  const Y = (v: number, axis: 'force' | 'pressure') => {
    const a = axis === 'force' ? fy : py
    return bottom - ((v - a.lo) / (a.hi - a.lo || 1)) * (bottom - top)
  }

  // Supersonic spans behind everything.
  doc.save()
  for (const [from, to] of c.supersonicSpans) {
    const a = Math.max(left, X(from))
    const b = Math.min(right, X(to))
    if (b > a)
      doc
        .rect(a, top, b - a, bottom - top)
        .fillOpacity(0.12)
        .fillColor(SPAN)
        .fill()
  }
  doc.restore()

  // Grid and ticks.
  doc.lineWidth(0.4).strokeColor(RULE)
  for (const v of tx.ticks) {
    if (v < xLo - 1e-9 || v > xHi + 1e-9) continue
    doc.moveTo(X(v), top).lineTo(X(v), bottom).stroke()
    const label = formatCompact(v, 4)
    doc.fillColor(TEXT)
    put(doc, 'mono', 7, label, X(v) - widthOf(doc, 'mono', 7, label) / 2, bottom + 4, { lineBreak: false })
  }
  const mainAxis = hasForce ? 'force' : 'pressure'
  for (const v of (mainAxis === 'force' ? fy : py).ticks) {
    doc.moveTo(left, Y(v, mainAxis)).lineTo(right, Y(v, mainAxis)).lineWidth(0.4).strokeColor(RULE).stroke()
  }
  if (hasForce) {
    for (const v of fy.ticks) {
      const label = formatCompact(v, 4)
      put(doc, 'mono', 7, label, left - 4 - widthOf(doc, 'mono', 7, label), Y(v, 'force') - 3.5, { lineBreak: false })
      doc
        .moveTo(left - 3, Y(v, 'force'))
        .lineTo(left, Y(v, 'force'))
        .lineWidth(0.6)
        .strokeColor(TEXT)
        .stroke()
    }
  }
  if (hasPressure) {
    for (const v of py.ticks) {
      const label = formatCompact(v, 4)
      put(doc, 'mono', 7, label, right + 4, Y(v, 'pressure') - 3.5, { lineBreak: false })
      doc
        .moveTo(right, Y(v, 'pressure'))
        .lineTo(right + 3, Y(v, 'pressure'))
        .lineWidth(0.6)
        .strokeColor(TEXT)
        .stroke()
    }
  }
  doc
    .rect(left, top, right - left, bottom - top)
    .lineWidth(0.8)
    .strokeColor(TEXT)
    .stroke()

  // Axis titles.
  doc.fillColor(TEXT)
  const xTitle = 'Time (s)'
  put(doc, 'sans', 8.5, xTitle, (left + right) / 2 - widthOf(doc, 'sans', 8.5, xTitle) / 2, bottom + 15, {
    lineBreak: false,
  })
  const vertical = (text: string, cx: number) => {
    const tw = widthOf(doc, 'sans', 8.5, text)
    const cy = (top + bottom) / 2
    doc.save()
    doc.rotate(-90, { origin: [cx, cy] })
    put(doc, 'sans', 8.5, text, cx - tw / 2, cy - 5, { lineBreak: false })
    doc.restore()
  }
  if (hasForce) vertical('Thrust (N)', x + 6)
  if (hasPressure) vertical('Pressure (kPa absolute)', x + w - 6)

  // The data, clipped to the plot; a missing value breaks the line.
  doc.save()
  doc.rect(left, top, right - left, bottom - top).clip()
  for (const s of series) {
    let open = false
    for (let i = 0; i < t.length && i < s.values.length; i++) {
      const v = s.values[i]
      if (typeof v !== 'number' || !Number.isFinite(v)) {
        open = false
        continue
      }
      const px = X(t[i] as number)
      const pyv = Y(v * s.scale, s.axis)
      if (open) doc.lineTo(px, pyv)
      else doc.moveTo(px, pyv)
      open = true
    }
    doc.lineWidth(s.width).strokeColor(s.colour).lineJoin('round')
    if (s.dash) doc.dash(s.dash[0], { space: s.dash[1] })
    doc.stroke()
    doc.undash()
  }
  doc.restore()

  // Legend under the plot, wrapped to the width.
  let lx = x
  let ly = y + h + 4
  const items: { label: string; draw: (ax: number, ay: number) => void }[] = series.map((s) => ({
    label: s.label,
    draw: (ax, ay) => {
      doc
        .moveTo(ax, ay)
        .lineTo(ax + 18, ay)
        .lineWidth(s.width + 0.4)
        .strokeColor(s.colour)
      if (s.dash) doc.dash(s.dash[0], { space: s.dash[1] })
      doc.stroke()
      doc.undash()
    },
  }))
  if (c.supersonicSpans.length) {
    items.push({
      label: 'Nozzle exit supersonic',
      draw: (ax, ay) => {
        doc.save()
        doc
          .rect(ax, ay - 4, 18, 8)
          .fillOpacity(0.12)
          .fillColor(SPAN)
          .fill()
        doc.restore()
      },
    })
  }
  for (const it of items) {
    const iw = 24 + widthOf(doc, 'sans', 8, it.label) + 14
    if (lx + iw > x + w && lx > x) {
      lx = x
      ly += 13
    }
    it.draw(lx, ly + 4)
    doc.fillColor(TEXT)
    put(doc, 'sans', 8, it.label, lx + 24, ly, { lineBreak: false })
    lx += iw
  }
  return ly + 14
}

function chartSection(doc: Doc, c: ChartData): void {
  const x = doc.page.margins.left
  const w = contentWidth(doc)
  const h = 230
  ensure(doc, h + 80)
  const after = chart(doc, c, x, doc.y, w, h)
  doc.y = after + 4
  doc.x = x
  paragraph(
    doc,
    'serif',
    8.5,
    'Shaded: times when the nozzle exit was supersonic. Dashed: the ideal (isentropic) thrust for the chamber pressure logged at that moment. Pressures are absolute.',
    MUTED,
  )
}

function footers(doc: Doc, d: FeedbackReportData): void {
  const range = doc.bufferedPageRange()
  const generated = `Generated by Isentrope on ${formatInZone(d.generatedAt, d.course.timeZone)}`
  const who = d.owner.kind === 'group' ? d.owner.name : d.owner.name
  for (let i = range.start; i < range.start + range.count; i++) {
    doc.switchToPage(i)
    const keep = doc.page.margins.bottom
    // Writing in the bottom margin must not start a new page.
    doc.page.margins.bottom = 0
    const x = doc.page.margins.left
    const right = doc.page.width - doc.page.margins.right
    const y = doc.page.height - 40
    doc
      .moveTo(x, y - 6)
      .lineTo(right, y - 6)
      .lineWidth(0.5)
      .strokeColor(RULE)
      .stroke()
    doc.fillColor(MUTED)
    put(doc, 'sans', 8, generated, x, y, { lineBreak: false })
    const pageText = `Page ${i - range.start + 1} of ${range.count}`
    put(doc, 'sans', 8, pageText, right - widthOf(doc, 'sans', 8, pageText), y, { lineBreak: false })
    if (i > range.start) {
      const running = `${d.course.code} · ${d.module.title} · ${who}`
      put(doc, 'sans', 8, running, x, 30, { lineBreak: false, width: right - x, ellipsis: true, height: 10 })
    }
    doc.page.margins.bottom = keep
  }
  doc.fillColor(TEXT)
}

/**
 * Lays out the report. The document is ended; read it as a stream (or use {@link feedbackPdfBuffer}).
 *
 * @param d - everything the report prints, already checked for visibility by the caller
 * @returns the ended PDF document (a readable stream)
 */
export function renderFeedbackPdf(d: FeedbackReportData): Doc {
  const doc = new PDFDocument({
    size: 'A4',
    margins: MARGIN,
    bufferPages: true,
    // Our own sans as the starting font, so pdfkit never loads a standard 14 font. pdfkit's
    // font() takes a Buffer as well as a path (the typings say path only).
    font: defaultFont() as unknown as string,
    lang: 'en',
    info: {
      Title: `Feedback report: ${d.module.title}`,
      Author: 'Isentrope',
      Subject: `${d.course.code} ${d.course.term}: ${d.owner.name}, attempt ${d.attempt}`,
      Creator: 'Isentrope',
      CreationDate: d.generatedAt,
    },
  } as PDFKit.PDFDocumentOptions)
  // pdfkit re-applies the document's `font` option on every page it adds when text flows over,
  // which would switch a comment running onto the next page to the default font mid-paragraph.
  delete doc.options.font
  for (const f of allFaces()) doc.registerFont(f.name, f.bytes)

  titleBlock(doc, d)
  scoreBox(doc, d)

  heading(doc, 'Your results, checked')
  paragraph(
    doc,
    'serif',
    9.5,
    'Each expected value is worked out from your own log and measurements. A result passes when it is within the tolerance of that value.',
    MUTED,
  )
  doc.y += 4
  if (d.checks.length) checksTable(doc, d)
  else paragraph(doc, 'serif', 10, 'This hand-in has no checked results.')

  heading(doc, 'Notes on your data')
  if (d.flags.length) flagsSection(doc, d)
  else paragraph(doc, 'serif', 10, 'The automatic data checks found nothing unusual in your log.')

  if (d.comments.length) {
    heading(doc, 'From the course staff')
    commentsSection(doc, d)
  }

  if (d.chart && d.chart.time.length > 1) {
    heading(doc, 'Your run against the ideal nozzle', 320)
    chartSection(doc, d.chart)
  }

  if (d.images) photoSection(doc, d.images)

  footers(doc, d)
  doc.end()
  return doc
}

/** The report as bytes. */
export async function feedbackPdfBuffer(d: FeedbackReportData): Promise<Buffer> {
  const doc = renderFeedbackPdf(d)
  const chunks: Buffer[] = []
  for await (const chunk of doc as unknown as AsyncIterable<Buffer>) chunks.push(chunk)
  return Buffer.concat(chunks)
}

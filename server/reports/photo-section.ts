/**
 * The photographs of a hand-in in the feedback report: each picture scaled to the page, the
 * student's marks drawn over it as vector shapes at the same scale, and the distances they measure
 * beside the theory's. A pure function of its data, like the rest of the report.
 *
 * Marks are in the stored picture's pixels (origin top-left, y down), as PDF user space is once the
 * picture's top-left corner is the origin, so one factor (points per pixel) carries every mark.
 * The distances come from measureJet (shared/images/jet-marks.ts), the same function the grading
 * and the pages use, so the report cannot disagree with them.
 * https://pdfkit.org/docs/images.html, https://pdfkit.org/docs/vector.html
 */
import { measureJet } from '../../shared/images/jet-marks'
import type { JetMarks, JetMeasurement, Point } from '../../shared/images/jet-marks'
import { formatCompact, withUnit } from '../../shared/format'
import type { FontRole } from './fonts'
import {
  INK,
  MUTED,
  PAPER_DEEP,
  RULE,
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

/** One photograph of the hand-in, as the report prints it. */
export interface ReportImage {
  label: string
  contentType: 'image/png' | 'image/jpeg'
  /** The stored picture's size in pixels (the marks are in these coordinates). */
  width: number
  height: number
  bytes: Buffer
  marks: JetMarks
  /** The theory's distances, m; null when the sheet names none or expected values are hidden from the student. */
  expected: { cellSpacing: number | null; machDisk: number | null }
}

/** Tallest a picture is drawn, pt: room is left on its page for the label and the first rows of the table. */
const MAX_PICTURE_HEIGHT = 400

// Marks in colours that stand out on a grey shadowgraph or a coloured schlieren picture, each
// drawn over a pale halo so it shows on dark and bright parts alike.
const MARK_COLOUR = {
  scale: '#c2410c',
  exitPlane: '#2c62c9',
  cellEnd: '#1f6b3a',
  machDisk: '#a01c2c',
} as const
const HALO = '#ffffff'

type Segment = [Point, Point]

/** Where each mark is drawn, in points, with the picture's top-left corner at `origin`. */
export interface MarkShapes {
  /** The scale line and a short tick across each of its ends. */
  scale: { line: Segment; ticks: [Segment, Segment]; label: string }
  /** A line across the jet through the exit-plane mark. */
  exitPlane: Segment
  /** Each cell end, numbered along the jet from the exit plane (1 nearest), with a tick across the jet. */
  cellEnds: { number: number; at: Point; tick: Segment }[]
  /** A line across the jet through the Mach-disk mark, when marked. */
  machDisk: Segment | null
}

/**
 * The marks' shapes at `pointsPerPixel`. The jet's axis runs from the exit plane to the farthest
 * mark (as measureJet measures along it); with no mark downstream it is taken across the scale
 * (the scale spans the exit by default), so the exit plane is still drawn along the nozzle's lips.
 */
export function markShapes(marks: JetMarks, pointsPerPixel: number, origin: Point): MarkShapes {
  const k = pointsPerPixel
  const at = (p: Point): Point => ({ x: origin.x + p.x * k, y: origin.y + p.y * k })
  const e = marks.exitPlane
  const downstream = [...marks.cellEnds, ...(marks.machDisk ? [marks.machDisk] : [])]
  const far = downstream.reduce<Point | undefined>(
    (best, p) => (best === undefined || dist(e, p) > dist(e, best) ? p : best),
    undefined,
  )
  const scaleDir = unit(marks.scale.from, marks.scale.to)
  const toFar = far ? unit(e, far) : null
  let axis: Point = toFar ?? (scaleDir ? { x: scaleDir.y, y: -scaleDir.x } : { x: 1, y: 0 })
  // Without a downstream mark, take the side the picture's reading direction suggests (jets are
  // usually photographed running to the right).
  if (!toFar && axis.x < 0) axis = { x: -axis.x, y: -axis.y }
  const across = { x: -axis.y, y: axis.x }
  const scalePts = dist(marks.scale.from, marks.scale.to) * k
  const acrossAt = (p: Point, half: number): Segment => {
    const c = at(p)
    return [
      { x: c.x - across.x * half, y: c.y - across.y * half },
      { x: c.x + across.x * half, y: c.y + across.y * half },
    ]
  }
  const along = (p: Point) => (p.x - e.x) * axis.x + (p.y - e.y) * axis.y
  const tickAt = (p: Point): Segment => {
    const c = at(p)
    const d = scaleDir ? { x: -scaleDir.y, y: scaleDir.x } : { x: 0, y: 1 }
    return [
      { x: c.x - d.x * 3, y: c.y - d.y * 3 },
      { x: c.x + d.x * 3, y: c.y + d.y * 3 },
    ]
  }
  return {
    scale: {
      line: [at(marks.scale.from), at(marks.scale.to)],
      ticks: [tickAt(marks.scale.from), tickAt(marks.scale.to)],
      label: withUnit(formatCompact(marks.scale.length, 4), marks.scale.unit),
    },
    exitPlane: acrossAt(e, Math.max(0.75 * scalePts, 8)),
    cellEnds: marks.cellEnds
      .map((p) => ({ p, s: along(p) }))
      .sort((a, b) => a.s - b.s)
      .map(({ p }, i) => ({ number: i + 1, at: at(p), tick: acrossAt(p, Math.max(0.3 * scalePts, 4)) })),
    machDisk: marks.machDisk ? acrossAt(marks.machDisk, Math.max(0.35 * scalePts, 5)) : null,
  }
}

function dist(a: Point, b: Point): number {
  return Math.hypot(b.x - a.x, b.y - a.y)
}

function unit(a: Point, b: Point): Point | null {
  const d = dist(a, b)
  return d > 0 ? { x: (b.x - a.x) / d, y: (b.y - a.y) / d } : null
}

function stroke(doc: Doc, segments: Segment[], colour: string, width = 1.1): void {
  // The halo first, then the line over it.
  for (const [w, c, opacity] of [
    [width + 1.6, HALO, 0.8],
    [width, colour, 1],
  ] as const) {
    doc.save()
    for (const [a, b] of segments) doc.moveTo(a.x, a.y).lineTo(b.x, b.y)
    doc.lineWidth(w).lineCap('round').strokeOpacity(opacity).strokeColor(c).stroke()
    doc.restore()
  }
}

/** A short label on a pale patch, kept inside the picture's box. */
function tag(doc: Doc, text: string, role: FontRole, x: number, y: number, colour: string, box: Box): void {
  const size = 7
  const tw = widthOf(doc, role, size, text)
  const px = Math.min(Math.max(x, box.x + 1), box.x + box.w - tw - 3)
  const py = Math.min(Math.max(y, box.y + 1), box.y + box.h - 10)
  doc.save()
  doc
    .rect(px - 1.5, py - 1, tw + 3, 9.5)
    .fillOpacity(0.85)
    .fillColor(HALO)
    .fill()
  doc.restore()
  doc.fillColor(colour)
  put(doc, role, size, text, px, py, { lineBreak: false })
  doc.fillColor(TEXT)
}

interface Box {
  x: number
  y: number
  w: number
  h: number
}

function drawMarks(doc: Doc, img: ReportImage, box: Box): void {
  const shapes = markShapes(img.marks, box.w / img.width, { x: box.x, y: box.y })
  doc.save()
  doc.rect(box.x, box.y, box.w, box.h).clip()
  stroke(doc, [shapes.exitPlane], MARK_COLOUR.exitPlane)
  stroke(doc, [shapes.scale.line, ...shapes.scale.ticks], MARK_COLOUR.scale, 1.2)
  stroke(
    doc,
    shapes.cellEnds.map((c) => c.tick),
    MARK_COLOUR.cellEnd,
  )
  if (shapes.machDisk) stroke(doc, [shapes.machDisk], MARK_COLOUR.machDisk, 1.5)
  doc.restore()

  const [from, to] = shapes.scale.line
  const right = Math.max(from.x, to.x)
  tag(doc, shapes.scale.label, 'mono', right + 4, (from.y + to.y) / 2 - 4, MARK_COLOUR.scale, box)
  for (const c of shapes.cellEnds) {
    const [, end] = c.tick
    tag(doc, String(c.number), 'mono', end.x - 3, end.y + 2, MARK_COLOUR.cellEnd, box)
  }
  if (shapes.machDisk) {
    const [top] = shapes.machDisk
    tag(doc, 'Mach disk', 'sans-semibold', top.x - 18, top.y - 11, MARK_COLOUR.machDisk, box)
  }
}

// ---------------------------------------------------------------------------------------------
// The numbers.

/**
 * "15 mm (1.5 D)": a length in mm and in scale lengths, or a word when there is none. Three
 * significant figures: a mark on a photograph is good to a pixel or so, a few tenths of a millimetre.
 */
function lengthText(metres: number | null, scaleLength: number, missing: string): string {
  if (metres === null || !Number.isFinite(metres)) return missing
  return `${withUnit(formatCompact(metres * 1e3, 3), 'mm')} (${formatCompact(metres / scaleLength, 3)} D)`
}

function ratioText(measured: number, expected: number | null): string {
  if (expected === null || !Number.isFinite(measured) || !(expected > 0)) return '—'
  return formatCompact(measured / expected, 3)
}

interface TableColumn {
  title: string
  /** Share of the table's width. */
  share: number
  role: FontRole
  align: 'left' | 'right'
}

function table(doc: Doc, cols: TableColumn[], rows: string[][]): void {
  const x0 = doc.page.margins.left
  const w = contentWidth(doc)
  const padX = 4
  const padY = 3.5
  const widths = cols.map((c) => c.share * w)
  const header = () => {
    const y = doc.y
    doc.rect(x0, y, w, 16).fillColor(INK).fill()
    doc.fillColor('#ffffff')
    let x = x0
    cols.forEach((c, k) => {
      put(doc, 'sans-semibold', 8.5, c.title, x + padX, y + 4, {
        width: widths[k]! - 2 * padX,
        align: c.align,
        lineBreak: false,
      })
      x += widths[k]!
    })
    doc.fillColor(TEXT)
    doc.y = y + 16
  }
  ensure(doc, 16 + 20)
  header()
  rows.forEach((row, i) => {
    const h =
      Math.max(
        ...cols.map((c, k) => heightOf(doc, c.role, c.role === 'mono' ? 8 : 9, row[k]!, widths[k]! - 2 * padX)),
      ) +
      2 * padY
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
      doc.fillColor(TEXT)
      put(doc, c.role, c.role === 'mono' ? 8 : 9, row[k]!, x + padX, y + padY + (c.role === 'mono' ? 1 : 0), {
        width: widths[k]! - 2 * padX,
        align: c.align,
      })
      x += widths[k]!
    })
    doc.y = y + h
  })
  doc.x = x0
  doc.y += 6
}

function measuredTables(doc: Doc, img: ReportImage, m: JetMeasurement): void {
  const D = m.scaleLength
  const pixels = m.scaleLength / m.metresPerPixel
  paragraph(
    doc,
    'serif',
    9,
    `Scale: ${withUnit(formatCompact(img.marks.scale.length, 4), img.marks.scale.unit)} over ${formatCompact(pixels, 4)} pixels (${formatCompact(m.metresPerPixel * 1e3, 3)} mm per pixel). D is a distance divided by the scale's length, the exit diameter unless another length was set.`,
    MUTED,
  )
  doc.y += 4
  if (m.cellEndDistances.length > 0) {
    table(
      doc,
      [
        { title: 'Cell end', share: 0.2, role: 'mono', align: 'left' },
        { title: 'From the exit plane', share: 0.4, role: 'mono', align: 'right' },
        { title: 'Length of the cell', share: 0.4, role: 'mono', align: 'right' },
      ],
      m.cellEndDistances.map((d, i) => [String(i + 1), lengthText(d, D, '—'), lengthText(m.cellSpacings[i]!, D, '—')]),
    )
  }
  const rows: string[][] = [
    [
      'Mean cell spacing',
      lengthText(m.meanCellSpacing, D, 'no cell ends'),
      lengthText(img.expected.cellSpacing, D, 'not shown'),
      ratioText(m.meanCellSpacing, img.expected.cellSpacing),
    ],
  ]
  if (img.marks.machDisk || img.expected.machDisk !== null) {
    rows.push([
      'Exit plane to the Mach disk',
      lengthText(m.machDiskDistance, D, 'not marked'),
      lengthText(img.expected.machDisk, D, 'not shown'),
      ratioText(m.machDiskDistance, img.expected.machDisk),
    ])
  }
  table(
    doc,
    [
      { title: 'Distance', share: 0.28, role: 'sans-semibold', align: 'left' },
      { title: 'Measured', share: 0.26, role: 'mono', align: 'right' },
      { title: 'Expected', share: 0.26, role: 'mono', align: 'right' },
      { title: 'Measured ÷ expected', share: 0.2, role: 'mono', align: 'right' },
    ],
    rows,
  )
}

/** One photograph: its label, the picture with the marks, and the distances. */
/** The picture's drawn height, pt: the page's width, or less for a tall picture. */
function pictureHeight(doc: Doc, img: ReportImage): number {
  return Math.min((contentWidth(doc) * img.height) / img.width, MAX_PICTURE_HEIGHT)
}

function photograph(doc: Doc, img: ReportImage): void {
  const w = contentWidth(doc)
  const h = pictureHeight(doc, img)
  const drawW = (h * img.width) / img.height
  ensure(doc, h + 40)
  doc.fillColor(INK)
  put(doc, 'sans-semibold', 10.5, img.label, doc.page.margins.left, doc.y, { width: w })
  doc.fillColor(TEXT)
  doc.y += 4
  const box = { x: doc.page.margins.left + (w - drawW) / 2, y: doc.y, w: drawW, h }
  doc.image(img.bytes, box.x, box.y, { width: box.w, height: box.h })
  doc.rect(box.x, box.y, box.w, box.h).lineWidth(0.5).strokeColor(RULE).stroke()
  drawMarks(doc, img, box)
  doc.y = box.y + h + 5
  doc.x = doc.page.margins.left
  paragraph(
    doc,
    'sans',
    8,
    'Marks: scale (orange, with its known length), exit plane (blue, across the jet), cell ends (green, numbered from the exit), Mach disk (red).',
    MUTED,
  )
  doc.y += 4
  let m: JetMeasurement
  try {
    m = measureJet(img.marks)
  } catch (err) {
    paragraph(doc, 'serif', 9.5, `These marks cannot be measured: ${(err as Error).message}.`)
    return
  }
  measuredTables(doc, img, m)
}

/** The section: its heading, kept on one page with the first picture, then every photograph in turn. */
export function photoSection(doc: Doc, images: readonly ReportImage[]): void {
  if (images.length === 0) return
  const one = images.length === 1
  heading(doc, one ? 'Your photograph, measured' : 'Your photographs, measured', pictureHeight(doc, images[0]!) + 80)
  paragraph(
    doc,
    'serif',
    9.5,
    `Your ${one ? 'photograph' : 'photographs'} with the marks you handed in, and the distances they measure beside the ones the theory gives for your run.`,
    MUTED,
  )
  doc.y += 6
  images.forEach((img, i) => {
    if (i > 0) doc.y += 10
    photograph(doc, img)
  })
}

/**
 * The marks on one photograph while the student places them: what is placed so far, which mark is
 * selected, and the earlier drafts for undo. Plain functions over plain objects (each returns a new
 * state), so the measuring tool's rules are tested without a browser; PhotoMeasure.vue only turns
 * pointer and key events into these calls.
 *
 * Coordinates are the picture's own pixels (origin top-left, x right, y down), as JetMarks keeps
 * them; every placed or moved mark is kept inside the picture.
 */
import { checkMarks, JetMarksSchema, MAX_CELL_ENDS, measureJet } from '@shared/images/jet-marks'
import type { JetMarks, MarkProblem, MarkRules, Point } from '@shared/images/jet-marks'
import { parseDecimal } from '@shared/grading/decimal'

/** What a click (or Enter at the cross-hair) places. */
export type MarkMode = 'scale' | 'exit-plane' | 'cell-end' | 'mach-disk'

export const MODE_WORDS: Record<MarkMode, string> = {
  scale: 'Scale',
  'exit-plane': 'Exit plane',
  'cell-end': 'Cell end',
  'mach-disk': 'Mach disk',
}

/** One placed mark: the two scale points, the exit plane, a cell end (0-based) or the Mach disk. */
export type MarkId =
  { kind: 'scale'; end: 0 | 1 } | { kind: 'exit-plane' } | { kind: 'cell-end'; index: number } | { kind: 'mach-disk' }

export interface MarkDraft {
  scale: [Point | null, Point | null]
  exitPlane: Point | null
  cellEnds: Point[]
  machDisk: Point | null
}

export interface MarkEditor {
  draft: MarkDraft
  selected: MarkId | null
  /** Earlier drafts, oldest first; undo takes the last. */
  history: MarkDraft[]
}

export interface ImageSize {
  width: number
  height: number
}

/** Most undo steps kept (a long nudging session should not hold every pixel step forever). */
export const MAX_HISTORY = 200

export function emptyDraft(): MarkDraft {
  return { scale: [null, null], exitPlane: null, cellEnds: [], machDisk: null }
}

export function newEditor(draft: MarkDraft = emptyDraft()): MarkEditor {
  return { draft, selected: null, history: [] }
}

/** Stored marks as a draft (the read-only view, and a form that starts from earlier marks). */
export function draftFromMarks(marks: JetMarks): MarkDraft {
  return {
    scale: [{ ...marks.scale.from }, { ...marks.scale.to }],
    exitPlane: { ...marks.exitPlane },
    cellEnds: marks.cellEnds.map((p) => ({ ...p })),
    machDisk: marks.machDisk ? { ...marks.machDisk } : null,
  }
}

function copyDraft(d: MarkDraft): MarkDraft {
  return {
    scale: [d.scale[0] && { ...d.scale[0] }, d.scale[1] && { ...d.scale[1] }],
    exitPlane: d.exitPlane && { ...d.exitPlane },
    cellEnds: d.cellEnds.map((p) => ({ ...p })),
    machDisk: d.machDisk && { ...d.machDisk },
  }
}

/** A point kept inside the picture (edges included), to a tenth of a pixel. */
export function clampPoint(p: Point, image: ImageSize): Point {
  const tenth = (v: number) => Math.round(v * 10) / 10
  return {
    x: tenth(Math.min(Math.max(p.x, 0), image.width)),
    y: tenth(Math.min(Math.max(p.y, 0), image.height)),
  }
}

export function sameMark(a: MarkId | null, b: MarkId | null): boolean {
  if (!a || !b || a.kind !== b.kind) return false
  if (a.kind === 'scale' && b.kind === 'scale') return a.end === b.end
  if (a.kind === 'cell-end' && b.kind === 'cell-end') return a.index === b.index
  return true
}

/** Where a mark is, or null when it is not placed. */
export function pointOf(d: MarkDraft, id: MarkId): Point | null {
  switch (id.kind) {
    case 'scale':
      return d.scale[id.end]
    case 'exit-plane':
      return d.exitPlane
    case 'cell-end':
      return d.cellEnds[id.index] ?? null
    case 'mach-disk':
      return d.machDisk
  }
}

function withPoint(d: MarkDraft, id: MarkId, p: Point): MarkDraft {
  const next = copyDraft(d)
  switch (id.kind) {
    case 'scale':
      next.scale[id.end] = p
      break
    case 'exit-plane':
      next.exitPlane = p
      break
    case 'cell-end':
      next.cellEnds[id.index] = p
      break
    case 'mach-disk':
      next.machDisk = p
      break
  }
  return next
}

/** Every placed mark, in the order the marks list shows them. */
export function placedMarks(d: MarkDraft): { id: MarkId; point: Point }[] {
  const out: { id: MarkId; point: Point }[] = []
  d.scale.forEach((p, end) => {
    if (p) out.push({ id: { kind: 'scale', end: end as 0 | 1 }, point: p })
  })
  if (d.exitPlane) out.push({ id: { kind: 'exit-plane' }, point: d.exitPlane })
  d.cellEnds.forEach((p, index) => out.push({ id: { kind: 'cell-end', index }, point: p }))
  if (d.machDisk) out.push({ id: { kind: 'mach-disk' }, point: d.machDisk })
  return out
}

/** A mark's name in words: "Scale point 1", "Exit plane", "Cell end 3", "Mach disk". */
export function markName(id: MarkId): string {
  switch (id.kind) {
    case 'scale':
      return `Scale point ${id.end + 1}`
    case 'exit-plane':
      return 'Exit plane'
    case 'cell-end':
      return `Cell end ${id.index + 1}`
    case 'mach-disk':
      return 'Mach disk'
  }
}

/** A stable key for a mark (list keys, test hooks). */
export function markKey(id: MarkId): string {
  if (id.kind === 'scale') return `scale-${id.end + 1}`
  if (id.kind === 'cell-end') return `cell-end-${id.index + 1}`
  return id.kind
}

function remember(e: MarkEditor): MarkDraft[] {
  return [...e.history, e.draft].slice(-MAX_HISTORY)
}

/** Why a mark cannot be placed in this mode, or null. */
export function cannotPlace(e: MarkEditor, mode: MarkMode, rules?: MarkRules): string | null {
  if (mode === 'cell-end') {
    const most = Math.min(rules?.cells.max ?? MAX_CELL_ENDS, MAX_CELL_ENDS)
    if (e.draft.cellEnds.length >= most) return `This photograph takes at most ${most} cell ends.`
  }
  if (mode === 'mach-disk' && rules?.machDisk === 'none') return 'This photograph takes no Mach-disk mark.'
  return null
}

/**
 * Places a mark in the current mode at `p` (kept inside the picture): the scale's first point, then
 * its second (a third click starts the scale again), the exit plane and the Mach disk (replacing an
 * earlier one), or one more cell end. The new mark becomes the selected one when `select` is true.
 * Returns the editor unchanged (placed: null) when the mode takes no more marks.
 */
export function placeMark(
  e: MarkEditor,
  mode: MarkMode,
  p: Point,
  image: ImageSize,
  options: { rules?: MarkRules; select?: boolean } = {},
): { editor: MarkEditor; placed: MarkId | null } {
  if (cannotPlace(e, mode, options.rules)) return { editor: e, placed: null }
  const at = clampPoint(p, image)
  let id: MarkId
  let draft: MarkDraft
  if (mode === 'scale') {
    const [a, b] = e.draft.scale
    if (a && !b) {
      id = { kind: 'scale', end: 1 }
      draft = withPoint(e.draft, id, at)
    } else {
      id = { kind: 'scale', end: 0 }
      draft = { ...copyDraft(e.draft), scale: [at, null] }
    }
  } else if (mode === 'cell-end') {
    id = { kind: 'cell-end', index: e.draft.cellEnds.length }
    draft = { ...copyDraft(e.draft), cellEnds: [...e.draft.cellEnds.map((c) => ({ ...c })), at] }
  } else {
    id = mode === 'exit-plane' ? { kind: 'exit-plane' } : { kind: 'mach-disk' }
    draft = withPoint(e.draft, id, at)
  }
  return {
    editor: { draft, selected: options.select === false ? null : id, history: remember(e) },
    placed: id,
  }
}

/**
 * Moves a placed mark to `p` (kept inside the picture). A drag records one undo step at its start
 * (`record: true` on the first move, false after), a nudge one per key press.
 */
export function moveMark(
  e: MarkEditor,
  id: MarkId,
  p: Point,
  image: ImageSize,
  options: { record?: boolean } = {},
): MarkEditor {
  if (!pointOf(e.draft, id)) return e
  const draft = withPoint(e.draft, id, clampPoint(p, image))
  return { draft, selected: id, history: options.record === false ? e.history : remember(e) }
}

/** How far one arrow key moves a mark or the cross-hair: 1 image pixel, 10 with Shift. */
export function nudgeStep(shift: boolean): number {
  return shift ? 10 : 1
}

/** The arrow keys' directions. */
export const ARROWS: Record<string, [number, number]> = {
  ArrowLeft: [-1, 0],
  ArrowRight: [1, 0],
  ArrowUp: [0, -1],
  ArrowDown: [0, 1],
}

/** Moves the selected mark by (dx, dy) image pixels; nothing selected leaves the editor as it is. */
export function nudgeSelected(e: MarkEditor, dx: number, dy: number, image: ImageSize): MarkEditor {
  const id = e.selected
  const at = id && pointOf(e.draft, id)
  if (!id || !at) return e
  return moveMark(e, id, { x: at.x + dx, y: at.y + dy }, image)
}

/** The cross-hair moved by (dx, dy), kept inside the picture. */
export function moveCursor(p: Point, dx: number, dy: number, image: ImageSize): Point {
  return clampPoint({ x: p.x + dx, y: p.y + dy }, image)
}

/** Removes the selected mark (later cell ends move up one number); nothing selected changes nothing. */
export function deleteSelected(e: MarkEditor): { editor: MarkEditor; removed: MarkId | null } {
  const id = e.selected
  if (!id || !pointOf(e.draft, id)) return { editor: e, removed: null }
  const draft = copyDraft(e.draft)
  if (id.kind === 'scale') draft.scale[id.end] = null
  else if (id.kind === 'exit-plane') draft.exitPlane = null
  else if (id.kind === 'mach-disk') draft.machDisk = null
  else draft.cellEnds.splice(id.index, 1)
  return { editor: { draft, selected: null, history: remember(e) }, removed: id }
}

/** Selects a placed mark (null lets go). */
export function selectMark(e: MarkEditor, id: MarkId | null): MarkEditor {
  return { ...e, selected: id && pointOf(e.draft, id) ? id : null }
}

/** Back to the draft before the last change; the selection is kept when that mark still exists. */
export function undo(e: MarkEditor): MarkEditor {
  const draft = e.history[e.history.length - 1]
  if (!draft) return e
  const selected = e.selected && pointOf(draft, e.selected) ? e.selected : null
  return { draft, selected, history: e.history.slice(0, -1) }
}

/**
 * The mode to offer after a mark was placed: on to the exit plane once both scale points are in,
 * on to the cell ends once the exit plane is; otherwise the same mode.
 */
export function nextMode(d: MarkDraft, mode: MarkMode): MarkMode {
  if (mode === 'scale' && d.scale[0] && d.scale[1]) return d.exitPlane ? 'cell-end' : 'exit-plane'
  if (mode === 'exit-plane' && d.exitPlane) return 'cell-end'
  return mode
}

/** The scale's known length as typed (a number in a length unit). */
export interface ScaleLength {
  value: number
  unit: string
}

/**
 * The scale length the marks use: what the student typed (read as the hand-in reads numbers), or, when the
 * box is blank, the default (the sheet's typed exit diameter); null when there is neither.
 */
export function typedScale(text: string, unit: string, fallback: ScaleLength | null): ScaleLength | null {
  if (text.trim() === '') return fallback
  return { value: parseDecimal(text.trim()), unit }
}

/**
 * The draft as JetMarks when every mark the sheet asks for is placed, with each missing mark and
 * each problem of checkMarks (shared/images/jet-marks.ts) in words naming the mark. `marks` is there
 * as soon as the draft can be measured (scale, exit plane and a scale length), even with problems
 * left, so the readout can show what is placed.
 */
export function draftMarks(
  d: MarkDraft,
  scale: ScaleLength | null,
  image: ImageSize,
  rules: MarkRules,
): { marks: JetMarks | null; problems: MarkProblem[] } {
  const problems: MarkProblem[] = []
  const [from, to] = d.scale
  if (!from)
    problems.push({ mark: 'scale', message: 'place the two scale points (for example across the nozzle exit)' })
  else if (!to) problems.push({ mark: 'scale', message: 'place the second scale point' })
  if (!scale || !Number.isFinite(scale.value) || scale.value <= 0) {
    problems.push({ mark: 'scale', message: 'type the known length between the scale points (a number above 0)' })
  }
  if (!d.exitPlane)
    problems.push({ mark: 'exit-plane', message: 'mark the exit plane (the nozzle’s exit, on the axis)' })
  if (!from || !to || !d.exitPlane || !scale || !(scale.value > 0) || !Number.isFinite(scale.value)) {
    // What is missing, plus what the sheet asks for that cannot wait for the scale.
    const partial = checkMarks(
      {
        scale: { from: { x: 0, y: 0 }, to: { x: image.width, y: image.height }, length: 1, unit: 'mm' },
        exitPlane: d.exitPlane ?? { x: 0, y: 0 },
        cellEnds: d.cellEnds,
        ...(d.machDisk ? { machDisk: d.machDisk } : {}),
      },
      image,
      rules,
    ).filter((p) => p.mark === 'cell-end' || p.mark === 'mach-disk')
    return { marks: null, problems: [...problems, ...partial] }
  }
  // The schema the server reads the marks with: it also refuses a unit that is not a length.
  const parsed = JetMarksSchema.safeParse({
    scale: { from, to, length: scale.value, unit: scale.unit },
    exitPlane: d.exitPlane,
    cellEnds: d.cellEnds,
    ...(d.machDisk ? { machDisk: d.machDisk } : {}),
  })
  if (!parsed.success) {
    return { marks: null, problems: parsed.error.issues.map((i) => ({ mark: 'scale', message: i.message })) }
  }
  return { marks: parsed.data, problems: checkMarks(parsed.data, image, rules) }
}

/** A problem in a sentence for the form: "Scale: place the second scale point." */
export function problemText(p: MarkProblem): string {
  const what: Record<MarkProblem['mark'], string> = {
    scale: 'Scale',
    'exit-plane': 'Exit plane',
    'cell-end': 'Cell ends',
    'mach-disk': 'Mach disk',
  }
  return `${what[p.mark]}: ${p.message}${/[.!?]$/.test(p.message) ? '' : '.'}`
}

/** One line of the readout: a distance in mm and in exit diameters. */
export interface ReadoutRow {
  key: string
  label: string
  /** m */
  metres: number
  /** The distance over the exit diameter. */
  diameters: number
}

export interface Readout {
  /** The scale: its known length (m), its pixels, and mm per pixel. */
  scaleLength: number
  scalePixels: number
  /** The length distances are divided by (m): the exit diameter, by default the scale length. */
  exitDiameter: number
  cellEnds: ReadoutRow[]
  cells: ReadoutRow[]
  meanSpacing: ReadoutRow | null
  machDisk: ReadoutRow | null
}

/**
 * The distances the marks measure (measureJet), each in metres and in exit diameters. The exit
 * diameter is `exitDiameter` (m) when given (the sheet's typed exit diameter), else the scale's length.
 */
export function readout(marks: JetMarks, exitDiameter?: number): Readout {
  const m = measureJet(marks)
  const d =
    exitDiameter !== undefined && exitDiameter > 0 && Number.isFinite(exitDiameter) ? exitDiameter : m.scaleLength
  const row = (key: string, label: string, metres: number): ReadoutRow => ({
    key,
    label,
    metres,
    diameters: metres / d,
  })
  return {
    scaleLength: m.scaleLength,
    scalePixels: m.scaleLength / m.metresPerPixel,
    exitDiameter: d,
    cellEnds: m.cellEndDistances.map((v, i) => row(`end-${i + 1}`, `Cell end ${i + 1} from the exit plane`, v)),
    cells: m.cellSpacings.map((v, i) => row(`cell-${i + 1}`, `Cell ${i + 1} length`, v)),
    meanSpacing: m.cellSpacings.length ? row('mean', 'Mean cell spacing', m.meanCellSpacing) : null,
    machDisk: marks.machDisk ? row('mach-disk', 'Mach disk from the exit plane', m.machDiskDistance) : null,
  }
}

/**
 * How far one mark lies from the exit plane along the jet (m), measured as measureJet measures the
 * whole set (the axis runs from the exit plane to the farthest mark); null when it cannot be measured.
 */
export function markDistance(marks: JetMarks, p: Point): number | null {
  const all = [...marks.cellEnds, ...(marks.machDisk ? [marks.machDisk] : []), p]
  const far = all.reduce((best, q) =>
    Math.hypot(q.x - marks.exitPlane.x, q.y - marks.exitPlane.y) >
    Math.hypot(best.x - marks.exitPlane.x, best.y - marks.exitPlane.y)
      ? q
      : best,
  )
  try {
    // With the farthest mark as the Mach disk the axis is the same as for the whole set.
    return measureJet({ ...marks, cellEnds: [p], machDisk: far }).cellEndDistances[0] ?? null
  } catch {
    return null
  }
}

/** A length in mm for the readout and the announcements: "12.3 mm". */
export function mmText(metres: number): string {
  const mm = metres * 1000
  const digits = Math.abs(mm) >= 100 ? 0 : Math.abs(mm) >= 10 ? 1 : 2
  return `${mm.toFixed(digits)} mm`
}

/** A length in exit diameters: "1.54 D". */
export function diametersText(d: number): string {
  return `${d.toFixed(2)} D`
}

/**
 * What a screen reader hears after a mark was placed or moved: the mark, what happened and, once
 * the marks can be measured, its distance from the exit plane ("Cell end 2 placed at 12.3 mm from
 * the exit plane"); else where it is in pixels.
 */
export function describeMark(
  d: MarkDraft,
  id: MarkId,
  verb: 'placed' | 'moved',
  scale: ScaleLength | null,
  image: ImageSize,
): string {
  const p = pointOf(d, id)
  if (!p) return `${markName(id)} removed`
  const at = `${verb === 'placed' ? 'at' : 'to'} ${Math.round(p.x)}, ${Math.round(p.y)} pixels`
  if (id.kind === 'cell-end' || id.kind === 'mach-disk') {
    const { marks } = draftMarks(d, scale, image, { cells: { min: 0, max: MAX_CELL_ENDS }, machDisk: 'optional' })
    const distance = marks && markDistance(marks, p)
    if (distance !== null && distance !== undefined && Number.isFinite(distance)) {
      return `${markName(id)} ${verb === 'placed' ? 'placed at' : 'moved to'} ${mmText(distance)} from the exit plane`
    }
  }
  if (id.kind === 'scale' && id.end === 1 && d.scale[0]) {
    const px = Math.hypot(p.x - d.scale[0].x, p.y - d.scale[0].y)
    return `${markName(id)} ${verb} ${at}; the scale spans ${px.toFixed(1)} pixels`
  }
  return `${markName(id)} ${verb} ${at}`
}

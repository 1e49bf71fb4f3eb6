/**
 * Marks on a photograph of a jet (schlieren or shadowgraph) and the distances they measure.
 *
 * The student sets the scale with two points a known distance apart (by default the nozzle's exit
 * diameter), marks the exit plane, the ends of successive shock cells along the jet axis and, when
 * one is seen, the Mach disk. Marks are kept as image coordinates (pixels, origin at the top-left
 * corner, x to the right, y down; fractions allowed) together with the scale, so staff see exactly
 * what was marked and the distances can be measured again the same way anywhere.
 *
 * Distances run along the jet axis: the line from the exit plane to the farthest mark. A mark a few
 * pixels off the axis (a slip of the hand, or a curved cell boundary) then counts by where it lies
 * along the jet, not by how far it strays sideways.
 */
import { z } from 'zod'
import { UNITS, toSI, unitKind, type UnitSymbol } from '../units'

/** Most shock-cell ends one photograph may carry. */
export const MAX_CELL_ENDS = 20

/** Photographs larger than this many pixels are refused before decoding (a hostile image stays small). */
export const MAX_IMAGE_PIXELS = 40_000_000

const coordinate = (name: string) =>
  z.number({ error: `${name} must be a number of pixels` }).refine(Number.isFinite, `${name} must be a finite number`)

export const PointSchema = z.strictObject({ x: coordinate('x'), y: coordinate('y') })
export type Point = z.output<typeof PointSchema>

const LENGTH_UNITS = (Object.keys(UNITS) as UnitSymbol[]).filter((u) => unitKind(u) === 'length')

export const ScaleSchema = z.strictObject({
  from: PointSchema,
  to: PointSchema,
  /** The known distance between the two points, in `unit`. */
  length: z
    .number({ error: 'the scale length must be a number' })
    .refine((v) => Number.isFinite(v) && v > 0, 'the scale length must be a number greater than 0'),
  unit: z.enum(LENGTH_UNITS as [UnitSymbol, ...UnitSymbol[]], {
    error: `the scale unit must be a length: ${LENGTH_UNITS.join(', ')}`,
  }),
})
export type Scale = z.output<typeof ScaleSchema>

export const JetMarksSchema = z.strictObject({
  scale: ScaleSchema,
  exitPlane: PointSchema,
  cellEnds: z.array(PointSchema).max(MAX_CELL_ENDS, `at most ${MAX_CELL_ENDS} cell ends`).default([]),
  machDisk: PointSchema.optional(),
})
export type JetMarks = z.output<typeof JetMarksSchema>

/** What a photograph's marks must hold, from the lab sheet's `images:` entry. */
export interface MarkRules {
  /** Fewest and most cell ends. */
  cells: { min: number; max: number }
  /** Whether the Mach disk must, may or must not be marked. */
  machDisk: 'required' | 'optional' | 'none'
}

/** A problem with the marks, in words for the student, with the mark it concerns. */
export interface MarkProblem {
  mark: 'scale' | 'exit-plane' | 'cell-end' | 'mach-disk'
  /** 1-based position among the cell ends, for 'cell-end'. */
  index?: number
  message: string
}

/**
 * Checks marks against the image size and the sheet's rules: every mark inside the image, a scale
 * of non-zero length on the image, the number of cell ends, and the Mach disk as the sheet asks.
 * An empty list means the marks can be measured.
 */
export function checkMarks(marks: JetMarks, image: { width: number; height: number }, rules: MarkRules): MarkProblem[] {
  const problems: MarkProblem[] = []
  const inside = (p: Point) => p.x >= 0 && p.y >= 0 && p.x <= image.width && p.y <= image.height
  const where = (p: Point) => `(${round(p.x)}, ${round(p.y)})`
  const size = `${image.width} × ${image.height} pixels`
  for (const [end, p] of [
    ['first', marks.scale.from],
    ['second', marks.scale.to],
  ] as const) {
    if (!inside(p))
      problems.push({ mark: 'scale', message: `the ${end} scale point ${where(p)} is outside the image (${size})` })
  }
  if (pixelDistance(marks.scale.from, marks.scale.to) < 1) {
    problems.push({
      mark: 'scale',
      message:
        'the two scale points are on the same spot: place them the known distance apart (for example across the nozzle exit)',
    })
  }
  if (!inside(marks.exitPlane)) {
    problems.push({
      mark: 'exit-plane',
      message: `the exit plane ${where(marks.exitPlane)} is outside the image (${size})`,
    })
  }
  marks.cellEnds.forEach((p, i) => {
    if (!inside(p)) {
      problems.push({
        mark: 'cell-end',
        index: i + 1,
        message: `cell end ${i + 1} ${where(p)} is outside the image (${size})`,
      })
    }
  })
  const n = marks.cellEnds.length
  if (n < rules.cells.min) {
    problems.push({
      mark: 'cell-end',
      message: `mark at least ${rules.cells.min} cell end${rules.cells.min === 1 ? '' : 's'} (${n} marked)`,
    })
  }
  if (n > rules.cells.max) {
    problems.push({ mark: 'cell-end', message: `mark at most ${rules.cells.max} cell ends (${n} marked)` })
  }
  if (marks.machDisk && !inside(marks.machDisk)) {
    problems.push({
      mark: 'mach-disk',
      message: `the Mach disk ${where(marks.machDisk)} is outside the image (${size})`,
    })
  }
  if (rules.machDisk === 'required' && !marks.machDisk) {
    problems.push({
      mark: 'mach-disk',
      message: 'mark the Mach disk (the flat shock across the jet in the first cell)',
    })
  }
  if (rules.machDisk === 'none' && marks.machDisk) {
    problems.push({ mark: 'mach-disk', message: 'this photograph takes no Mach-disk mark; remove it' })
  }
  return problems
}

/** Distances the marks measure, in metres and in units of the scale's own length. */
export interface JetMeasurement {
  /** Metres per pixel, from the scale. */
  metresPerPixel: number
  /** The scale's known length, m (the exit diameter by default). */
  scaleLength: number
  /** Distance of each cell end from the exit plane along the axis, m, nearest first. */
  cellEndDistances: number[]
  /** Length of each cell (exit plane to the first end, then end to end), m. */
  cellSpacings: number[]
  /** Mean of the cell spacings, m; NaN without cell ends. */
  meanCellSpacing: number
  /** Exit plane to the Mach disk along the axis, m; NaN when it is not marked. */
  machDiskDistance: number
}

/**
 * Measures the marks: the scale gives metres per pixel; each mark's distance is its projection on
 * the jet axis (from the exit plane towards the farthest mark). Marks must have passed
 * {@link checkMarks}; a zero-length scale throws a RangeError.
 */
export function measureJet(marks: JetMarks): JetMeasurement {
  const pixels = pixelDistance(marks.scale.from, marks.scale.to)
  if (!(pixels > 0)) throw new RangeError('scale must span at least one pixel (its two points are on the same spot)')
  const scaleLength = toSI(marks.scale.length, marks.scale.unit)
  const metresPerPixel = scaleLength / pixels
  const far = [...marks.cellEnds, ...(marks.machDisk ? [marks.machDisk] : [])].reduce<Point | undefined>(
    (best, p) =>
      best === undefined || pixelDistance(marks.exitPlane, p) > pixelDistance(marks.exitPlane, best) ? p : best,
    undefined,
  )
  const along = (p: Point): number => {
    if (far === undefined) return 0
    const ax = far.x - marks.exitPlane.x
    const ay = far.y - marks.exitPlane.y
    const length = Math.hypot(ax, ay)
    if (length === 0) return 0
    return ((p.x - marks.exitPlane.x) * ax + (p.y - marks.exitPlane.y) * ay) / length
  }
  const cellEndDistances = marks.cellEnds.map((p) => along(p) * metresPerPixel).sort((a, b) => a - b)
  const cellSpacings = cellEndDistances.map((d, i) => d - (i === 0 ? 0 : cellEndDistances[i - 1]!))
  const meanCellSpacing =
    cellSpacings.length === 0 ? Number.NaN : cellSpacings.reduce((s, v) => s + v, 0) / cellSpacings.length
  return {
    metresPerPixel,
    scaleLength,
    cellEndDistances,
    cellSpacings,
    meanCellSpacing,
    machDiskDistance: marks.machDisk ? along(marks.machDisk) * metresPerPixel : Number.NaN,
  }
}

function pixelDistance(a: Point, b: Point): number {
  return Math.hypot(b.x - a.x, b.y - a.y)
}

function round(v: number): string {
  return String(Math.round(v * 10) / 10)
}

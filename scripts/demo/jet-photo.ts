/**
 * DEMO DATA — invented. A shadowgraph-like picture of a supersonic jet, drawn by our own code from
 * the model (the fully expanded jet and its shock-cell spacing from the formula library), for the
 * demo's photograph hand-ins. It is not a photograph of anything and not a flow simulation: the
 * jet's edge, the oblique shocks that make the diamonds of each cell, and a Mach disk are drawn as
 * the thin dark-and-bright line pairs a shadowgraph shows, then blurred and given sensor noise.
 *
 * The picture comes with where the marks belong (in pixels), so the demo can hand in marks the way
 * a careful student would place them, and tests can check the drawing against the model.
 */
import { gaussian, seeded } from './demo-runs'
import type { JetMarks, Point } from '../../shared/images/jet-marks'

export interface JetPhotoInput {
  /** Nozzle exit diameter, m. */
  exitDiameter: number
  /** Fully expanded jet diameter, m (the jet's width downstream of the exit). */
  jetDiameter: number
  /** Shock-cell spacing, m. */
  cellSpacing: number
  /** How many cells are drawn (they fade downstream). */
  cells: number
  /** Exit plane to the Mach disk, m; none when left out. */
  machDisk?: number
  /** Picture size, px. */
  width: number
  height: number
  /** Scale of the picture, px per metre. */
  pixelsPerMetre: number
  /** Seed of the noise. */
  seed: number
}

export interface JetPhoto {
  width: number
  height: number
  /** Grey levels, row by row, 0 black … 255 white. */
  pixels: Uint8Array
  /** Where the marks belong. */
  truth: {
    exitPlane: Point
    /** The two lips of the nozzle exit: the ends of the default scale (the exit diameter). */
    lips: [Point, Point]
    cellEnds: Point[]
    machDisk?: Point
  }
}

/** The marks a careful student would hand in for the picture, with the exit diameter as the scale. */
export function truthMarks(photo: JetPhoto, exitDiameterMm: number): JetMarks {
  return {
    scale: { from: photo.truth.lips[0], to: photo.truth.lips[1], length: exitDiameterMm, unit: 'mm' },
    exitPlane: photo.truth.exitPlane,
    cellEnds: photo.truth.cellEnds,
    ...(photo.truth.machDisk ? { machDisk: photo.truth.machDisk } : {}),
  }
}

const BACKGROUND = 168
/** Strength of a shock's shadow (grey levels) in the first cell; later cells fade. */
const SHOCK = 70
const EDGE = 40
const BLUR_SIGMA = 1.3
const NOISE_SIGMA = 5

/**
 * Draws the jet: a dark nozzle from the left edge to the exit plane, the jet's edges, in each cell
 * the oblique shocks from the edge to the axis and back (a diamond), a Mach disk across the axis in
 * the first cell when given, then a Gaussian blur and sensor noise.
 */
export function renderJetPhoto(input: JetPhotoInput): JetPhoto {
  const { width, height, pixelsPerMetre: k } = input
  const field = new Float64Array(width * height).fill(0)
  const axisY = height / 2
  const exitX = Math.round(width * 0.12)
  const exitR = (input.exitDiameter * k) / 2
  const jetR = (input.jetDiameter * k) / 2
  const cellPx = input.cellSpacing * k

  // A gentle vignette, as the light source falls off toward the picture's corners.
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const dx = (x - width / 2) / width
      const dy = (y - height / 2) / height
      field[y * width + x] = BACKGROUND - 40 * (dx * dx + dy * dy)
    }
  }
  // The nozzle: a dark body with walls a quarter of the exit radius thick.
  const wall = exitR * 0.5
  for (let y = 0; y < height; y++) {
    const r = Math.abs(y - axisY)
    for (let x = 0; x < exitX; x++) {
      if (r <= exitR + wall && r >= exitR - 0.5) field[y * width + x] = 30
      else if (r < exitR) field[y * width + x]! -= 25 // the flow inside, seen through the nozzle
    }
  }

  const line = (a: Point, b: Point, strength: number) => drawShadowLine(field, width, height, a, b, strength)
  const end = exitX + input.cells * cellPx
  // The edges of the jet: from the lip, widening to the jet's diameter within the first cell.
  const edgeAt = (x: number) => {
    const u = Math.min(1, (x - exitX) / (0.5 * cellPx))
    const breathe = 0.06 * jetR * Math.sin((Math.PI * (x - exitX)) / cellPx) ** 2
    return exitR + (jetR - exitR) * Math.sin((u * Math.PI) / 2) + breathe
  }
  for (let x = exitX; x < Math.min(end, width) - 1; x += 2) {
    const fade = 1 - (0.6 * (x - exitX)) / Math.max(1, end - exitX)
    for (const side of [-1, 1]) {
      line({ x, y: axisY + side * edgeAt(x) }, { x: x + 2, y: axisY + side * edgeAt(x + 2) }, EDGE * fade)
    }
  }
  const cellEnds: Point[] = []
  for (let c = 0; c < input.cells; c++) {
    const x0 = exitX + c * cellPx
    const x1 = x0 + cellPx
    const mid = (x0 + x1) / 2
    const fade = 0.85 ** c
    for (const side of [-1, 1]) {
      const r0 = c === 0 ? exitR : edgeAt(x0)
      // Incident shock from the edge to the axis, reflected back to the edge at the cell's end.
      line({ x: x0, y: axisY + side * r0 }, { x: mid, y: axisY + side * 0.08 * jetR }, SHOCK * fade)
      line({ x: mid, y: axisY + side * 0.08 * jetR }, { x: x1, y: axisY + side * edgeAt(x1) }, SHOCK * fade * 0.8)
    }
    cellEnds.push({ x: round1(x1), y: axisY })
  }
  let machDisk: Point | undefined
  if (input.machDisk !== undefined) {
    const x = exitX + input.machDisk * k
    const half = 0.35 * jetR
    line({ x, y: axisY - half }, { x, y: axisY + half }, SHOCK * 1.2)
    machDisk = { x: round1(x), y: axisY }
  }

  const blurred = gaussianBlur(field, width, height, BLUR_SIGMA)
  const noise = gaussian(seeded(input.seed))
  const pixels = new Uint8Array(width * height)
  for (let i = 0; i < pixels.length; i++) {
    pixels[i] = Math.max(0, Math.min(255, Math.round(blurred[i]! + NOISE_SIGMA * noise())))
  }
  return {
    width,
    height,
    pixels,
    truth: {
      exitPlane: { x: exitX, y: axisY },
      lips: [
        { x: exitX, y: round1(axisY - exitR) },
        { x: exitX, y: round1(axisY + exitR) },
      ],
      cellEnds,
      ...(machDisk ? { machDisk } : {}),
    },
  }
}

function round1(v: number): number {
  return Math.round(v * 10) / 10
}

/**
 * A shadowgraph's line: a dark core with a bright fringe beside it (light bent away from the shock
 * lands next to it), added to the field over the segment's neighbourhood.
 */
function drawShadowLine(field: Float64Array, width: number, height: number, a: Point, b: Point, strength: number) {
  const w = 1.1
  const x0 = Math.max(0, Math.floor(Math.min(a.x, b.x) - 5))
  const x1 = Math.min(width - 1, Math.ceil(Math.max(a.x, b.x) + 5))
  const y0 = Math.max(0, Math.floor(Math.min(a.y, b.y) - 5))
  const y1 = Math.min(height - 1, Math.ceil(Math.max(a.y, b.y) + 5))
  const dx = b.x - a.x
  const dy = b.y - a.y
  const len2 = dx * dx + dy * dy || 1
  const len = Math.sqrt(len2)
  for (let y = y0; y <= y1; y++) {
    for (let x = x0; x <= x1; x++) {
      const t = Math.max(0, Math.min(1, ((x - a.x) * dx + (y - a.y) * dy) / len2))
      const px = a.x + t * dx - x
      const py = a.y + t * dy - y
      const d = Math.sqrt(px * px + py * py)
      if (d > 5) continue
      // Signed side of the line, for the fringe on the downstream side.
      const side = (dx * (y - a.y) - dy * (x - a.x)) / len
      const dark = Math.exp(-(d * d) / (2 * w * w))
      const bright = side > 0 ? 0.6 * Math.exp(-((d - 2.2) ** 2) / (2 * w * w)) : 0
      field[y * width + x]! -= strength * (dark - bright)
    }
  }
}

/** Separable Gaussian blur with edges clamped. */
function gaussianBlur(src: Float64Array, width: number, height: number, sigma: number): Float64Array {
  const radius = Math.ceil(3 * sigma)
  const kernel: number[] = []
  let sum = 0
  for (let i = -radius; i <= radius; i++) {
    const v = Math.exp(-(i * i) / (2 * sigma * sigma))
    kernel.push(v)
    sum += v
  }
  for (let i = 0; i < kernel.length; i++) kernel[i]! /= sum
  const tmp = new Float64Array(src.length)
  const out = new Float64Array(src.length)
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      let acc = 0
      for (let i = -radius; i <= radius; i++) {
        const xx = Math.min(width - 1, Math.max(0, x + i))
        acc += kernel[i + radius]! * src[y * width + xx]!
      }
      tmp[y * width + x] = acc
    }
  }
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      let acc = 0
      for (let i = -radius; i <= radius; i++) {
        const yy = Math.min(height - 1, Math.max(0, y + i))
        acc += kernel[i + radius]! * tmp[yy * width + x]!
      }
      out[y * width + x] = acc
    }
  }
  return out
}

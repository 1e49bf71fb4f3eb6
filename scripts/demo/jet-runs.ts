/**
 * DEMO DATA — invented. Hand-ins of the demo sheet "Reading the jet" (content/04) for a few demo lab
 * groups: a run log of the chamber pressure during a blow-down through the stand's converging nozzle,
 * a shadowgraph-like picture of the jet drawn from the model at the moment the group's photograph was
 * taken (scripts/demo/jet-photo.ts), the marks the group placed on it, and the results it reports.
 *
 * The model: the stand's air receiver (scripts/demo/demo-runs.ts, DEMO_STAND) blows down through a
 * converging nozzle of 6 mm bore (a sonic exit); the chamber reads a fixed fraction of the receiver
 * pressure while the valve is open; the crew closes the valve once the chamber falls below about
 * 20 psi gauge (a common practice: the pattern fades below it). The logger writes time and chamber
 * pressure (gauge, kPa) at 20 Hz with noise. At the photograph's moment the jet is the fully expanded
 * jet of the formula library, its cells spaced by Pack's relation and its Mach disk placed by
 * Ashkenas and Sherman's fit, so a careful group's marks agree with the theory by construction.
 *
 * Marks are the picture's true marks moved by a hand's jitter (seeded, under a pixel), and the
 * results are worked out from the model with a small human error. One group sets the scale wrong on
 * purpose (see {@link DEMO_JET_WRONG_SCALE}).
 */
import sharp from 'sharp'
import { suggestMapping } from '../../shared/grading/csv'
import type { ColumnMapping } from '../../shared/grading/csv'
import { measureJet } from '../../shared/images/jet-marks'
import type { JetMarks, Point } from '../../shared/images/jet-marks'
import type { Assignment } from '../../shared/modules/schema'
import {
  fullyExpandedJet,
  machDiskDistance,
  shockCellSpacing,
  tankBlowdown,
  areaFromDiameter,
} from '../../shared/physics'
import { DEMO_STAND, contentAssignment, gaussian, linearAt, seeded, significant } from './demo-runs'
import { renderJetPhoto, truthMarks } from './jet-photo'

/** The demo groups that hand in a photograph of the jet. */
export const DEMO_JET_GROUPS: readonly string[] = ['A1', 'A2', 'A4', 'B1']

/**
 * The group that sets the scale wrong: on the hand-in form it put the scale's points on one lip and
 * on the axis (half the exit) while the known length stayed the full exit diameter, so every
 * distance its marks measure is twice the true one. Its reported spacing and ratio were read off its
 * own print with the right scale, so against the marks the measured-spacing and ratio checks fail,
 * and the sheet's scale rule ('check_the_scale') flags the hand-in for a teaching assistant.
 */
export const DEMO_JET_WRONG_SCALE = 'A4'

/** The stand's converging nozzle for this lab: a 6 mm bore, so the exit is the throat (demo data). */
export const JET_NOZZLE_DIAMETER = 0.006

/** Chamber pressure, gauge, below which the crew stops a run: about 20 psi (common practice, no source). */
export const STOP_GAUGE = 137.9e3

const SAMPLE_RATE = 20
const PRE_ROLL = 1
const POST_ROLL = 1
const PICTURE = { width: 720, height: 320, pixelsPerMetre: 8500, cells: 4 }

export interface DemoJetRun {
  group: string
  /** The run log: CSV text with the sheet's column keys as headers (t in s, p_chamber in kPa gauge). */
  csv: string
  mapping: ColumnMapping
  /** Measurements in the sheet's units (kPa, mm, s). */
  measurements: Record<string, number>
  /** The results the group reports, in each result's unit. */
  reported: Record<string, number>
  /** The photograph as the group uploads it, and its marks (in its pixels). */
  photo: { bytes: Buffer; contentType: 'image/png'; filename: string; marks: JetMarks }
}

/** The demo sheet's assignment, read from content/. */
export function jetAssignment(): Assignment {
  return contentAssignment('04-reading-the-jet.md')
}

/**
 * The demo jet hand-ins, one per group in {@link DEMO_JET_GROUPS}, always the same.
 */
export async function jetRuns(assignment: Assignment = jetAssignment()): Promise<DemoJetRun[]> {
  const table = assignment.tables[0]
  if (!table) throw new Error('the jet sheet has no table')
  const random = seeded(0x0e7a15)
  const noise = gaussian(random)
  const uniform = (lo: number, hi: number) => lo + (hi - lo) * random()
  const s = DEMO_STAND
  const area = areaFromDiameter(JET_NOZZLE_DIAMETER)
  const out: DemoJetRun[] = []

  for (const [i, group] of DEMO_JET_GROUPS.entries()) {
    const ambient = (1000 * Math.round(10 * uniform(83.4, 84.8))) / 10
    const charge = 1000 * Math.round(uniform(780, 820))
    const room = 273.15 + uniform(16, 22)
    const tank = tankBlowdown({
      volume: s.receiverVolume,
      initialPressure: charge + ambient,
      initialTemperature: room,
      ambientPressure: ambient,
      throatArea: area,
      dischargeCoefficient: s.dischargeCoefficient * s.feedRatio,
      gamma: s.gamma,
      gasConstant: s.gasConstant,
      process: 'adiabatic',
      duration: 60,
      step: 1 / SAMPLE_RATE,
    })
    const chamberAt = (sinceOpen: number) => {
      const x = Math.min(1, Math.max(0, sinceOpen / s.valveOpening))
      const open = x * x * (3 - 2 * x)
      return ambient + open * Math.max(0, s.feedRatio * linearAt(tank.time, tank.pressure, sinceOpen) - ambient)
    }
    // The crew closes the valve at the first sample below the stop pressure.
    const stopAt = tank.time.find((t) => t > s.valveOpening && chamberAt(t) - ambient < STOP_GAUGE)
    if (stopAt === undefined) throw new Error(`demo jet run ${group}: the chamber never fell to the stop pressure`)
    const samples = Math.round((PRE_ROLL + stopAt + POST_ROLL) * SAMPLE_RATE)
    const lines = ['t,p_chamber']
    for (let k = 0; k <= samples; k++) {
      const t = k / SAMPLE_RATE
      const sinceOpen = t - PRE_ROLL
      const chamber = sinceOpen <= 0 || sinceOpen > stopAt ? ambient : chamberAt(sinceOpen)
      lines.push(`${t.toFixed(2)},${((chamber - ambient + s.pressureNoise * noise()) / 1000).toFixed(1)}`)
    }
    const csv = `${lines.join('\n')}\n`

    // The photograph: early in the run, read off the logger's clock to 0.01 s.
    const photoAt = Number((PRE_ROLL + uniform(1.2, 2.8)).toFixed(2))
    const p0 = chamberAt(photoAt - PRE_ROLL)
    const jet = fullyExpandedJet(JET_NOZZLE_DIAMETER, p0, ambient, s.gamma)
    const spacing = shockCellSpacing(jet.diameter, jet.mach)
    const disk = machDiskDistance(JET_NOZZLE_DIAMETER, p0, ambient)
    const picture = renderJetPhoto({
      exitDiameter: JET_NOZZLE_DIAMETER,
      jetDiameter: jet.diameter,
      cellSpacing: spacing,
      cells: PICTURE.cells,
      machDisk: disk,
      width: PICTURE.width,
      height: PICTURE.height,
      pixelsPerMetre: PICTURE.pixelsPerMetre,
      seed: 100 + i,
    })
    const bytes = await sharp(Buffer.from(picture.pixels), {
      raw: { width: picture.width, height: picture.height, channels: 1 },
    })
      .png()
      .toBuffer()

    const exitMm = Number((1000 * JET_NOZZLE_DIAMETER + uniform(-0.01, 0.01)).toFixed(2))
    // A hand's jitter: under a pixel either way, one decimal as the tool stores it.
    const jitter = (p: Point): Point => ({
      x: Math.round(10 * (p.x + 0.6 * noise())) / 10,
      y: Math.round(10 * (p.y + 0.6 * noise())) / 10,
    })
    const truth = truthMarks(picture, exitMm)
    const careful: JetMarks = {
      scale: { ...truth.scale, from: jitter(truth.scale.from), to: jitter(truth.scale.to) },
      exitPlane: jitter(truth.exitPlane),
      cellEnds: truth.cellEnds.map(jitter),
      ...(truth.machDisk ? { machDisk: jitter(truth.machDisk) } : {}),
    }
    const marks: JetMarks =
      group === DEMO_JET_WRONG_SCALE
        ? { ...careful, scale: { ...careful.scale, to: jitter(picture.truth.exitPlane) } }
        : careful

    // What the group works out: the theory from its log at the photograph's time, the spacing from
    // its marks (A4: from its own print, with the right scale).
    const measured = measureJet(group === DEMO_JET_WRONG_SCALE ? careful : marks).meanCellSpacing
    const values: Record<string, number> = {
      jet_mach: jet.mach,
      cell_theory: 1000 * spacing,
      disk_theory: 1000 * disk,
      cell_measured: 1000 * measured,
      cell_ratio: measured / spacing,
    }
    const reported: Record<string, number> = {}
    for (const r of assignment.results) {
      const value = values[r.key]
      if (value === undefined) throw new Error(`demo jet run ${group}: no value for ${r.key}`)
      // Small human error: within 30 % of the tolerance, then 4 significant figures.
      const relative = r.tolerance.relative ?? 0
      reported[r.key] = significant(value * (1 + 0.3 * relative * uniform(-1, 1)), 4)
    }

    out.push({
      group,
      csv,
      mapping: suggestMapping(['t', 'p_chamber'], table),
      measurements: {
        p_ambient: ambient / 1000,
        d_throat: exitMm,
        d_exit: exitMm,
        t_photo: photoAt,
      },
      reported,
      photo: { bytes, contentType: 'image/png', filename: `jet-${group.toLowerCase()}.png`, marks },
    })
  }
  return out
}

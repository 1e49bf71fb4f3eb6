import sharp from 'sharp'
import { renderJetPhoto, truthMarks, type JetPhoto } from '../../scripts/demo/jet-photo'
import { measureJet, type JetMarks } from '../../shared/images/jet-marks'

/** A small rendered jet of our own model (exit 8 mm, cells 12 mm apart, Mach disk at 6 mm) as PNG or JPEG. */
export async function jetPhotoFile(
  format: 'png' | 'jpeg' = 'png',
  size = { width: 480, height: 200 },
): Promise<{ photo: JetPhoto; bytes: Buffer; marks: JetMarks }> {
  const photo = renderJetPhoto({
    exitDiameter: 0.008,
    jetDiameter: 0.0095,
    cellSpacing: 0.012,
    cells: 4,
    machDisk: 0.006,
    width: size.width,
    height: size.height,
    pixelsPerMetre: 6000,
    seed: 7,
  })
  const raw = sharp(Buffer.from(photo.pixels), { raw: { width: photo.width, height: photo.height, channels: 1 } })
  const bytes = format === 'png' ? await raw.png().toBuffer() : await raw.jpeg({ quality: 90 }).toBuffer()
  return { photo, bytes, marks: truthMarks(photo, 8) }
}

/** A small sheet of our own with one photograph: the measured spacing and cell count are graded from the marks. */
export const JET_SHEET = `---
title: Reading the jet (test)
results: immediately
showExpected: true
attempts: 20
assignment:
  measurements:
    - { key: d_exit, label: Exit diameter, unit: mm }
  images:
    - key: jet
      label: Shadowgraph of the jet
      scaleFrom: d_exit
      cells: { min: 2, max: 6 }
      machDisk: optional
      theory: { cellSpacing: spacing_theory }
  results:
    - { key: spacing_measured, label: Mean cell spacing, unit: mm, expected: jet_cell_spacing, tolerance: { relative: 0.01 }, points: 1 }
    - { key: cells_marked, label: Cell ends marked, unit: "1", expected: jet_cell_count, tolerance: { absolute: 0.1 }, points: 1 }
    - { key: spacing_theory, label: Cell spacing (theory), unit: mm, expected: "0.012", tolerance: { relative: 0.05 }, points: 1 }
---

# Reading the jet
`

/** The hand-in payload for {@link JET_SHEET}: the spacing and count reported as the marks measure them. */
export function jetPayload(images: Record<string, unknown>) {
  const jet = images.jet as JetMarks | undefined
  let spacing = 1
  try {
    if (jet) spacing = measureJet(jet).meanCellSpacing * 1000
  } catch {
    // A scale of zero length: the server is to refuse it; the reported value does not matter.
  }
  return {
    measurements: { d_exit: { value: 8, unit: 'mm' } },
    reported: {
      spacing_measured: { value: spacing, unit: 'mm' },
      cells_marked: { value: jet?.cellEnds.length ?? 0, unit: '1' },
      spacing_theory: { value: 12, unit: 'mm' },
    },
    images,
  }
}

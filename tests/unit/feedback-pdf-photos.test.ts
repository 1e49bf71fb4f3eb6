import sharp from 'sharp'
import { describe, expect, it } from 'vitest'
import { feedbackPdfBuffer } from '../../server/reports/feedback-pdf'
import type { FeedbackReportData, ReportImage } from '../../server/reports/feedback-pdf'
import { markShapes } from '../../server/reports/photo-section'
import type { JetMarks } from '../../shared/images/jet-marks'
import { renderJetPhoto } from '../../scripts/demo/jet-photo'
import { reportData } from '../helpers/report-data'
import { pdfImages, readPdf } from '../helpers/pdf'
import { expectClose } from '../helpers/expect-close'

const report = (over: Partial<FeedbackReportData> = {}): FeedbackReportData =>
  reportData({ module: { title: 'Reading the jet', version: 1 }, ...over })

// Marks of known geometry: the scale spans 40 px for 8 mm (0.2 mm per pixel), the jet runs along
// y = 100 to the right of the exit plane at x = 40. Cell ends 60 px and 132 px downstream (12 mm and
// 26.4 mm; cells of 12 mm and 14.4 mm, mean 13.2 mm), handed in out of order; the Mach disk 36 px
// downstream (7.2 mm). In exit diameters (8 mm): 1.5, 3.3; 1.5, 1.8; mean 1.65; Mach disk 0.9.
const marks: JetMarks = {
  scale: { from: { x: 40, y: 80 }, to: { x: 40, y: 120 }, length: 8, unit: 'mm' },
  exitPlane: { x: 40, y: 100 },
  cellEnds: [
    { x: 172, y: 100 },
    { x: 100, y: 100 },
  ],
  machDisk: { x: 76, y: 100 },
}

async function picture(format: 'png' | 'jpeg', width: number, height: number): Promise<Buffer> {
  const photo = renderJetPhoto({
    exitDiameter: 0.008,
    jetDiameter: 0.009,
    cellSpacing: 0.013,
    cells: 2,
    machDisk: 0.0072,
    width,
    height,
    pixelsPerMetre: 5000,
    seed: 3,
  })
  const img = sharp(Buffer.from(photo.pixels), { raw: { width, height, channels: 1 } })
  return format === 'png' ? img.png().toBuffer() : img.jpeg({ quality: 90 }).toBuffer()
}

async function image(over: Partial<ReportImage> = {}): Promise<ReportImage> {
  return {
    label: 'Shadowgraph of the jet',
    contentType: 'image/png',
    width: 400,
    height: 200,
    bytes: await picture('png', 400, 200),
    marks,
    expected: { cellSpacing: 0.012, machDisk: null },
    ...over,
  }
}

describe('photographs in the feedback report', () => {
  it('prints each picture at its own pixel size with its label, its marks and the distances they measure beside the theory', async () => {
    const jpeg = await image({
      label: 'Schlieren picture, second run',
      contentType: 'image/jpeg',
      width: 300,
      height: 150,
      bytes: await picture('jpeg', 300, 150),
      expected: { cellSpacing: null, machDisk: 0.008 },
    })
    const bytes = await feedbackPdfBuffer(report({ images: [await image(), jpeg] }))
    const images = pdfImages(bytes)
    expect(images.map((i) => [i.width, i.height])).toEqual([
      [400, 200],
      [300, 150],
    ])
    // The JPEG goes in as it came (no re-encoding in the report).
    expect(images[1]!.filter).toBe('DCTDecode')

    const pdf = await readPdf(bytes)
    const pagesWithPictures = pdf.operators.map((ops) => ops.paintImageXObject ?? 0)
    expect(pagesWithPictures.reduce((a, b) => a + b, 0)).toBe(2)
    const first = pagesWithPictures.findIndex((n) => n > 0)
    expect(pdf.pageTexts[first]).toContain('Shadowgraph of the jet')
    expect(pdf.text).toContain('Schlieren picture, second run')

    const lines = pdf.lines.flat()
    // On the picture: the scale's known length, each cell end's number, the Mach disk.
    expect(lines).toContain('8 mm')
    expect(pdf.pageTexts[first]).toContain('Mach disk')
    // The cell ends numbered from the exit plane, whatever order they were handed in.
    expect(lines).toContain('1 12 mm (1.5 D) 12 mm (1.5 D)')
    expect(lines).toContain('2 26.4 mm (3.3 D) 14.4 mm (1.8 D)')
    // Measured beside expected (12 mm: ratio 1.1), and a hidden or missing expectation said in words.
    expect(lines).toContain('Mean cell spacing 13.2 mm (1.65 D) 12 mm (1.5 D) 1.1')
    expect(lines).toContain('Exit plane to the Mach disk 7.2 mm (0.9 D) not shown —')
    expect(lines).toContain('Mean cell spacing 13.2 mm (1.65 D) not shown —')
    expect(lines).toContain('Exit plane to the Mach disk 7.2 mm (0.9 D) 8 mm (1 D) 0.9')
    expect(pdf.text).toContain('Scale: 8 mm over 40 pixels (0.2 mm per pixel)')
  })

  it('leaves the report as it was when a hand-in has no photographs', async () => {
    const without = await feedbackPdfBuffer(report())
    const empty = await feedbackPdfBuffer(report({ images: [] }))
    expect(pdfImages(without)).toEqual([])
    expect(pdfImages(empty)).toEqual([])
    const a = await readPdf(without)
    const b = await readPdf(empty)
    expect(b.pages).toBe(a.pages)
    expect(b.text).toBe(a.text)
    expect(b.operators).toEqual(a.operators)
    expect(a.text).not.toContain('photograph')
    expect(a.operators.every((ops) => (ops.paintImageXObject ?? 0) === 0)).toBe(true)
  })

  it('says in words when there is no cell end to measure and no theory to compare with', async () => {
    const bytes = await feedbackPdfBuffer(
      report({
        images: [
          await image({
            marks: { ...marks, cellEnds: [], machDisk: undefined },
            expected: { cellSpacing: null, machDisk: null },
          }),
        ],
      }),
    )
    const lines = (await readPdf(bytes)).lines.flat()
    expect(lines).toContain('Mean cell spacing no cell ends not shown —')
    // Neither marked nor expected: no Mach-disk row at all.
    expect(lines.some((l) => l.startsWith('Exit plane to the Mach disk'))).toBe(false)
  })
})

describe('marks drawn over a picture', () => {
  it('scales every mark by the same factor from the picture’s corner and numbers the cell ends along the jet', () => {
    const k = 1.25
    const origin = { x: 50, y: 300 }
    const s = markShapes(marks, k, origin)
    const page = (p: { x: number; y: number }) => ({ x: origin.x + p.x * k, y: origin.y + p.y * k })
    expect(s.scale.line).toEqual([page(marks.scale.from), page(marks.scale.to)])
    expect(s.scale.label).toBe('8 mm')
    // Handed in far-first; drawn nearest-first.
    expect(s.cellEnds.map((c) => [c.number, c.at])).toEqual([
      [1, page({ x: 100, y: 100 })],
      [2, page({ x: 172, y: 100 })],
    ])
  })

  it('draws the exit plane and the Mach disk across the jet’s axis, through their marks', () => {
    // A jet running down and to the right at 30°.
    const c = Math.cos(Math.PI / 6)
    const n = Math.sin(Math.PI / 6)
    const along = (d: number) => ({ x: 100 + d * c, y: 50 + d * n })
    const slanted: JetMarks = {
      scale: {
        from: { x: 100 - 20 * n, y: 50 + 20 * c },
        to: { x: 100 + 20 * n, y: 50 - 20 * c },
        length: 8,
        unit: 'mm',
      },
      exitPlane: along(0),
      cellEnds: [along(80), along(160)],
      machDisk: along(40),
    }
    const s = markShapes(slanted, 2, { x: 0, y: 0 })
    for (const [seg, through] of [
      [s.exitPlane, along(0)],
      [s.machDisk!, along(40)],
    ] as const) {
      const [a, b] = seg
      // Perpendicular to the axis (the dot product of the segment with the axis is zero) …
      expectClose(Math.abs((b.x - a.x) * c + (b.y - a.y) * n) + 1, 1, 1e-9)
      // … and centred on its mark.
      expectClose((a.x + b.x) / 2, through.x * 2, 1e-9)
      expectClose((a.y + b.y) / 2, through.y * 2, 1e-9)
    }
    // The exit plane spans more than the scale (the jet's width) so it reads as a line across the jet.
    const [a, b] = s.exitPlane
    expect(Math.hypot(b.x - a.x, b.y - a.y)).toBeGreaterThan(40 * 2)
  })
})

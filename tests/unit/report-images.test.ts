import { describe, expect, it } from 'vitest'
import { ImageSpecSchema } from '../../shared/modules/image-spec'
import type { SubmissionImageView } from '../../shared/schemas/submissions'
import { reportImages } from '../../server/services/report-images'
import { expectClose } from '../helpers/expect-close'

const marks = {
  scale: { from: { x: 10, y: 10 }, to: { x: 10, y: 50 }, length: 8, unit: 'mm' as const },
  exitPlane: { x: 10, y: 30 },
  cellEnds: [{ x: 60, y: 30 }],
}

const view = (key: string): SubmissionImageView => ({
  key,
  contentType: 'image/png',
  width: 200,
  height: 100,
  size: 1234,
  sha256: 'a'.repeat(64),
  originalSha256: 'b'.repeat(64),
  marks,
})

const specs = [
  ImageSpecSchema.parse({
    key: 'jet',
    label: 'Shadowgraph of the jet',
    theory: { cellSpacing: 'cell_theory', machDisk: 'disk_theory' },
  }),
  ImageSpecSchema.parse({ key: 'late', label: 'Late in the run' }),
]

// Theory results in mm and in inches: the report takes them in metres.
const checks = [
  { key: 'cell_theory', unit: 'mm', expected: 13.5 },
  { key: 'disk_theory', unit: 'in', expected: 0.25 },
  { key: 'other', unit: 'mm', expected: 99 },
]

const pictures = new Map([
  ['jet', Buffer.from('jet picture')],
  ['late', Buffer.from('late picture')],
])

describe('the photographs a feedback report prints', () => {
  it('takes the theory distances from the results the sheet names, in metres, with the label and picture of each', () => {
    const out = reportImages([view('late'), view('jet')], specs, checks, true, pictures)
    expect(out.map((i) => i.label)).toEqual(['Shadowgraph of the jet', 'Late in the run'])
    expect(out[0]!.bytes.toString()).toBe('jet picture')
    expect(out[0]!.marks).toEqual(marks)
    expect([out[0]!.width, out[0]!.height, out[0]!.contentType]).toEqual([200, 100, 'image/png'])
    expectClose(out[0]!.expected.cellSpacing!, 0.0135, 1e-12)
    // 0.25 in = 6.35 mm (1 in = 25.4 mm exactly).
    expectClose(out[0]!.expected.machDisk!, 0.00635, 1e-12)
    // A photograph whose sheet names no theory compares with nothing.
    expect(out[1]!.expected).toEqual({ cellSpacing: null, machDisk: null })
  })

  it('prints no theory distance when the sheet hides expected values from students', () => {
    const out = reportImages([view('jet')], specs, checks, false, pictures)
    expect(out[0]!.expected).toEqual({ cellSpacing: null, machDisk: null })
  })

  it('prints no theory distance when its check has no expected value, and leaves out a photograph without a picture', () => {
    const out = reportImages(
      [view('jet'), view('late')],
      specs,
      [{ key: 'cell_theory', unit: 'mm', expected: null }],
      true,
      new Map([['jet', Buffer.from('x')]]),
    )
    expect(out).toHaveLength(1)
    expect(out[0]!.expected).toEqual({ cellSpacing: null, machDisk: null })
  })
})

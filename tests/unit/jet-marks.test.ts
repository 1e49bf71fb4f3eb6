import { describe, expect, it } from 'vitest'
import { JetMarksSchema, checkMarks, measureJet } from '../../shared/images/jet-marks'
import type { JetMarks, MarkRules } from '../../shared/images/jet-marks'
import { expectClose } from '../helpers/expect-close'
import { expectRangeError } from '../helpers/expect-range-error'

const IMAGE = { width: 1600, height: 900 }
const RULES: MarkRules = { cells: { min: 2, max: 6 }, machDisk: 'optional' }

/** A horizontal jet: the 8 mm exit spans 80 px (0.1 mm per pixel), exit plane at x = 200. */
function marks(over: Partial<JetMarks> = {}): JetMarks {
  return JetMarksSchema.parse({
    scale: { from: { x: 200, y: 410 }, to: { x: 200, y: 490 }, length: 8, unit: 'mm' },
    exitPlane: { x: 200, y: 450 },
    cellEnds: [
      { x: 330, y: 450 },
      { x: 455, y: 452 },
      { x: 575, y: 447 },
    ],
    ...over,
  })
}

describe('measureJet', () => {
  it('measures cell ends along the axis with the scale, in metres', () => {
    const m = measureJet(marks())
    expectClose(m.metresPerPixel, 1e-4, 1e-12)
    expectClose(m.scaleLength, 0.008, 1e-12)
    // The axis runs from the exit plane to the farthest mark (575, 447); projections on it:
    const ax = 375
    const ay = -3
    const len = Math.hypot(ax, ay)
    const proj = (x: number, y: number) => (((x - 200) * ax + (y - 450) * ay) / len) * 1e-4
    const expected = [proj(330, 450), proj(455, 452), proj(575, 447)]
    m.cellEndDistances.forEach((d, i) => expectClose(d, expected[i]!, 1e-12))
    expectClose(m.cellSpacings[0]!, expected[0]!, 1e-12)
    expectClose(m.cellSpacings[2]!, expected[2]! - expected[1]!, 1e-12)
    expectClose(m.meanCellSpacing, expected[2]! / 3, 1e-12)
    expect(m.machDiskDistance).toBeNaN()
  })

  it('does not count a mark’s sideways stray, sorts cell ends marked out of order, and reads inches', () => {
    const straight = measureJet(
      marks({
        scale: { from: { x: 0, y: 0 }, to: { x: 254, y: 0 }, length: 1, unit: 'in' },
        cellEnds: [
          { x: 500, y: 450 },
          { x: 300, y: 470 },
        ],
        machDisk: { x: 260, y: 430 },
      }),
    )
    // 1 in over 254 px: 0.1 mm per pixel. The axis is horizontal (exit plane to (500, 450)).
    expectClose(straight.cellEndDistances[0]!, 0.01, 1e-12)
    expectClose(straight.cellEndDistances[1]!, 0.03, 1e-12)
    expectClose(straight.machDiskDistance, 0.006, 1e-12)
  })

  it('refuses a zero-length scale', () => {
    expectRangeError(
      () => measureJet(marks({ scale: { from: { x: 5, y: 5 }, to: { x: 5, y: 5 }, length: 8, unit: 'mm' } })),
      'scale',
    )
  })
})

describe('checkMarks', () => {
  it('accepts marks inside the image within the sheet’s counts', () => {
    expect(checkMarks(marks(), IMAGE, RULES)).toEqual([])
  })

  it('names each mark outside the image, a scale on one spot, and the counts', () => {
    const problems = checkMarks(
      marks({
        scale: { from: { x: 10, y: 10 }, to: { x: 10.2, y: 10 }, length: 8, unit: 'mm' },
        exitPlane: { x: -4, y: 450 },
        cellEnds: [{ x: 1700, y: 450 }],
        machDisk: { x: 300, y: 950 },
      }),
      IMAGE,
      { cells: { min: 2, max: 6 }, machDisk: 'optional' },
    )
    const messages = problems.map((p) => p.message)
    expect(messages).toEqual([
      expect.stringMatching(/scale points are on the same spot/),
      expect.stringMatching(/exit plane \(-4, 450\) is outside the image \(1600 × 900 pixels\)/),
      expect.stringMatching(/cell end 1 \(1700, 450\) is outside/),
      expect.stringMatching(/at least 2 cell ends \(1 marked\)/),
      expect.stringMatching(/Mach disk \(300, 950\) is outside/),
    ])
    expect(problems[2]).toMatchObject({ mark: 'cell-end', index: 1 })
  })

  it('holds the Mach disk to the sheet’s rule and caps the cell ends', () => {
    expect(checkMarks(marks(), IMAGE, { ...RULES, machDisk: 'required' }).map((p) => p.mark)).toEqual(['mach-disk'])
    expect(
      checkMarks(marks({ machDisk: { x: 260, y: 450 } }), IMAGE, { ...RULES, machDisk: 'none' }).map((p) => p.mark),
    ).toEqual(['mach-disk'])
    expect(checkMarks(marks(), IMAGE, { cells: { min: 1, max: 2 }, machDisk: 'optional' })[0]?.message).toMatch(
      /at most 2 cell ends \(3 marked\)/,
    )
  })

  it('refuses malformed marks by field when parsed', () => {
    const parsed = JetMarksSchema.safeParse({
      scale: { from: { x: 0, y: 0 }, to: { x: 10, y: 0 }, length: 0, unit: 'psi' },
      exitPlane: { x: 'a', y: 0 },
    })
    expect(parsed.success).toBe(false)
    const paths = parsed.error!.issues.map((i) => `${i.path.join('.')}: ${i.message}`)
    expect(paths).toEqual(
      expect.arrayContaining([
        expect.stringMatching(/^scale\.length: .*greater than 0/),
        expect.stringMatching(/^scale\.unit: .*length/),
        expect.stringMatching(/^exitPlane\.x: /),
      ]),
    )
  })
})

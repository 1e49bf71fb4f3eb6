import { describe, expect, it } from 'vitest'
import { StudentAssignmentSchema } from '../../../shared/schemas/student-module-spec'
import type { SubmissionDetail } from '../../../shared/schemas/submissions'
import { photoViews } from '../../../src/composables/use-submission-photos'

const marks = {
  scale: { from: { x: 10, y: 10 }, to: { x: 10, y: 50 }, length: 8, unit: 'mm' as const },
  exitPlane: { x: 20, y: 30 },
  cellEnds: [{ x: 80, y: 30 }],
}
const detail = {
  id: 41,
  inputs: { measurements: { d_exit: { value: 0.5, unit: 'in' } }, reported: {} },
  images: [
    { key: 'jet', contentType: 'image/png', width: 480, height: 240, size: 1, sha256: 'a', originalSha256: 'b', marks },
    { key: 'old', contentType: 'image/jpeg', width: 100, height: 50, size: 1, sha256: 'c', originalSha256: 'd', marks },
  ],
} as unknown as SubmissionDetail
const assignment = StudentAssignmentSchema.parse({
  measurements: [{ key: 'd_exit', label: 'Exit diameter', unit: 'mm' }],
  images: [{ key: 'jet', label: 'Shadowgraph of the jet', instructions: 'Mark it.', scaleFrom: 'd_exit' }],
})

describe('the photographs of a hand-in on the result and review pages', () => {
  it('each picture comes from the submission’s image route, labelled from the sheet, with the typed exit diameter in metres', () => {
    const [jet, old] = photoViews(7, detail, assignment)
    expect(jet).toEqual({
      key: 'jet',
      label: 'Shadowgraph of the jet',
      instructions: 'Mark it.',
      src: '/api/courses/7/submissions/41/images/jet',
      width: 480,
      height: 240,
      marks,
      // 0.5 in = 12.7 mm exactly.
      exitDiameter: 0.0127,
    })
    // A photograph the sheet no longer names keeps its key as its label and has no exit diameter.
    expect(old).toMatchObject({ key: 'old', label: 'old', src: '/api/courses/7/submissions/41/images/old' })
    expect(old!.exitDiameter).toBeUndefined()
  })

  it('without the sheet, the keys name the photographs', () => {
    expect(photoViews(7, detail, null).map((p) => p.label)).toEqual(['jet', 'old'])
  })
})

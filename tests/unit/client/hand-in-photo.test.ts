import { describe, expect, it } from 'vitest'
import { SubmissionPayloadSchema } from '../../../shared/schemas/submissions'
import { StudentAssignmentSchema } from '../../../shared/schemas/student-module-spec'
import { ApiError } from '../../../src/api/http'
import { newEditor, placeMark } from '../../../src/components/photo/mark-draft'
import type { MarkEditor, MarkMode } from '../../../src/components/photo/mark-draft'
import { fieldId, useHandInForm } from '../../../src/composables/use-hand-in-form'
import { invalidSubmissionIssues } from '../../../src/composables/use-hand-in-send'
import { PHOTO_LIMIT_BYTES, photoFileProblem, photoSizeProblem } from '../../../src/composables/use-photo-upload'

// A sheet with one photograph: 2 to 4 cell ends, the Mach disk required, the scale from the typed exit diameter.
const assignment = StudentAssignmentSchema.parse({
  measurements: [{ key: 'd_exit', label: 'Exit diameter', unit: 'mm', role: 'exit-diameter' }],
  images: [
    {
      key: 'jet',
      label: 'Shadowgraph of the jet',
      cells: { min: 2, max: 4 },
      machDisk: 'required',
      scaleFrom: 'd_exit',
    },
  ],
  results: [],
})

const PNG_HEAD = new Uint8Array([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13])
const JPEG_HEAD = new Uint8Array([0xff, 0xd8, 0xff, 0xe0, 0, 16])
const text = (s: string) => new TextEncoder().encode(s)

describe('a photograph file is checked in the browser before sending', () => {
  it('takes PNG and JPEG by their first bytes, whatever the name says', () => {
    expect(photoFileProblem({ name: 'jet.png', size: 1000 }, PNG_HEAD, 'Jet')).toBe('')
    expect(photoFileProblem({ name: 'jet.jpg', size: 1000 }, JPEG_HEAD, 'Jet')).toBe('')
    expect(photoFileProblem({ name: 'jet.dat', size: 1000 }, JPEG_HEAD, 'Jet')).toBe('')
  })

  it('names what another file is: SVG, GIF, PDF, empty, or a mislabelled text', () => {
    expect(
      photoFileProblem({ name: 'a.svg', size: 40 }, text('<svg xmlns="http://www.w3.org/2000/svg"/>'), 'Jet'),
    ).toBe('Jet: a.svg is an SVG drawing; choose a PNG or JPEG photograph.')
    expect(photoFileProblem({ name: 'a.gif', size: 40 }, text('GIF89a....'), 'Jet')).toContain('is a GIF;')
    expect(photoFileProblem({ name: 'a.png', size: 40 }, text('%PDF-1.7'), 'Jet')).toContain('is a PDF;')
    expect(photoFileProblem({ name: 'a.png', size: 0 }, new Uint8Array(), 'Jet')).toBe('Jet: a.png is empty.')
    expect(photoFileProblem({ name: 'notes.png', size: 5 }, text('hello'), 'Jet')).toBe(
      'Jet: notes.png is not a PNG or JPEG picture; choose a PNG or JPEG photograph.',
    )
  })

  it('refuses a file over 10 MB and a picture over 40 megapixels, with the numbers', () => {
    expect(photoFileProblem({ name: 'big.png', size: PHOTO_LIMIT_BYTES + 1 }, PNG_HEAD, 'Jet')).toBe(
      'Jet: big.png is 10.0 MB; a photograph may be at most 10 MB.',
    )
    expect(photoFileProblem({ name: 'ok.png', size: PHOTO_LIMIT_BYTES }, PNG_HEAD, 'Jet')).toBe('')
    expect(photoSizeProblem({ width: 10000, height: 5000 }, 'Jet')).toBe(
      'Jet: the picture is 10000 × 5000 pixels (50 megapixels); at most 40 megapixels are taken.',
    )
    expect(photoSizeProblem({ width: 8000, height: 5000 }, 'Jet')).toBe('')
  })
})

/** Marks placed as a student would, in a 400 × 200 picture. */
function marked(modes: [MarkMode, number, number][]): MarkEditor {
  let e = newEditor()
  for (const [mode, x, y] of modes) e = placeMark(e, mode, { x, y }, { width: 400, height: 200 }).editor
  return e
}

describe('the hand-in form with a photograph', () => {
  it('asks for the photograph, then names each mark still missing, at the picture', () => {
    const form = useHandInForm(assignment)
    form.measurements.d_exit!.text = '8'
    expect(form.clientProblems.value[fieldId.photo('jet')]).toBe(
      'Shadowgraph of the jet: choose the photograph (PNG or JPEG).',
    )
    const p = form.photos[0]!
    p.file.value = new File([PNG_HEAD], 'jet.png', { type: 'image/png' })
    p.size.value = { width: 400, height: 200 }
    p.editor.value = marked([
      ['scale', 100, 50],
      ['cell-end', 110, 100],
    ])
    expect(form.clientProblems.value[fieldId.photo('jet')]).toBeUndefined()
    expect(form.clientProblems.value[fieldId.photoMarks('jet')]).toBe(
      'Shadowgraph of the jet: Scale: place the second scale point. Exit plane: mark the exit plane (the nozzle’s exit, on the axis). Cell ends: mark at least 2 cell ends (1 marked). Mach disk: mark the Mach disk (the flat shock across the jet in the first cell).',
    )
    expect(form.summaryOf(form.clientProblems.value).map((i) => i.target)).toEqual([fieldId.photoMarks('jet')])
  })

  it('complete marks go in the payload under the photograph’s key, the scale from the typed exit diameter, and the file as photo:<key>', () => {
    const form = useHandInForm(assignment)
    form.measurements.d_exit!.text = '8'
    const p = form.photos[0]!
    const file = new File([PNG_HEAD], 'jet.png', { type: 'image/png' })
    p.file.value = file
    p.size.value = { width: 400, height: 200 }
    p.editor.value = marked([
      ['scale', 100, 50],
      ['scale', 100, 90],
      ['exit-plane', 50, 100],
      ['cell-end', 110, 100],
      ['cell-end', 170, 100],
      ['mach-disk', 80, 100],
    ])
    expect(form.clientProblems.value).toEqual({})
    const payload = SubmissionPayloadSchema.parse(form.payload())
    expect(payload.images).toEqual({
      jet: {
        scale: { from: { x: 100, y: 50 }, to: { x: 100, y: 90 }, length: 8, unit: 'mm' },
        exitPlane: { x: 50, y: 100 },
        cellEnds: [
          { x: 110, y: 100 },
          { x: 170, y: 100 },
        ],
        machDisk: { x: 80, y: 100 },
      },
    })
    expect(form.files()).toEqual([{ photoKey: 'jet', file, filename: 'jet.png' }])
    // The exit diameter in metres, for the readout in exit diameters.
    expect(form.exitDiameter(p)).toBeCloseTo(0.008, 12)

    // A length typed for the scale wins over the default.
    p.scaleText.value = '1.5'
    p.scaleUnit.value = 'cm'
    expect(SubmissionPayloadSchema.parse(form.payload()).images?.jet?.scale).toMatchObject({ length: 1.5, unit: 'cm' })
  })

  it('without a typed exit diameter or scale length, the form asks for the length', () => {
    const form = useHandInForm(assignment)
    const p = form.photos[0]!
    p.file.value = new File([PNG_HEAD], 'jet.png', { type: 'image/png' })
    p.size.value = { width: 400, height: 200 }
    p.editor.value = marked([
      ['scale', 100, 50],
      ['scale', 100, 90],
      ['exit-plane', 50, 100],
      ['cell-end', 110, 100],
      ['cell-end', 170, 100],
      ['mach-disk', 80, 100],
    ])
    expect(form.clientProblems.value[fieldId.photoMarks('jet')]).toBe(
      'Shadowgraph of the jet: Scale: type the known length between the scale points (a number above 0).',
    )
  })

  it('shows the server’s refusals at the photograph: the file (photo_refused) and a mark (validation_failed)', () => {
    const form = useHandInForm(assignment)
    const refused = invalidSubmissionIssues(
      new ApiError(
        400,
        'photo_refused',
        'Shadowgraph of the jet: the file is a GIF; hand in a PNG or JPEG photograph.',
        {
          field: 'photo:jet',
        },
      ),
    )
    form.applyServerIssues(refused!.issues, refused!.more)
    expect(form.fieldErrors.value[fieldId.photo('jet')]).toBe(
      'Shadowgraph of the jet: the file is a GIF; hand in a PNG or JPEG photograph.',
    )
    const marks = invalidSubmissionIssues(
      new ApiError(400, 'validation_failed', 'images.jet.cellEnds: cell end 2 is outside the image', {
        issues: [
          { field: 'images.jet.cell-end', message: 'cell end 2 (500, 10) is outside the image (400 × 200 pixels)' },
        ],
      }),
    )
    form.applyServerIssues(marks!.issues, marks!.more)
    expect(form.fieldErrors.value[fieldId.photoMarks('jet')]).toBe(
      'cell end 2 (500, 10) is outside the image (400 × 200 pixels)',
    )
    // The schema's own answer (a list of paths) is read the same way; other refusals are not photo problems.
    expect(
      invalidSubmissionIssues(
        new ApiError(400, 'validation_failed', 'x', [{ path: 'images.jet.scale.length', message: 'too small' }]),
      )?.issues,
    ).toEqual([{ field: 'images.jet.scale.length', message: 'too small' }])
    expect(
      invalidSubmissionIssues(new ApiError(400, 'validation_failed', 'x', [{ path: 'other', message: 'y' }])),
    ).toBe(null)
  })
})

import { describe, expect, it } from 'vitest'
import { checkHandIn } from '../../../shared/grading/check-hand-in'
import { parseLog } from '../../../shared/grading/csv'
import { StudentAssignmentSchema } from '../../../shared/schemas/student-module-spec'
import { fieldId, useHandInForm } from '../../../src/composables/use-hand-in-form'
import { thinForPreview } from '../../../src/composables/use-log-upload'

// A student's view of a small assignment, as the server sends it.
const assignment = StudentAssignmentSchema.parse({
  tables: [
    {
      key: 'run',
      label: 'Run log',
      minRows: 3,
      columns: [
        { key: 't', label: 'Time', unit: 's', role: 'time' },
        { key: 'thrust', label: 'Thrust', unit: 'N', role: 'thrust' },
      ],
    },
  ],
  measurements: [
    { key: 'p_ambient', label: 'Barometer', unit: 'kPa', pressure: 'absolute', role: 'ambient-pressure', min: 60 },
    { key: 'd_throat', label: 'Throat diameter', unit: 'mm', role: 'throat-diameter' },
  ],
  results: [{ key: 'impulse', label: 'Total impulse', unit: 'N*s', points: 2 }],
})

const CSV = 'time,thrust\n0,0\n0.01,n/a\n0.02,6\n0.03,0\n'

describe('the hand-in form shows what the shared hand-in check says', () => {
  it('each field carries the message checkHandIn gives for the same input', async () => {
    const form = useHandInForm(assignment)
    form.measurements.p_ambient!.text = '50'
    form.measurements.d_throat!.text = '4,2'
    form.results.impulse!.text = ''
    await form.uploads[0]!.setFile(new File([CSV], 'run.csv', { type: 'text/csv' }))
    form.attempted.value = true

    const mapping = { t: { header: 'time', unit: 's' }, thrust: { header: 'thrust', unit: 'N' } }
    const bytes = new TextEncoder().encode(CSV)
    const same = checkHandIn(
      assignment,
      {
        mappings: { run: mapping },
        measurements: {
          p_ambient: { value: 50, unit: 'kPa', pressure: 'absolute' },
          d_throat: { value: Number.NaN, unit: 'mm', text: '4,2' },
        },
        reported: {},
      },
      {
        run: {
          state: 'read',
          filename: 'run.csv',
          size: bytes.length,
          head: bytes,
          parse: () => parseLog(CSV, assignment.tables[0]!, mapping),
        },
      },
    )
    const message = (field: string) => same.issues.find((i) => i.field === field)?.message
    const errors = form.fieldErrors.value
    expect(errors[fieldId.measurement('p_ambient')]).toBe(message('measurements.p_ambient'))
    expect(errors[fieldId.measurement('p_ambient')]).toBe('Barometer: 50 kPa is below the plausible minimum of 60 kPa.')
    expect(errors[fieldId.measurement('d_throat')]).toBe(message('measurements.d_throat'))
    expect(errors[fieldId.result('impulse')]).toBe(message('reported.impulse'))
    // The log's own problem (row 3, column "thrust") is listed under the upload; its field points there.
    const listed = form.fileIssues.value.run?.items ?? []
    expect(listed.map((i) => i.message)).toEqual(
      same.issues.filter((i) => i.field === 'table:run').map((i) => i.message),
    )
    expect(listed[0]).toMatchObject({ row: 3, column: 'thrust' })
    expect(errors[fieldId.table('run')]).toBe('Run log: the file has a problem; see the list under the upload.')
  })

  it("an empty file is named at the upload in the check's own words", async () => {
    const form = useHandInForm(assignment)
    await form.uploads[0]!.setFile(new File([], 'blank.csv'))
    expect(form.uploads[0]!.fileProblem.value).toBe('Run log: blank.csv is empty.')
    expect(form.clientProblems.value[fieldId.table('run')]).toBe('Run log: blank.csv is empty.')
  })

  it('a complete form has no problems and sends the values as typed', async () => {
    const form = useHandInForm(assignment)
    form.measurements.p_ambient!.text = '84.2'
    form.measurements.d_throat!.text = '4.2'
    form.results.impulse!.text = '1.5'
    await form.uploads[0]!.setFile(new File([CSV.replace('n/a', '5')], 'run.csv'))
    expect(form.clientProblems.value).toEqual({})
    expect(form.payload()).toEqual({
      mappings: { run: { t: { header: 'time', unit: 's' }, thrust: { header: 'thrust', unit: 'N' } } },
      measurements: {
        p_ambient: { value: 84.2, unit: 'kPa', pressure: 'absolute' },
        d_throat: { value: 4.2, unit: 'mm' },
      },
      reported: { impulse: { value: 1.5, unit: 'N*s' } },
    })
  })
})

describe('the preview of a log past the size limits', () => {
  it('shows no preview of a file with an over-long line; the check names the row', async () => {
    const form = useHandInForm(assignment)
    const long = `time,thrust\n0,0\n${'1'.repeat(5000)},1\n0.02,6\n`
    await form.uploads[0]!.setFile(new File([long], 'long.csv'))
    expect(form.uploads[0]!.headers.value).toEqual([])
    expect(form.uploads[0]!.previewRows.value).toEqual([])
    const issues = form.check.value.issues.filter((i) => i.field === 'table:run')
    expect(issues).toEqual([
      expect.objectContaining({ row: 3, message: expect.stringMatching(/^Row 3 is 5,002 characters long/) }),
    ])
  })
})

describe('the preview plot of a log', () => {
  it('keeps the first and the last sample when it thins the log', () => {
    // 1000 samples thinned to every 2nd: the last one (index 999) is not on the step.
    const xs = Array.from({ length: 1000 }, (_, i) => i / 100)
    const pts = thinForPreview(xs, xs, (v) => 2 * v, 600)
    expect(pts.length).toBe(501)
    expect(pts[0]).toEqual({ x: 0, y: 0 })
    expect(pts[pts.length - 1]).toEqual({ x: 9.99, y: 19.98 })
  })
})

import { describe, expect, it } from 'vitest'
import { checkModule } from '../../../shared/modules/check'
import { parseModuleSource } from '../../../shared/modules/front-matter'
import type { ParsedModule } from '../../../shared/modules/front-matter'
import { evaluateExpression, validateAssignmentExpressions } from '../../../shared/modules/expressions'
import { ScopeError, buildExpressionScope } from '../../../shared/modules/scope'

/** A jet-photograph assignment: a barometer, the exit diameter, the time of the photograph, one image. */
function sheet(imageLines: string[], results: string[] = []): string {
  return [
    '---',
    'title: Reading the jet',
    'assignment:',
    '  measurements:',
    '    - { key: p_ambient, label: Barometer, unit: kPa, pressure: absolute, role: ambient-pressure }',
    '    - { key: d_exit, label: Exit diameter, unit: mm }',
    '    - { key: t_photo, label: Time of the photograph, unit: s }',
    '  images:',
    ...imageLines,
    ...(results.length ? ['  results:', ...results] : []),
    '---',
    '# Body',
  ].join('\n')
}

function messageAt(parsed: ParsedModule, path: string): string {
  if (parsed.ok) throw new Error('expected the sheet to be refused')
  const found = parsed.errors.find((e) => e.path === path)
  if (!found) throw new Error(`no issue at ${path}; issues: ${JSON.stringify(parsed.errors)}`)
  return found.message
}

const JET = [
  '    - key: jet',
  '      label: Shadowgraph of the jet',
  '      scaleFrom: d_exit',
  '      takenAt: t_photo',
]

describe('assignment.images', () => {
  it('lets a sheet with a photograph be saved', () => {
    const checked = checkModule(sheet(JET), 'jet', 'UTC')
    expect(checked.issues).toEqual([])
  })

  it('names theory results that are missing or not lengths', () => {
    const results = [
      '    - { key: spacing_theory, label: Cell spacing (theory), unit: mm, expected: "1", tolerance: { relative: 0.1 }, points: 1 }',
      '    - { key: mach_jet, label: Jet Mach number, unit: "1", expected: "2", tolerance: { relative: 0.1 }, points: 1 }',
    ]
    const good = parseModuleSource(sheet([...JET, '      theory: { cellSpacing: spacing_theory }'], results), 'jet')
    if (!good.ok) throw new Error(JSON.stringify(good.errors))
    expect(good.frontMatter.assignment?.images[0]?.theory).toEqual({ cellSpacing: 'spacing_theory' })
    const wrong = parseModuleSource(
      sheet([...JET, '      theory: { cellSpacing: mach_jet, machDisk: nowhere }'], results),
      'jet',
    )
    expect(messageAt(wrong, 'assignment.images[0].theory.cellSpacing')).toMatch(/length unit; "mach_jet" is in 1/)
    expect(messageAt(wrong, 'assignment.images[0].theory.machDisk')).toMatch(/"nowhere" is not a result/)
  })

  it('reads a photograph with its defaults', () => {
    const parsed = parseModuleSource(sheet(JET), 'jet')
    if (!parsed.ok) throw new Error(JSON.stringify(parsed.errors))
    expect(parsed.frontMatter.assignment?.images).toEqual([
      {
        key: 'jet',
        label: 'Shadowgraph of the jet',
        cells: { min: 1, max: 8 },
        machDisk: 'optional',
        scaleFrom: 'd_exit',
        takenAt: 't_photo',
      },
    ])
  })

  it('names a scale or time that is not a measurement of the right kind, and crossed cell counts', () => {
    const wrong = parseModuleSource(
      sheet([
        '    - key: jet',
        '      label: Jet',
        '      scaleFrom: t_photo',
        '      takenAt: nowhere',
        '      cells: { min: 4, max: 2 }',
      ]),
      'jet',
    )
    expect(messageAt(wrong, 'assignment.images[0].scaleFrom')).toMatch(/length unit; "t_photo" is in s/)
    expect(messageAt(wrong, 'assignment.images[0].takenAt')).toMatch(/"nowhere" is not a measurement/)
    expect(messageAt(wrong, 'assignment.images[0].cells.max')).toMatch(/below cells.min/)
  })

  it('refuses a key whose expression names are taken, and a repeated key', () => {
    const clash = parseModuleSource(
      sheet(JET, [
        '    - key: jet_cell_spacing',
        '      label: Spacing',
        '      unit: mm',
        '      expected: jet_cell_spacing',
        '      tolerance: { relative: 0.1 }',
        '      points: 1',
      ]),
      'jet',
    )
    expect(messageAt(clash, 'assignment.images[0].key')).toMatch(/jet_cell_spacing.*already used/)
    const twice = parseModuleSource(sheet([...JET, '    - { key: d_exit, label: Again }']), 'jet')
    expect(messageAt(twice, 'assignment.images[1].key')).toMatch(/"d_exit" is already used/)
  })

  it('gives expressions the measured spacing, Mach disk and count, and says when a photograph is missing', () => {
    const source = sheet(JET, [
      '    - key: spacing_ratio',
      '      label: Measured over expected spacing',
      '      unit: "1"',
      '      expected: jet_cell_spacing / (1.31 * d_exit) + 0 * jet_mach_disk + 0 * jet_cell_count',
      '      tolerance: { relative: 0.1 }',
      '      points: 1',
    ])
    const parsed = parseModuleSource(source, 'jet')
    if (!parsed.ok) throw new Error(JSON.stringify(parsed.errors))
    const assignment = parsed.frontMatter.assignment!
    // The expression sees the photograph's names in the save-time trial run.
    expect(validateAssignmentExpressions(assignment)).toEqual([])
    const data = {
      tables: {},
      measurements: { p_ambient: 98.6, d_exit: 8, t_photo: 1.2 },
      images: { jet: { cellSpacing: 0.0131, machDisk: Number.NaN, cellCount: 4 } },
    }
    const scope = buildExpressionScope(assignment, data)
    expect(scope.jet_cell_spacing).toBe(0.0131)
    expect(scope.jet_cell_count).toBe(4)
    expect(evaluateExpression('jet_cell_spacing / (1.31 * d_exit)', scope)).toBeCloseTo(1.25, 12)
    expect(() => buildExpressionScope(assignment, { ...data, images: {} })).toThrow(ScopeError)
    expect(() => buildExpressionScope(assignment, { ...data, images: {} })).toThrow(/photograph "jet" is missing/)
  })
})

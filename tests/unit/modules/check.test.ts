import { describe, expect, it } from 'vitest'
import { checkModule } from '../../../shared/modules/check'

const module = (frontMatter: string[], body: string[]) => ['---', ...frontMatter, '---', ...body].join('\n')

const SPEC = [
  'title: Small lab',
  'assignment:',
  '  tables:',
  '    - key: run',
  '      label: Run',
  '      columns:',
  '        - { key: t, label: Time, unit: s, role: time }',
  '        - { key: thrust, label: Thrust, unit: N }',
  '  results:',
  '    - key: impulse',
  '      label: Total impulse',
  '      unit: N*s',
  '      expected: totalImpulse(t, thust)',
  '      tolerance: { relative: 0.03 }',
  '      points: 1',
  '  reviewRules:',
  '    - key: weak',
  '      when: impulse',
  '      reason: Reported impulse used as a condition.',
]

describe('checkModule', () => {
  const checked = checkModule(
    module(SPEC, ['# Lab', '', '```calculator warp', '```', '', 'Text $x$.']),
    'small-lab',
    'America/Denver',
  )

  it('reports an expression problem with the module name, the path and the line of the expression', () => {
    const issue = checked.issues.find((i) => i.path === 'assignment.results[0].expected')
    expect(issue?.message).toContain(
      'small-lab: assignment.results[0].expected: unknown name "thust" — did you mean thrust?',
    )
    // Line 1 is ---, so the expected line (YAML line 13) is source line 14.
    expect(issue?.line).toBe(14)
  })

  it('lets review rules see reported results, and requires them to give true or false', () => {
    const issue = checked.issues.find((i) => i.path === 'assignment.reviewRules[0].when')
    expect(issue?.message).toContain('true or false')
    expect(issue?.message).not.toContain('unknown name')
  })

  it('reports body problems at their line in the whole source', () => {
    const issue = checked.issues.find((i) => i.path === 'body')
    // The body starts on line 22 (after 19 YAML lines and two --- lines); the block is its 3rd line.
    expect(issue?.line).toBe(24)
    expect(issue?.message).toContain('small-lab: body: line 24: calculator block')
  })

  it('still renders the body and returns the title and front matter', () => {
    expect(checked.title).toBe('Small lab')
    expect(checked.frontMatter?.assignment?.results[0]?.key).toBe('impulse')
    expect(checked.html).toContain('class="katex"')
  })

  it('uses the course time zone when the due date has none', () => {
    const c = checkModule(module(['title: Due', 'due: { at: 2027-01-15T09:30 }'], ['Body']), 'due', 'America/Denver')
    expect(c.issues).toEqual([])
    // 09:30 MST (UTC−7) is 16:30 UTC.
    expect(c.dueAt?.toISOString()).toBe('2027-01-15T16:30:00.000Z')
    const zoned = checkModule(
      module(['title: Due', 'due: { at: 2027-01-15T09:30, timeZone: Europe/Berlin }'], ['Body']),
      'due',
      'America/Denver',
    )
    // 09:30 CET (UTC+1) is 08:30 UTC.
    expect(zoned.dueAt?.toISOString()).toBe('2027-01-15T08:30:00.000Z')
  })

  it('previews a module whose front matter is invalid, under the title it could read', () => {
    const c = checkModule(module(['title: Half done', 'attempts: -1'], ['# Still shown']), 'half', 'UTC')
    expect(c.frontMatter).toBeNull()
    expect(c.title).toBe('Half done')
    // Module headings sit one level below the page's title.
    expect(c.html).toContain('<h2>Still shown</h2>')
    expect(c.issues.map((i) => i.path)).toEqual(['attempts'])
  })

  it('falls back to the module name when nothing can be read', () => {
    const c = checkModule('no front matter at all', 'nameless', 'UTC')
    expect(c.title).toBe('nameless')
    expect(c.html).toBe('')
    expect(c.issues).toHaveLength(1)
  })
})

describe('checkModule for the editor preview (sourceLines)', () => {
  // Lines: 1 ---, 2 title, 3 ---, 4 heading, 5 blank, 6–7 paragraph, 8 blank, 9 list, 10 blank, 11–12 calculator.
  const source = module(
    ['title: Lines'],
    [
      '# Heading',
      '',
      'First line of a paragraph',
      'and its second line.',
      '',
      '- an item',
      '',
      '```calculator nozzle',
      '```',
    ],
  )

  it('marks each block with the source line it starts on, counted in the whole source', () => {
    const { html } = checkModule(source, 'lines', 'UTC', { sourceLines: true })
    expect(html).toContain('<h2 data-source-line="4">Heading</h2>')
    expect(html).toContain('<p data-source-line="6">First line of a paragraph')
    expect(html).toContain('<ul data-source-line="9">')
    expect(html).toMatch(/<div class="isentrope-calculator"[^>]* data-source-line="11"/)
  })

  it('leaves the stored HTML without line marks', () => {
    const { html } = checkModule(source, 'lines', 'UTC')
    expect(html).toContain('<h2>Heading</h2>')
    expect(html).not.toContain('data-source-line')
  })
})

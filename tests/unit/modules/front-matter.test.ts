import { describe, expect, it } from 'vitest'
import { MAX_SOURCE_BYTES, parseModuleSource } from '../../../shared/modules/front-matter'
import type { ModuleIssue, ParsedModule } from '../../../shared/modules/front-matter'

/** A module source from front-matter lines and body lines. */
function source(frontMatter: string[], body: string[] = ['# Body']): string {
  return ['---', ...frontMatter, '---', ...body].join('\n')
}

function errorsOf(parsed: ParsedModule): ModuleIssue[] {
  if (parsed.ok) throw new Error('expected the module to be refused')
  return parsed.errors
}

function issueAt(parsed: ParsedModule, path: string): ModuleIssue {
  const found = errorsOf(parsed).find((e) => e.path === path)
  if (!found) throw new Error(`no issue at ${path}; issues: ${JSON.stringify(errorsOf(parsed))}`)
  return found
}

const ASSIGNMENT_HEAD = [
  'title: Lab',
  'assignment:',
  '  tables:',
  '    - key: run',
  '      label: Run log',
  '      columns:',
  '        - { key: t, label: Time, unit: s, role: time }',
  '        - { key: thrust, label: Thrust, unit: N }',
  '  measurements:',
  '    - { key: p_ambient, label: Barometer, unit: kPa, pressure: absolute, role: ambient-pressure }',
]

describe('parseModuleSource: splitting and defaults', () => {
  it('returns the front matter with its defaults filled in, and the body after the closing line', () => {
    const parsed = parseModuleSource(source(['title: Nozzle flow'], ['# Heading', '', 'Text.']), 'nozzle')
    expect(parsed.ok).toBe(true)
    if (!parsed.ok) return
    expect(parsed.frontMatter).toEqual({
      title: 'Nozzle flow',
      attempts: 3,
      results: 'immediately',
      showExpected: false,
      groupSubmission: false,
      standRuns: 0,
      requiresSignedRun: false,
    })
    expect(parsed.body).toBe('# Heading\n\nText.')
    // ---, title, --- → the body starts on line 4.
    expect(parsed.bodyLine).toBe(4)
  })

  it('reads results: when-final, and the older name after-release as when-final', () => {
    for (const written of ['when-final', 'after-release']) {
      const parsed = parseModuleSource(source(['title: Lab', `results: ${written}`]), 'lab')
      expect(parsed.ok).toBe(true)
      if (!parsed.ok) return
      expect(parsed.frontMatter.results).toBe('when-final')
    }
    const wrong = parseModuleSource(source(['title: Lab', 'results: later']), 'lab')
    expect(issueAt(wrong, 'results').message).toContain('when-final')
    expect(issueAt(wrong, 'results').message).not.toContain('after-release')
  })

  it('accepts Windows line endings and a byte-order mark', () => {
    const parsed = parseModuleSource('\uFEFF---\r\ntitle: Windows\r\n---\r\nBody\r\n', 'win')
    expect(parsed.ok).toBe(true)
    if (parsed.ok) {
      expect(parsed.frontMatter.title).toBe('Windows')
      expect(parsed.body).toBe('Body\n')
    }
  })

  it('refuses a source without front matter, pointing at line 1', () => {
    const [error] = errorsOf(parseModuleSource('# Just Markdown', 'plain'))
    expect(error?.line).toBe(1)
    expect(error?.message).toMatch(/^plain: /)
    expect(error?.message).toContain('---')
  })

  it('refuses front matter that is never closed', () => {
    const [error] = errorsOf(parseModuleSource('---\ntitle: Open\n# Body', 'open'))
    expect(error?.message).toContain('not closed')
  })

  it('refuses an empty front matter and one that is not a set of fields', () => {
    expect(errorsOf(parseModuleSource('---\n---\nBody', 'empty'))[0]?.message).toContain('empty')
    expect(errorsOf(parseModuleSource('---\n- a\n- b\n---\nBody', 'list'))[0]?.message).toContain('"name: value"')
  })
})

describe('parseModuleSource: YAML errors', () => {
  it('reports a YAML syntax error with its line in the whole source', () => {
    // Line 1 is ---, so the broken flow sequence on YAML line 2 is source line 3.
    const parsed = parseModuleSource(source(['title: Broken', 'tags: [a, b', 'attempts: 2']), 'broken')
    const [error] = errorsOf(parsed)
    expect(error?.message).toMatch(/^broken: the YAML cannot be read at line \d+/)
    expect(error?.line).toBeGreaterThanOrEqual(3)
  })

  it('reports a key given twice, at the second one', () => {
    const [error] = errorsOf(parseModuleSource(source(['title: One', 'title: Two']), 'twice'))
    expect(error?.line).toBe(3)
    expect(error?.message).toContain('unique')
  })

  it('refuses a YAML alias bomb instead of expanding it', () => {
    const bomb = [
      'title: Bomb',
      'a: &a [x, x, x, x, x, x, x, x, x, x]',
      'b: &b [*a, *a, *a, *a, *a, *a, *a, *a, *a, *a]',
      'c: &c [*b, *b, *b, *b, *b, *b, *b, *b, *b, *b]',
      'd: &d [*c, *c, *c, *c, *c, *c, *c, *c, *c, *c]',
      'e: [*d, *d, *d, *d, *d, *d, *d, *d, *d, *d]',
    ]
    const [error] = errorsOf(parseModuleSource(source(bomb), 'bomb'))
    expect(error?.message).toContain('alias')
  })

  it('refuses a YAML tag it does not know instead of reading it as text', () => {
    const [error] = errorsOf(parseModuleSource(source(['title: !!js/function "x"']), 'tag'))
    expect(error?.message).toContain('tag')
  })
})

describe('parseModuleSource: size limit', () => {
  it('refuses a source over 1 MB counted in UTF-8 bytes, not characters', () => {
    // 'é' is 2 bytes: 600 000 of them are 1.2 MB but only 600 000 characters.
    const big = source(['title: Big'], ['é'.repeat(600_000)])
    expect(big.length).toBeLessThan(MAX_SOURCE_BYTES)
    const [error] = errorsOf(parseModuleSource(big, 'big'))
    expect(error?.message).toContain('larger than 1 MB')
  })

  it('accepts a source of exactly 1 048 576 bytes', () => {
    const head = source(['title: Exact'], [''])
    const exact = head + 'a'.repeat(MAX_SOURCE_BYTES - head.length)
    expect(parseModuleSource(exact, 'exact').ok).toBe(true)
    expect(parseModuleSource(exact + 'a', 'exact').ok).toBe(false)
  })
})

describe('parseModuleSource: front-matter fields', () => {
  it('names the module, the path and the line of a tolerance that gives neither kind', () => {
    const parsed = parseModuleSource(
      source([
        ...ASSIGNMENT_HEAD,
        '  results:',
        '    - key: impulse',
        '      label: Total impulse',
        '      unit: N*s',
        '      expected: totalImpulse(t, thrust)',
        '      tolerance: {}',
        '      points: 2',
      ]),
      'cold-flow',
    )
    const issue = issueAt(parsed, 'assignment.results[0].tolerance')
    expect(issue.message).toBe(
      'cold-flow: assignment.results[0].tolerance: give a relative tolerance, an absolute tolerance, or both',
    )
    // ---, 10 head lines, results:, key, label, unit, expected, tolerance → line 17.
    expect(issue.line).toBe(17)
  })

  it('names a key used twice and where it was first used', () => {
    const parsed = parseModuleSource(
      source([
        ...ASSIGNMENT_HEAD,
        '  results:',
        '    - { key: thrust, label: Peak, unit: N, expected: max(thrust), tolerance: { relative: 0.02 }, points: 1 }',
      ]),
      'dup',
    )
    const issue = issueAt(parsed, 'assignment.results[0].key')
    expect(issue.message).toContain('"thrust"')
    expect(issue.message).toContain('assignment.tables[0].columns[1]')
  })

  it('requires a pressure column to say gauge or absolute, and refuses the word on other units', () => {
    const parsed = parseModuleSource(
      source([
        'title: Lab',
        'assignment:',
        '  tables:',
        '    - key: run',
        '      label: Run',
        '      columns:',
        '        - { key: pc, label: Chamber, unit: kPa }',
        '        - { key: thrust, label: Thrust, unit: N, pressure: gauge }',
      ]),
      'p',
    )
    expect(issueAt(parsed, 'assignment.tables[0].columns[0].pressure').message).toContain('gauge or absolute')
    expect(issueAt(parsed, 'assignment.tables[0].columns[1].pressure').message).toContain('only to pressure units')
  })

  it('refuses gauge pressures when no measurement is the ambient pressure', () => {
    const parsed = parseModuleSource(
      source([
        'title: Lab',
        'assignment:',
        '  measurements:',
        '    - { key: p_initial, label: Initial, unit: psi, pressure: gauge }',
      ]),
      'g',
    )
    expect(issueAt(parsed, 'assignment.measurements').message).toContain('role: ambient-pressure')
  })

  it('refuses an ambient pressure that is not an absolute pressure', () => {
    const parsed = parseModuleSource(
      source([
        'title: Lab',
        'assignment:',
        '  measurements:',
        '    - { key: pa, label: Barometer, unit: kPa, pressure: gauge, role: ambient-pressure }',
      ]),
      'a',
    )
    expect(issueAt(parsed, 'assignment.measurements[0].role').message).toContain('absolute')
  })

  it('refuses a unit that is not in the unit table and lists the ones that are', () => {
    const parsed = parseModuleSource(
      source(['title: Lab', 'assignment:', '  measurements:', '    - { key: length, label: Length, unit: furlong }']),
      'u',
    )
    const message = issueAt(parsed, 'assignment.measurements[0].unit').message
    expect(message).toContain('psi')
    expect(message).toContain('mm')
  })

  it('lets results use derived units such as N*s but refuses them for data', () => {
    const parsed = parseModuleSource(
      source([
        ...ASSIGNMENT_HEAD,
        '    - { key: impulse_guess, label: Guess, unit: N*s }',
        '  results:',
        '    - key: impulse',
        '      label: Total impulse',
        '      unit: N*s',
        '      expected: totalImpulse(t, thrust)',
        '      tolerance: { relative: 0.03 }',
        '      points: 1',
      ]),
      'units',
    )
    const errors = errorsOf(parsed)
    expect(errors.map((e) => e.path)).toEqual(['assignment.measurements[1].unit'])
  })

  it('refuses a column or measurement key that would hide a function, but not a table key', () => {
    const parsed = parseModuleSource(
      source([
        'title: Lab',
        'assignment:',
        '  tables:',
        '    - key: log',
        '      label: Log',
        '      columns:',
        '        - { key: max, label: Maximum, unit: N }',
      ]),
      'r',
    )
    expect(errorsOf(parsed).map((e) => e.path)).toEqual(['assignment.tables[0].columns[0].key'])
  })

  it('refuses a key that is not an identifier', () => {
    const parsed = parseModuleSource(
      source(['title: Lab', 'assignment:', '  measurements:', '    - { key: Throat-Diameter, label: D, unit: mm }']),
      'k',
    )
    expect(issueAt(parsed, 'assignment.measurements[0].key').message).toContain('lower-case letter')
  })

  it('names an unknown field, points at its line and lists the allowed ones', () => {
    const parsed = parseModuleSource(source(['title: Lab', 'atempts: 3']), 'typo')
    const issue = errorsOf(parsed)[0]
    expect(issue?.message).toContain('"atempts"')
    expect(issue?.message).toContain('attempts')
    expect(issue?.line).toBe(3)
  })

  it('says what type was expected in plain words', () => {
    const issue = issueAt(parseModuleSource(source(['title: Lab', 'attempts: three']), 't'), 'attempts')
    expect(issue.message).toContain('should be a number')
    expect(issue.message).toContain('"three"')
  })

  it('refuses a relative tolerance written as a percentage', () => {
    const parsed = parseModuleSource(
      source([
        ...ASSIGNMENT_HEAD,
        '  results:',
        '    - { key: peak, label: Peak, unit: N, expected: max(thrust), tolerance: { relative: 5 }, points: 1 }',
      ]),
      'pct',
    )
    expect(issueAt(parsed, 'assignment.results[0].tolerance.relative').message).toContain('0.05')
  })

  it('refuses partial credit within a multiple of the tolerance that is not above 1', () => {
    const parsed = parseModuleSource(
      source([
        ...ASSIGNMENT_HEAD,
        '  results:',
        '    - key: peak',
        '      label: Peak',
        '      unit: N',
        '      expected: max(thrust)',
        '      tolerance: { relative: 0.02 }',
        '      points: 1',
        '      partial: { within: 1, fraction: 0.5 }',
      ]),
      'partial',
    )
    expect(issueAt(parsed, 'assignment.results[0].partial.within').message).toContain('greater than 1')
  })
})

describe('parseModuleSource: dates', () => {
  it('accepts a due date with an IANA zone, and one without (the course zone applies later)', () => {
    const withZone = parseModuleSource(
      source(['title: Lab', 'due: { at: 2027-02-09T17:00, timeZone: America/Denver }']),
      'd',
    )
    expect(withZone.ok && withZone.frontMatter.due).toEqual({ at: '2027-02-09T17:00', timeZone: 'America/Denver' })
    const withoutZone = parseModuleSource(source(['title: Lab', 'due: { at: 2027-02-09T17:00 }']), 'd')
    expect(withoutZone.ok).toBe(true)
  })

  it('refuses a date that does not exist and a zone that does not exist', () => {
    const parsed = parseModuleSource(
      source(['title: Lab', 'due: { at: 2027-02-29T17:00, timeZone: Mars/Olympus_Mons }']),
      'd',
    )
    expect(issueAt(parsed, 'due.at').message).toContain('2027-02-09T17:00')
    expect(issueAt(parsed, 'due.timeZone').message).toContain('IANA')
  })

  it('refuses a late policy without a due date, and a late limit before the due date', () => {
    const noDue = parseModuleSource(source(['title: Lab', 'late: { penaltyPerDay: 0.1 }']), 'late')
    expect(issueAt(noDue, 'late').message).toContain('due date')
    const early = parseModuleSource(
      source([
        'title: Lab',
        'due: { at: 2027-02-09T17:00 }',
        'late: { acceptUntil: 2027-02-09T16:59, penaltyPerDay: 0.1 }',
      ]),
      'late',
    )
    expect(issueAt(early, 'late.acceptUntil').message).toContain('after the due date')
  })

  it('refuses results shown after the due date when there is none', () => {
    expect(issueAt(parseModuleSource(source(['title: Lab', 'results: after-due']), 'r'), 'results').message).toContain(
      'due date',
    )
  })
})

import { describe, expect, it } from 'vitest'
import { parseModuleSource } from '../../../shared/modules/front-matter'
import type { ParsedModule } from '../../../shared/modules/front-matter'

function source(frontMatter: string[]): string {
  return ['---', 'title: Stand run', ...frontMatter, '---', '# Body'].join('\n')
}

const parse = (lines: string[]): ParsedModule => parseModuleSource(source(lines), 'stand-run')

function messageAt(parsed: ParsedModule, path: string): string {
  if (parsed.ok) throw new Error('expected the lab sheet to be refused')
  const found = parsed.errors.find((e) => e.path === path)
  if (!found) throw new Error(`no issue at ${path}; issues: ${JSON.stringify(parsed.errors)}`)
  return found.message
}

describe('stand fields of the front matter', () => {
  it('reads the runs, the checklist with its staff items and hold points, and the signed-run rule', () => {
    const parsed = parse([
      'standRuns: 2',
      'requiresSignedRun: true',
      'checklist:',
      '  - { key: leak-check, text: Leak check passed, staff: true, hold: true }',
      '  - { key: hearing, text: Hearing protection on }',
    ])
    if (!parsed.ok) throw new Error(JSON.stringify(parsed.errors))
    expect(parsed.frontMatter.standRuns).toBe(2)
    expect(parsed.frontMatter.requiresSignedRun).toBe(true)
    expect(parsed.frontMatter.checklist).toEqual([
      { key: 'leak-check', text: 'Leak check passed', staff: true, hold: true },
      { key: 'hearing', text: 'Hearing protection on', staff: false, hold: false },
    ])
  })

  it('leaves a sheet without stand fields off the stand', () => {
    const parsed = parse([])
    if (!parsed.ok) throw new Error(JSON.stringify(parsed.errors))
    expect(parsed.frontMatter.standRuns).toBe(0)
    expect(parsed.frontMatter.requiresSignedRun).toBe(false)
    expect(parsed.frontMatter.checklist).toBeUndefined()
  })

  it('names a repeated item key, a bad key, an empty item and a missing run count', () => {
    const repeated = parse([
      'standRuns: 1',
      'checklist:',
      '  - { key: gas-off, text: Gas off }',
      '  - { key: gas-off, text: Again }',
    ])
    expect(messageAt(repeated, 'checklist[1].key')).toMatch(/"gas-off" is used twice/)

    const badKey = parse(['standRuns: 1', 'checklist:', '  - { key: Gas Off, text: Gas off }'])
    expect(messageAt(badKey, 'checklist[0].key')).toMatch(/lower-case/)

    const empty = parse(['standRuns: 1', 'checklist:', '  - { key: gas-off, text: "  " }'])
    expect(messageAt(empty, 'checklist[0].text')).toMatch(/needs its words/)

    const noRuns = parse(['requiresSignedRun: true', 'checklist:', '  - { key: a, text: A }'])
    expect(messageAt(noRuns, 'checklist')).toMatch(/standRuns/)
    expect(messageAt(noRuns, 'requiresSignedRun')).toMatch(/standRuns/)
  })
})

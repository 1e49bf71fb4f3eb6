import { describe, expect, it } from 'vitest'
import { checkModule } from '../../../shared/modules/check'
import { ExpressionError, evaluateExpression } from '../../../shared/modules/expressions'
import { MAX_EXPRESSION_LENGTH, MAX_LIST_VALUES, MAX_RESULTS, MAX_REVIEW_RULES } from '../../../shared/modules/schema'

/**
 * The size budgets a module's assignment must keep when it is saved: expression length, values
 * written out in one list, number of results and of review rules. Each refusal names the result or
 * rule and the limit. The limits are the product's own choices (40, 40, 64, 2000 characters);
 * they are written out here so a change to them is a deliberate one.
 */

const module = (frontMatter: string[]) => ['---', ...frontMatter, '---', '# Lab'].join('\n')

function spec(opts: {
  minRows?: number
  results?: { key: string; expected: string }[]
  rules?: { key: string; when: string }[]
}): string[] {
  const lines = [
    'title: Budget lab',
    'assignment:',
    '  tables:',
    '    - key: run',
    '      label: Run',
    `      minRows: ${opts.minRows ?? 10}`,
    '      columns:',
    '        - { key: t, label: Time, unit: s, role: time }',
    '        - { key: thrust, label: Thrust, unit: N }',
    '  results:',
  ]
  for (const r of opts.results ?? [{ key: 'impulse', expected: 'totalImpulse(t, thrust)' }]) {
    lines.push(
      `    - key: ${r.key}`,
      '      label: A result',
      '      unit: N',
      `      expected: "${r.expected}"`,
      '      tolerance: { relative: 0.05 }',
      '      points: 1',
    )
  }
  if (opts.rules) {
    lines.push('  reviewRules:')
    for (const r of opts.rules)
      lines.push(`    - key: ${r.key}`, `      when: "${r.when}"`, '      reason: Looks wrong.')
  }
  return lines
}

const issuesOf = (opts: Parameters<typeof spec>[0]) => checkModule(module(spec(opts)), 'budget-lab', 'UTC').issues
/** A list literal of n numbers, e.g. [1, 2, 3]. */
const list = (n: number) => `[${Array.from({ length: n }, (_, i) => i + 1).join(', ')}]`
/** A column matrix literal of n rows, e.g. [[1], [2]]. */
const columnMatrix = (n: number) => `[${Array.from({ length: n }, (_, i) => `[${i + 1}]`).join(', ')}]`

describe('the limits are the product’s chosen values', () => {
  it('2000 characters, 64 list values, 40 results, 40 review rules', () => {
    expect([MAX_EXPRESSION_LENGTH, MAX_LIST_VALUES, MAX_RESULTS, MAX_REVIEW_RULES]).toEqual([2000, 64, 40, 40])
  })
})

describe('expression length', () => {
  // 1 + 1 + … + 1: 2001 characters.
  const long = `${'1 + '.repeat(500)}1`
  it('an expected-value expression over 2000 characters is refused, naming the result and the limit', () => {
    const [issue, ...rest] = issuesOf({
      results: [{ key: 'impulse', expected: `totalImpulse(t, thrust) + ${'0 + '.repeat(500)}0` }],
    })
    expect(rest).toEqual([])
    expect(issue!.path).toBe('assignment.results[0].expected')
    expect(issue!.message).toMatch(/result "impulse": the expression has 2\d{3} characters; at most 2000 are allowed/)
  })

  it('a review rule over 2000 characters is refused, naming the rule and the limit', () => {
    const issues = issuesOf({ rules: [{ key: 'too_long', when: `max(thrust) > ${long}` }] })
    expect(issues).toHaveLength(1)
    expect(issues[0]!.path).toBe('assignment.reviewRules[0].when')
    expect(issues[0]!.message).toContain('review rule "too_long"')
    expect(issues[0]!.message).toContain('at most 2000')
  })
})

describe('values written out in one list', () => {
  it('a list of 64 values is accepted', () => {
    expect(issuesOf({ results: [{ key: 'weighted', expected: `sum(${list(64)}) * max(thrust)` }] })).toEqual([])
  })

  it('a list of 65 values is refused, naming the result and the limit', () => {
    const issues = issuesOf({ results: [{ key: 'weighted', expected: `sum(${list(65)}) * max(thrust)` }] })
    expect(issues).toHaveLength(1)
    expect(issues[0]!.path).toBe('assignment.results[0].expected')
    expect(issues[0]!.message).toContain(
      'result "weighted": a list written out in the expression has 65 values; at most 64',
    )
  })

  it('a 200-row column matrix times a logged column is refused before anything runs it', () => {
    const issues = issuesOf({
      results: [{ key: 'blowup', expected: `sum(${columnMatrix(200)} * [thrust])` }],
      rules: [{ key: 'nested', when: `sum([${list(40)}, ${list(40)}]) > 0` }],
    })
    expect(issues.map((i) => i.path)).toEqual(['assignment.results[0].expected', 'assignment.reviewRules[0].when'])
    expect(issues[0]!.message).toContain('has 200 values; at most 64')
    // The entries of nested lists count together: 2 × 40 = 80.
    expect(issues[1]!.message).toContain('review rule "nested": a list written out in the expression has 80 values')
  })

  it('the same limit holds when a stored expression is evaluated for grading', () => {
    const run = () => evaluateExpression(`sum(${columnMatrix(200)} * [thrust])`, { thrust: [1, 2, 3] })
    expect(run).toThrow(ExpressionError)
    expect(run).toThrow(/200 values; at most 64/)
    expect(evaluateExpression(`sum(${columnMatrix(3)} * [thrust])`, { thrust: [1, 2, 3] })).toBe(36)
  })
})

describe('how many results and review rules', () => {
  const results = (n: number) => Array.from({ length: n }, (_, i) => ({ key: `r${i + 1}`, expected: 'max(thrust)' }))
  const rules = (n: number) => Array.from({ length: n }, (_, i) => ({ key: `rule${i + 1}`, when: 'max(thrust) > 100' }))

  it('40 results and 40 review rules are accepted', () => {
    expect(issuesOf({ results: results(40), rules: rules(40) })).toEqual([])
  })

  it('41 results are refused, naming the limit and the first result over it', () => {
    const issues = issuesOf({ results: results(41) })
    expect(issues).toHaveLength(1)
    expect(issues[0]!.path).toBe('assignment.results')
    expect(issues[0]!.message).toContain('at most 40 results; this one has 41; the first over the limit is "r41"')
  })

  it('100 results are refused without running any of them', () => {
    // An expression that would fail its trial run: if any result had been run, its issue would show.
    const issues = issuesOf({ results: results(100).map((r) => ({ ...r, expected: 'at(thrust, 5000)' })) })
    expect(issues.map((i) => i.path)).toEqual(['assignment.results'])
    expect(issues[0]!.message).toContain('this one has 100')
  })

  it('41 review rules are refused, naming the limit and the first rule over it', () => {
    const issues = issuesOf({ rules: rules(41) })
    expect(issues).toHaveLength(1)
    expect(issues[0]!.path).toBe('assignment.reviewRules')
    expect(issues[0]!.message).toContain(
      'at most 40 review rules; this one has 41; the first over the limit is "rule41"',
    )
  })
})

describe('the trial run at save time uses small made-up tables', () => {
  // sum(thrust ./ thrust) is the number of rows: this is finite on a small table and infinite on
  // one of exactly 2000 rows, so it shows which one the trial ran on.
  it('with minRows: 2000 the expressions are not run on a 2000-row table', () => {
    expect(
      issuesOf({ minRows: 2000, results: [{ key: 'rows', expected: '1 / (sum(thrust ./ thrust) - 2000)' }] }),
    ).toEqual([])
  })

  it('an expression that counts on the rows minRows promises is still accepted', () => {
    // Sample 1500 exists in every hand-in of a table with minRows: 2000, though not in the small table.
    expect(issuesOf({ minRows: 2000, results: [{ key: 'late_sample', expected: 'at(thrust, 1500)' }] })).toEqual([])
    const [beyond] = issuesOf({ minRows: 2000, results: [{ key: 'late_sample', expected: 'at(thrust, 2500)' }] })
    expect(beyond!.message).toContain('the index must be a whole number from 1 to 2000')
  })
})

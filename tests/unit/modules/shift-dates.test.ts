import { describe, expect, it } from 'vitest'
import { shiftFrontMatterDates, shiftLocalDateTime } from '../../../shared/modules/shift-dates'
import { weeksBetween } from '../../../shared/schemas/course-rollover'

// Expected dates counted on a calendar: 2027-12-28 + 1 week = 2028-01-04; 2028-02-24 + 1 week =
// 2028-03-02 (2028 is a leap year); 2027-03-09 − 2 weeks = 2027-02-23.
describe('moving a local date-time by whole weeks', () => {
  it('crosses month and year ends, leap days, and keeps the wall-clock time', () => {
    expect(shiftLocalDateTime('2027-12-28T17:00', 1)).toBe('2028-01-04T17:00')
    expect(shiftLocalDateTime('2028-02-24T09:30:15', 1)).toBe('2028-03-02T09:30:15')
    expect(shiftLocalDateTime('2027-03-09T17:00', -2)).toBe('2027-02-23T17:00')
    expect(shiftLocalDateTime('2027-03-09T17:00', 0)).toBe('2027-03-09T17:00')
  })
  it('refuses what is not a real local date-time', () => {
    expect(shiftLocalDateTime('2027-02-30T17:00', 1)).toBeNull()
    expect(shiftLocalDateTime('2027-13-01T17:00', 1)).toBeNull()
    expect(shiftLocalDateTime('next Tuesday', 1)).toBeNull()
  })
})

describe('moving a sheet’s front-matter dates', () => {
  const source = [
    '---',
    '# a comment the author keeps',
    'title: "Cold flow"',
    'due:',
    '  at: "2027-02-23T17:00"   # Tuesday',
    '  timeZone: America/Denver',
    'late:',
    "  acceptUntil: '2027-02-26T17:00'",
    '  penaltyPerDay: 0.1',
    'attempts: 3',
    '---',
    '',
    'Due at: 2027-02-23T17:00 (body text is not touched)',
  ].join('\n')

  it('edits only the two values, in their own quoting, and leaves comments and the body alone', () => {
    const r = shiftFrontMatterDates(source, 27)
    expect(r.problems).toEqual([])
    expect(r.dates).toEqual([
      { path: 'due.at', from: '2027-02-23T17:00', to: '2027-08-31T17:00' },
      { path: 'late.acceptUntil', from: '2027-02-26T17:00', to: '2027-09-03T17:00' },
    ])
    expect(r.source).toBe(
      source
        .replace('  at: "2027-02-23T17:00"', '  at: "2027-08-31T17:00"')
        .replace("acceptUntil: '2027-02-26T17:00'", "acceptUntil: '2027-09-03T17:00'"),
    )
  })

  it('reports a date it cannot move and leaves it as written', () => {
    const broken = source.replace('"2027-02-23T17:00"', '"end of February"')
    const r = shiftFrontMatterDates(broken, 1)
    expect(r.dates[0]).toMatchObject({ path: 'due.at', from: 'end of February', to: null })
    expect(r.dates[0]!.problem).toMatch(/due\.at .* not moved/)
    expect(r.source).toContain('at: "end of February"')
    expect(r.source).toContain("acceptUntil: '2027-03-05T17:00'")
  })

  it('moves nothing in a sheet without dates or without front matter', () => {
    expect(shiftFrontMatterDates('---\ntitle: Reading\n---\nText', 3)).toEqual({
      source: '---\ntitle: Reading\n---\nText',
      dates: [],
      problems: [],
    })
    expect(shiftFrontMatterDates('No front matter', 3).problems).toHaveLength(1)
  })
})

describe('the proposed shift between two terms’ start dates', () => {
  it('is the nearest whole number of weeks', () => {
    expect(weeksBetween('2027-01-25', '2027-08-30')).toBe(31)
    expect(weeksBetween('2027-01-25', '2027-01-28')).toBe(0)
    expect(weeksBetween('2027-08-30', '2027-01-25')).toBe(-31)
    expect(weeksBetween('2027-01-25', '')).toBeNull()
  })
})

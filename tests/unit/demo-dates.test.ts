import { describe, expect, it } from 'vitest'
import { currentDueDates, demoTerm } from '../../scripts/demo/seed-demo'

const SOURCE = `---
title: T
due:
  at: 2027-02-23T17:00
  timeZone: America/Denver
late:
  acceptUntil: 2027-02-26T17:00
  penaltyPerDay: 0.1
---
Body mentions 2027-02-23T17:00 in text, which stays.
`

describe('demo due dates', () => {
  it('moves the dates by whole weeks so the first due date is two to three weeks ahead', () => {
    const now = new Date('2026-12-01T12:00:00Z')
    const out = currentDueDates(SOURCE, now)
    const due = /at: (\S+)/.exec(out)![1]!
    const until = /acceptUntil: (\S+)/.exec(out)![1]!
    const days = (Date.parse(`${due}:00Z`) - now.getTime()) / 86_400_000
    expect(days).toBeGreaterThanOrEqual(14)
    expect(days).toBeLessThan(21 + 1)
    // Same weekday (a Tuesday), same time, same three days of grace.
    expect(new Date(`${due}:00Z`).getUTCDay()).toBe(new Date('2027-02-23T17:00:00Z').getUTCDay())
    expect(due.endsWith('T17:00')).toBe(true)
    expect((Date.parse(`${until}:00Z`) - Date.parse(`${due}:00Z`)) / 86_400_000).toBe(3)
    expect(out).toContain('Body mentions 2027-02-23T17:00 in text, which stays.')
  })

  it('names the term after the weeks the shifted due dates fall in, not a fixed year', () => {
    // Seeded on 1 December 2026: the first due date lands in mid-December.
    expect(demoTerm(new Date('2026-12-01T12:00:00Z'))).toBe('Fall 2026')
    // Seeded late in December: the first due date is already in the new year.
    expect(demoTerm(new Date('2026-12-25T12:00:00Z'))).toBe('Winter 2027')
    expect(demoTerm(new Date('2031-06-05T08:00:00Z'))).toBe('Summer 2031')
    // The term and the shifted dates agree: the first due date is in the named year.
    const now = new Date('2029-08-25T12:00:00Z')
    const due = /at: (\S+)/.exec(currentDueDates(SOURCE, now))![1]!
    expect(demoTerm(now)).toBe(`Fall ${due.slice(0, 4)}`)
  })

  it('is stable for a given day', () => {
    const now = new Date('2031-06-05T08:00:00Z')
    expect(currentDueDates(SOURCE, now)).toBe(currentDueDates(SOURCE, now))
  })
})

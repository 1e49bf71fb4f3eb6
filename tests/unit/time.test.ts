import { describe, expect, it } from 'vitest'
import { formatInZone, zonedTimeToUtc } from '../../shared/time'

// Offsets are those of the IANA time-zone database: America/Denver is UTC−7 in winter (MST)
// and UTC−6 in summer (MDT); Europe/Berlin is UTC+1 in winter.
describe('zoned times', () => {
  it('converts a winter local time in Denver to UTC (MST, UTC−7)', () => {
    expect(zonedTimeToUtc('2027-02-09T17:00', 'America/Denver').toISOString()).toBe('2027-02-10T00:00:00.000Z')
  })

  it('converts a summer local time in Denver to UTC (MDT, UTC−6)', () => {
    expect(zonedTimeToUtc('2027-07-01T09:30', 'America/Denver').toISOString()).toBe('2027-07-01T15:30:00.000Z')
  })

  it('handles a zone east of UTC', () => {
    expect(zonedTimeToUtc('2027-01-15 08:00', 'Europe/Berlin').toISOString()).toBe('2027-01-15T07:00:00.000Z')
  })

  it('refuses text that is not a date-time, naming it', () => {
    expect(() => zonedTimeToUtc('next Tuesday', 'UTC')).toThrow(/"next Tuesday"/)
    expect(() => zonedTimeToUtc('2027-13-01T00:00', 'UTC')).toThrow(RangeError)
  })

  it('formats an instant in the course zone with its abbreviation', () => {
    const s = formatInZone(new Date('2027-02-10T00:00:00Z'), 'America/Denver')
    expect(s).toContain('17:00')
    expect(s).toContain('Feb 9, 2027')
    expect(s).toMatch(/MST|GMT-7/)
  })
})

/**
 * Wall-clock times in a named time zone ↔ UTC instants, with Intl only (no library, no DOM).
 * Due dates are written as local times in the course's zone ("2027-02-09T17:00",
 * "America/Denver") and stored as UTC instants.
 */

const LOCAL = /^(\d{4})-(\d{2})-(\d{2})[T ](\d{2}):(\d{2})(?::(\d{2}))?$/

function offsetMinutes(instant: number, timeZone: string): number {
  const parts = new Intl.DateTimeFormat('en-US', {
    timeZone,
    hourCycle: 'h23',
    year: 'numeric',
    month: '2-digit',
    day: '2-digit',
    hour: '2-digit',
    minute: '2-digit',
    second: '2-digit',
  }).formatToParts(new Date(instant))
  const get = (t: string) => Number(parts.find((p) => p.type === t)?.value ?? '0')
  const asUtc = Date.UTC(get('year'), get('month') - 1, get('day'), get('hour'), get('minute'), get('second'))
  return Math.round((asUtc - Math.floor(instant / 1000) * 1000) / 60_000)
}

/**
 * The UTC instant of a local wall-clock time in `timeZone`. In the hour skipped by a spring-forward
 * change the later offset is used; in the repeated autumn hour, the first occurrence.
 * @throws RangeError naming the value when it is not `YYYY-MM-DDTHH:mm[:ss]` or the zone is unknown.
 */
export function zonedTimeToUtc(local: string, timeZone: string): Date {
  const m = LOCAL.exec(local.trim())
  if (!m) throw new RangeError(`"${local}" is not a local date-time like 2027-02-09T17:00`)
  const [y, mo, d, h, mi, s] = m.slice(1).map((x) => Number(x ?? 0)) as [number, number, number, number, number, number]
  if (mo < 1 || mo > 12 || d < 1 || d > 31 || h > 23 || mi > 59 || s > 59) {
    throw new RangeError(`"${local}" is not a valid date and time`)
  }
  const guess = Date.UTC(y, mo - 1, d, h, mi, s)
  // Two passes settle the offset, including across a daylight-saving change.
  let t = guess - offsetMinutes(guess, timeZone) * 60_000
  t = guess - offsetMinutes(t, timeZone) * 60_000
  return new Date(t)
}

/** "Tue, Feb 9, 2027, 17:00 MST" style text for a UTC instant in a course's zone. */
export function formatInZone(instant: Date, timeZone: string, locale = 'en-US'): string {
  return new Intl.DateTimeFormat(locale, {
    timeZone,
    weekday: 'short',
    day: 'numeric',
    month: 'short',
    year: 'numeric',
    hour: '2-digit',
    minute: '2-digit',
    hourCycle: 'h23',
    timeZoneName: 'short',
  }).format(instant)
}

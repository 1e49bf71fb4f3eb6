/** Slot times as people read them, in the course's time zone. */
export function dayText(iso: string, timeZone: string): string {
  return new Intl.DateTimeFormat('en-GB', {
    timeZone,
    weekday: 'long',
    day: 'numeric',
    month: 'long',
    year: 'numeric',
  }).format(new Date(iso))
}

export function clockText(iso: string, minutes: number, timeZone: string): string {
  const f = new Intl.DateTimeFormat('en-GB', { timeZone, hour: '2-digit', minute: '2-digit', hourCycle: 'h23' })
  const start = new Date(iso)
  return `${f.format(start)}–${f.format(new Date(start.getTime() + minutes * 60_000))}`
}

export function whenText(iso: string, minutes: number, timeZone: string): string {
  return `${dayText(iso, timeZone)}, ${clockText(iso, minutes, timeZone)}`
}

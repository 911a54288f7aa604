// Dates in words: relative ("in 3 days") and absolute, the same on the server and in the browser.

const DAY = 86_400_000
// [unit, length in ms, span from which the unit is used]: two weeks read better as weeks than as 14 days.
const RTF_UNITS: [Intl.RelativeTimeFormatUnit, number, number][] = [
  ['year', 365 * DAY, 365 * DAY],
  ['month', 30 * DAY, 30 * DAY],
  ['week', 7 * DAY, 14 * DAY],
  ['day', DAY, DAY],
  ['hour', 3_600_000, 3_600_000],
]

/** "in 3 days", "2 hours ago", "tomorrow", "just now". */
export function formatRelative(at: number, now: number): string {
  const diff = at - now
  const abs = Math.abs(diff)
  if (abs < 45_000) return 'just now'
  const rtf = new Intl.RelativeTimeFormat('en', { numeric: 'auto' })
  for (const [unit, ms, from] of RTF_UNITS) {
    if (abs >= from) return rtf.format(Math.round(diff / ms), unit)
  }
  return rtf.format(Math.round(diff / 60_000) || Math.sign(diff), 'minute')
}

/** "Fri 12 Dec 2025, 18:00" (with `seconds`, "18:00:07") in the browser's zone, or UTC (marked) before hydration. */
export function formatAbsolute(at: number, local: boolean, seconds = false): string {
  const text = new Intl.DateTimeFormat('en-GB', {
    weekday: 'short', day: 'numeric', month: 'short', year: 'numeric', hour: '2-digit', minute: '2-digit',
    ...(seconds ? { second: '2-digit' } : {}),
    timeZone: local ? undefined : 'UTC',
  }).format(at)
  return local ? text : `${text} UTC`
}

// Telling apart takes sent close together: a list of times that would read the same to the minute
// shows seconds, and takes sent within the same second get an ordinal in the order they were sent.

export interface TimedRow { id: number, createdAt: string }

export interface TimeLabel {
  /** Show seconds beside the time (some rows share a minute). */
  seconds: boolean
  /** "1st", "2nd", … among rows sent in the same second (by time, then id); null when alone. */
  ordinal: string | null
}

/** English ordinal of a positive integer: 1st, 2nd, 3rd, 4th, 11th, 12th, 13th, 21st, 22nd. */
export function ordinal(n: number): string {
  const tens = n % 100
  if (tens >= 11 && tens <= 13) return `${n}th`
  return `${n}${({ 1: 'st', 2: 'nd', 3: 'rd' } as Record<number, string>)[n % 10] ?? 'th'}`
}

/** The label of each row, by id. */
export function timeLabels(rows: TimedRow[]): Map<number, TimeLabel> {
  const ms = rows.map(r => ({ id: r.id, at: Date.parse(r.createdAt) }))
  const count = (key: (at: number) => number) => {
    const m = new Map<number, number>()
    for (const r of ms) if (Number.isFinite(r.at)) m.set(key(r.at), (m.get(key(r.at)) ?? 0) + 1)
    return m
  }
  const minute = (at: number) => Math.floor(at / 60_000)
  const second = (at: number) => Math.floor(at / 1000)
  const perMinute = count(minute)
  const seconds = [...perMinute.values()].some(n => n > 1)
  const out = new Map<number, TimeLabel>()
  const bySecond = new Map<number, { id: number, at: number }[]>()
  for (const r of ms) {
    if (!Number.isFinite(r.at)) { out.set(r.id, { seconds, ordinal: null }); continue }
    const list = bySecond.get(second(r.at)) ?? []
    list.push(r)
    bySecond.set(second(r.at), list)
  }
  for (const list of bySecond.values()) {
    list.sort((a, b) => a.at - b.at || a.id - b.id)
    list.forEach((r, i) => out.set(r.id, { seconds, ordinal: list.length > 1 ? ordinal(i + 1) : null }))
  }
  return out
}

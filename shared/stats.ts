// Figures over many takes: quantiles, ISO weeks and the ensemble statistics. Pure (no I/O), so
// the server, the charts and the tests share one definition of every number.
import type { EnsembleStats, MemberStats, PlayerStats, StatHoldRow, StatTakeRow, WeekStats, WorstHold } from './types/stats'

/** Rounds to 0.01 (figures are shown to a tenth of a cent; two decimals keep sums honest). */
export const r2 = (v: number): number => Math.round(v * 100) / 100

/**
 * The p-quantile (0–1) of ascending values by linear interpolation between closest ranks,
 * h = (n − 1)·p (Hyndman & Fan 1996, "Sample quantiles in statistical packages", type 7; the
 * default of R's quantile() and of spreadsheet PERCENTILE.INC). NaN for no values.
 */
export function quantileSorted(sorted: ArrayLike<number>, p: number): number {
  const n = sorted.length
  if (n === 0) return Number.NaN
  const h = (n - 1) * Math.min(1, Math.max(0, p))
  const lo = Math.floor(h)
  const hi = Math.min(n - 1, lo + 1)
  return sorted[lo]! + (h - lo) * (sorted[hi]! - sorted[lo]!)
}

/** Five-number summary and mean of a member's cents (values need not be sorted; n ≥ 1). */
export function summarise(member: string, values: number[]): MemberStats {
  const sorted = Float64Array.from(values).sort()
  let sum = 0
  for (const v of sorted) sum += v
  return {
    member,
    n: sorted.length,
    meanCents: r2(sum / sorted.length),
    medianCents: r2(quantileSorted(sorted, 0.5)),
    q1: r2(quantileSorted(sorted, 0.25)),
    q3: r2(quantileSorted(sorted, 0.75)),
    min: r2(sorted[0]!),
    max: r2(sorted[sorted.length - 1]!),
  }
}

/** The Monday (UTC) of the ISO 8601 week holding the instant, as YYYY-MM-DD. */
export function isoWeekStart(iso: string): string {
  const d = new Date(iso)
  const day = d.getUTCDay() // 0 = Sunday
  const back = (day + 6) % 7
  const monday = new Date(Date.UTC(d.getUTCFullYear(), d.getUTCMonth(), d.getUTCDate() - back))
  return monday.toISOString().slice(0, 10)
}

/** Order of chord members in every list: the chord's own order, then anything else by name. */
const MEMBER_ORDER = ['root', 'third', 'fifth', 'seventh', 'ninth', 'eleventh', 'thirteenth']
function memberRank(m: string): number {
  const i = MEMBER_ORDER.indexOf(m)
  return i < 0 ? MEMBER_ORDER.length : i
}

/** How many of the holds most often out of tolerance are listed. */
export const WORST_HOLDS = 20

interface Acc { n: number, sum: number, abs: number, within: number }
const acc = (): Acc => ({ n: 0, sum: 0, abs: 0, within: 0 })
function add(a: Acc, r: StatHoldRow) {
  a.n++
  a.sum += r.centsFromTarget
  a.abs += Math.abs(r.centsFromTarget)
  if (r.withinTolerance) a.within++
}

/**
 * The ensemble statistics from takes and their scored hold rows (found, not wrong notes). A take
 * counts once; weeks are keyed by the take's submission time (ISO week, UTC).
 */
export class StatsBuilder {
  private takes = new Set<number>()
  private holds = 0
  private members = new Map<string, number[]>()
  private players = new Map<number, { name: string, section: string | null, takes: Set<number>, a: Acc }>()
  private weeks = new Map<string, { takes: Set<number>, a: Acc }>()
  private holdsByKey = new Map<string, { drillId: number, chordIndex: number, part: string, member: string | null, sections: Set<string>, a: Acc }>()
  private seen = new Map<number, { player: { a: Acc }, week: { a: Acc } }>()

  /** Counts a take (once, however often it is added), scored holds or not. */
  addTake(t: StatTakeRow): { player: { a: Acc }, week: { a: Acc } } {
    const known = this.seen.get(t.takeId)
    if (known) return known
    this.takes.add(t.takeId)
    let p = this.players.get(t.userId)
    if (!p) this.players.set(t.userId, p = { name: t.player, section: t.section, takes: new Set(), a: acc() })
    p.takes.add(t.takeId)
    const wk = isoWeekStart(t.submittedAt)
    let w = this.weeks.get(wk)
    if (!w) this.weeks.set(wk, w = { takes: new Set(), a: acc() })
    w.takes.add(t.takeId)
    const out = { player: p, week: w }
    this.seen.set(t.takeId, out)
    return out
  }

  /** Adds one scored hold (and counts its take). */
  add(r: StatHoldRow): void {
    if (!Number.isFinite(r.centsFromTarget)) return
    const { player, week } = this.addTake(r)
    this.holds++
    if (r.member) {
      let list = this.members.get(r.member)
      if (!list) this.members.set(r.member, list = [])
      list.push(r.centsFromTarget)
    }
    add(player.a, r)
    add(week.a, r)
    const key = `${r.drillId}\u0000${r.chordIndex}\u0000${r.part}`
    let h = this.holdsByKey.get(key)
    if (!h) this.holdsByKey.set(key, h = { drillId: r.drillId, chordIndex: r.chordIndex, part: r.part, member: r.member, sections: new Set(), a: acc() })
    if (r.section) h.sections.add(r.section)
    add(h.a, r)
  }

  result(): EnsembleStats {
    const members: MemberStats[] = [...this.members.entries()]
      .sort(([a], [b]) => memberRank(a) - memberRank(b) || a.localeCompare(b))
      .map(([m, values]) => summarise(m, values))
    const players: PlayerStats[] = [...this.players.entries()]
      .map(([userId, p]) => ({
        userId,
        name: p.name,
        section: p.section,
        takes: p.takes.size,
        holds: p.a.n,
        meanAbsCents: p.a.n ? r2(p.a.abs / p.a.n) : null,
        meanCents: p.a.n ? r2(p.a.sum / p.a.n) : null,
        withinShare: p.a.n ? r2(p.a.within / p.a.n) : null,
      }))
      .sort((a, b) => (a.section ?? '').localeCompare(b.section ?? '') || a.name.localeCompare(b.name) || a.userId - b.userId)
    const weeks: WeekStats[] = [...this.weeks.entries()]
      .sort(([a], [b]) => a.localeCompare(b))
      .map(([weekStart, w]) => ({ weekStart, takes: w.takes.size, meanAbsCents: w.a.n ? r2(w.a.abs / w.a.n) : null, meanCents: w.a.n ? r2(w.a.sum / w.a.n) : null }))
    const worstHolds: WorstHold[] = [...this.holdsByKey.values()]
      .map(h => ({ drillId: h.drillId, chordIndex: h.chordIndex, part: h.part, member: h.member, sections: [...h.sections].sort((a, b) => a.localeCompare(b)), n: h.a.n, outShare: (h.a.n - h.a.within) / h.a.n, meanCents: h.a.sum / h.a.n }))
      .filter(h => h.outShare > 0)
      .sort((a, b) => b.outShare - a.outShare || b.n - a.n || Math.abs(b.meanCents) - Math.abs(a.meanCents) || a.drillId - b.drillId || a.chordIndex - b.chordIndex || a.part.localeCompare(b.part))
      .slice(0, WORST_HOLDS)
      .map(h => ({ ...h, outShare: r2(h.outShare), meanCents: r2(h.meanCents) }))
    return { takes: this.takes.size, holds: this.holds, members, players, weeks, worstHolds }
  }
}

/** The statistics of takes and hold rows (see StatsBuilder). */
export function buildStats(takes: Iterable<StatTakeRow>, holds: Iterable<StatHoldRow>): EnsembleStats {
  const b = new StatsBuilder()
  for (const t of takes) b.addTake(t)
  for (const r of holds) b.add(r)
  return b.result()
}

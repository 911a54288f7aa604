import type { DrillInput } from '../../../shared/drill/schema'

/** A drill whose parts are P1, P2, … and whose chords are space-separated voicings ("-" is a rest). */
export function drillOf(voicings: (string | { notes: string, symbol?: string, beats?: number })[], extra: Partial<DrillInput> = {}): DrillInput {
  const rows = voicings.map(v => (typeof v === 'string' ? { notes: v } : v))
  const width = Math.max(...rows.map(r => r.notes.split(/\s+/).length))
  const parts = Array.from({ length: width }, (_, i) => ({ name: `P${i + 1}` }))
  return {
    title: 'Check',
    key: 'C major',
    parts,
    chords: rows.map(r => {
      const ns = r.notes.split(/\s+/)
      return {
        beats: r.beats ?? 2,
        ...(r.symbol ? { symbol: r.symbol } : {}),
        notes: Object.fromEntries(parts.map((p, i) => [p.name, ns[i] && ns[i] !== '-' ? ns[i]! : null])),
      }
    }),
    ...extra,
  }
}

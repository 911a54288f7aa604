// Timing of the holds and the take's time map: onsets found, how early or late against the
// beat, a tempo within 1 % when the take is in tempo, robust to a missing chord, and repeated
// notes with no re-articulation split at the chord boundary (and saying so).
import { describe, expect, it } from 'vitest'
import { measureTake } from '../../../server/analysis/measure'
import { synthTakeWithTruth } from '../../../server/analysis/synth'
import { fitTimeMap, mapFromOnsets } from '../../../server/analysis/timing'
import { audioOf, cents, equalHz, planOf, takeOf } from './helpers'

const LINE = [65, 67, 63, 62, 60, 62, 65, 58]
const DEV = [4, -6, 9, -3, 0, 7, -8, 2]

describe('fitTimeMap', () => {
  it('takes the median of pairwise slopes, so one wild onset does not tip it', () => {
    // Theil–Sen estimator (median of pairwise slopes; from memory of the textbook definition):
    // onsets on t = 0.5 + 1.1·d except one that is 2 s late.
    const pairs = [0, 2, 4, 6, 8, 10].map(d => ({ drillS: d, takeS: 0.5 + 1.1 * d }))
    pairs[3]!.takeS += 2
    const m = fitTimeMap(pairs)!
    expect(m.timeScale).toBeCloseTo(1.1, 9)
    expect(m.offsetS).toBeCloseTo(0.5, 9)
  })

  it('needs three onsets and a plausible tempo', () => {
    expect(fitTimeMap([{ drillS: 0, takeS: 1 }, { drillS: 3, takeS: 4 }])).toBeNull()
    expect(fitTimeMap([0, 1, 2].map(d => ({ drillS: d, takeS: 3 * d })))).toBeNull()
  })
})

describe('mapFromOnsets (a whole chord\'s onsets against the drill\'s chord starts)', () => {
  // Chords every 1.5 s on the drill; the take 4 % slower, starting 1.2 s in: t = 1.2 + 1.04·d.
  const starts = [0, 1.5, 3, 4.5, 6, 7.5, 9, 10.5]
  it('recovers the map with a chord missing, two extra onsets (tremolo, a breath) and 30 ms of jitter', () => {
    const onsets = starts.filter((_, i) => i !== 5).map((d, i) => 1.2 + 1.04 * d + (i % 2 ? 0.03 : -0.02))
    onsets.push(3.9, 8.35)
    const m = mapFromOnsets(onsets, starts)!
    expect(Math.abs(m.timeScale - 1.04)).toBeLessThan(0.01)
    expect(Math.abs(m.offsetS - 1.2)).toBeLessThan(0.06)
  })
  // Six chords of equal length (1.5 s on the drill, ending at 9 s), as in the quartet fixtures:
  // a map shifted by one whole chord meets as many onsets once an onset at the final release (or
  // an extra one) fills the gap, so what decides is where the take sounds at all.
  const equal = [0, 1.5, 3, 4.5, 6, 7.5]
  const jitter = [0.02, -0.03, 0.01, 0.03, -0.02, 0.02]
  const playedAt = (o: number, k: number) => equal.map((d, i) => o + k * d + jitter[i]!)
  it.each([1, 0.9, 1.12])('six equal chords at tempo ×%s, the first from silence (no onset) and an onset at the final release: not one chord late', (k) => {
    const o = 1.0
    const onsets = playedAt(o, k).slice(1)
    onsets.push(o + k * 9 + 0.05) // the release (the other parts ring a little longer)
    const m = mapFromOnsets(onsets, equal, { sound: { startS: o + 0.01, endS: o + k * 9 + 0.4 }, drillEndS: 9 })!
    // In tempo within 1 % (the drill's tempo scaled by k), on the first chord within 0.06 s.
    expect(Math.abs(m.timeScale / k - 1)).toBeLessThan(0.01)
    expect(Math.abs(m.offsetS - o)).toBeLessThan(0.06)
  })
  it('six equal chords: a missing chord onset and an extra onset half-way through another do not tip it', () => {
    const o = 0.7
    const onsets = playedAt(o, 1).filter((_, i) => i !== 3)
    onsets.push(o + 6.75, o + 9.02)
    const m = mapFromOnsets(onsets, equal, { sound: { startS: o, endS: o + 9.35 }, drillEndS: 9 })!
    expect(Math.abs(m.timeScale - 1)).toBeLessThan(0.01)
    expect(Math.abs(m.offsetS - o)).toBeLessThan(0.06)
  })
  it('gives nothing when the onsets do not fit the chords', () => {
    expect(mapFromOnsets([0.3, 5.1], starts)).toBeNull()
  })
})

describe('holds timing in a take', () => {
  it('a take in tempo: the map is within 1 % of the drill tempo and every onset is found', () => {
    // takeOf starts every hold 40 ms after its beat (lead-in 1.7 s).
    const t = takeOf(planOf(LINE, 3, 72, DEV), { leadInS: 1.7 })
    const m = measureTake(audioOf(t.samples, t.sampleRate), t.expected)
    expect(Math.abs(m.timeScale - 1)).toBeLessThan(0.01)
    expect(Math.abs(m.offsetS - 1.74)).toBeLessThan(0.05)
    m.holds.forEach((h, i) => {
      expect(h.timing!.start).toBe('onset')
      expect(Math.abs(h.timing!.onsetS! - t.synthHolds[i]!.startS)).toBeLessThan(0.05)
      expect(Math.abs(h.timing!.fromBeatS!)).toBeLessThan(0.05)
      // Released 0.25 s before the next chord.
      expect(Math.abs(h.timing!.releaseS! - t.synthHolds[i]!.endS)).toBeLessThan(0.1)
    })
  })

  it.each([0.85, 1.15])('tempo scaled by %s: the map follows within 1 %', (k) => {
    const t = takeOf(planOf(LINE, 3, 72, DEV), { leadInS: 1.2, tempoScale: k })
    const m = measureTake(audioOf(t.samples, t.sampleRate), t.expected)
    expect(Math.abs(m.timeScale / k - 1)).toBeLessThan(0.01)
  })

  it('a missing chord and a late entry do not tip the map', () => {
    const drill = planOf(LINE, 3, 72, DEV)
    const played = drill.map((p, i) => (i === 2 ? { ...p, skip: true } : i === 5 ? { ...p, startS: p.startS + 0.4 } : p)) // enters 0.4 s late
    const t = takeOf(played, { leadInS: 1 })
    const expected = drill.map((p, index) => ({ index, startS: p.startS, endS: p.endS, midi: p.midi, expectedHz: equalHz(p.midi!) }))
    const m = measureTake(audioOf(t.samples, t.sampleRate), expected)
    expect(Math.abs(m.timeScale - 1)).toBeLessThan(0.01)
    expect(m.holds[2]!.detectedHz).toBeNull()
    expect(m.holds[2]!.timing).toBeUndefined()
    // The late hold says how late: 0.4 s + the 40 ms every hold starts after its beat.
    expect(m.holds[5]!.timing!.fromBeatS!).toBeGreaterThan(0.38)
    expect(m.holds[5]!.timing!.fromBeatS!).toBeLessThan(0.5)
  })

  it('a re-struck repeated note starts at its re-attack, not in the tail of the note before', () => {
    // Three chords on the same D4, released 40 ms before each re-attack (takeOf starts every
    // hold 40 ms after its beat), then F4.
    const t = takeOf(planOf([62, 62, 62, 65], 3, 72, [5, -5, 3, 0]), { leadInS: 1, gapS: 0 })
    const m = measureTake(audioOf(t.samples, t.sampleRate), t.expected)
    m.holds.forEach((h, i) => {
      expect(h.timing!.start, `hold ${i}`).toBe('onset')
      expect(Math.abs(h.timing!.onsetS! - t.synthHolds[i]!.startS), `hold ${i}`).toBeLessThan(0.05)
    })
  })

  it('a tied repeated note is split at the chord boundary, and the hold says so', () => {
    // Drill: D4 F4 F4 A4 (3 s each at 60 bpm); the singer holds F4 through chords 2 and 3 in
    // one breath, 6 ¢ sharp then 6 ¢ flat (a glide inside the tie), with no re-articulation.
    const expected = [62, 65, 65, 69].map((midi, index) => ({ index, startS: 3 * index, endS: 3 * index + 3, midi, expectedHz: equalHz(midi) }))
    const lead = 1
    const syn = synthTakeWithTruth({
      sampleRate: 44100, durationS: 14, timbre: 'voice-alto', seed: 5, snrDb: 35,
      holds: [
        { startS: lead + 0.04, endS: lead + 2.75, hz: equalHz(62) },
        { startS: lead + 3.04, endS: lead + 8.75, hz: equalHz(65) * Math.pow(2, 2 / 1200) },
        { startS: lead + 9.04, endS: lead + 11.75, hz: equalHz(69) },
      ],
    })
    const m = measureTake(audioOf(syn.samples, 44100), expected)
    const [, a, b] = m.holds
    expect(a!.timing!.start).toBe('onset')
    expect(b!.timing!.start).toBe('chord_boundary')
    expect(b!.timing!.onsetS).toBeNull()
    // Split where chord 3 begins under the map (1 + 6 s, the map's offset includes the 40-ms late start).
    expect(Math.abs(b!.startS - (lead + 6))).toBeLessThan(0.1)
    expect(Math.abs(a!.endS - (lead + 6))).toBeLessThan(0.1)
    // Both halves are the same steady F4, measured to the synthesised centre.
    expect(Math.abs(cents(a!.detectedHz!, syn.holds[1]!.centreHz))).toBeLessThan(0.2)
    expect(Math.abs(cents(b!.detectedHz!, syn.holds[1]!.centreHz))).toBeLessThan(0.2)
  })
})

// Scoring a measurement against the tuning engine's targets, re-scoring without decoding,
// take figures (mean deviation, share in tolerance, drift, member bias), and the whole path
// from WAV bytes at 48 kHz through analyzeTake.
import { describe, expect, it } from 'vitest'
import { computeTargets } from '../../../shared/tuning/index'
import { analyzeTake, expectedHolds, measureTake, scoreMeasurement } from '../../../server/analysis/index'
import { AnalysisError } from '../../../server/analysis/errors'
import { encodeWav } from '../../../server/analysis/wav'
import { synthTakeWithTruth } from '../../../server/analysis/synth'
import { audioOf, cents } from './helpers'

// C major then F major; the alto holds the third of each (E4, then A4).
const DRILL = {
  title: 'Thirds', key: 'C major', tempo: 60, a4: 440, tolerance: 10,
  parts: [{ name: 'Bass' }, { name: 'Tenor' }, { name: 'Alto' }],
  chords: [
    { beats: 3, symbol: 'C', notes: { Bass: 'C3', Tenor: 'G3', Alto: 'E4' } },
    { beats: 3, symbol: 'F', notes: { Bass: 'F2', Tenor: 'C4', Alto: 'A4' } },
  ],
}

// The just third 5/4 above each root at its equal-tempered place: C4·5/4 and F4·5/4
// (equal-tempered C4 = 440·2^(−9/12), F4 = 440·2^(−4/12); ratios common practice).
const JUST_E4 = 440 * Math.pow(2, -9 / 12) * 5 / 4
const JUST_A4 = 440 * Math.pow(2, -4 / 12) * 5 / 4
// 1200·log2(5/4) − 400 = −13.686 ¢ (definition of the cent).
const PURE_THIRD_FROM_EQUAL = 1200 * Math.log2(5 / 4) - 400

function sungPure (sampleRate = 44100) {
  return synthTakeWithTruth({
    sampleRate, durationS: 7.4, timbre: 'voice-alto', seed: 21, snrDb: 35,
    holds: [{ startS: 1.04, endS: 3.8, hz: JUST_E4 }, { startS: 4.04, endS: 6.8, hz: JUST_A4 }],
  })
}

describe('re-scoring one measurement against two systems', () => {
  const syn = sungPure()
  const measurement = measureTake(audioOf(syn.samples, 44100), expectedHolds(DRILL, 'Alto'))

  it('a pure third sung exactly is ≈ 0 ¢ from the just-root target and ≈ −13.686 ¢ from equal', () => {
    const just = scoreMeasurement(measurement, computeTargets(DRILL, { name: 'just-root' }), 'Alto', 10)
    const equal = scoreMeasurement(measurement, computeTargets(DRILL, { name: 'equal' }), 'Alto', 10)
    expect(PURE_THIRD_FROM_EQUAL).toBeCloseTo(-13.686, 3)
    for (const h of just.holds) {
      expect(h.member).toBe('third')
      expect(Math.abs(h.centsFromTarget!)).toBeLessThan(0.05)
      expect(h.centsFromEqual!).toBeCloseTo(PURE_THIRD_FROM_EQUAL, 1)
      expect(h.withinTolerance).toBe(true)
    }
    for (const h of equal.holds) {
      expect(h.centsFromTarget!).toBeCloseTo(PURE_THIRD_FROM_EQUAL, 1)
      expect(h.withinTolerance).toBe(false) // 13.7 ¢ > ±10 ¢
    }
    // The measured Hz are the same object in both reports: nothing was decoded again.
    expect(just.holds.map(h => h.detectedHz)).toEqual(equal.holds.map(h => h.detectedHz))
    expect(equal.memberBias.third!).toBeCloseTo(PURE_THIRD_FROM_EQUAL, 1)
    expect(Math.abs(just.memberBias.third!)).toBeLessThan(0.05)
    expect(equal.summary.withinToleranceShare).toBe(0)
    expect(just.summary.withinToleranceShare).toBe(1)
    expect(equal.summary.meanAbsCents!).toBeCloseTo(-PURE_THIRD_FROM_EQUAL, 1)
  })

  it('another reference pitch shifts every figure by the cents between the two A4s', () => {
    const at440 = scoreMeasurement(measurement, computeTargets(DRILL, { name: 'equal' }, 440), 'Alto', 10)
    const at442 = scoreMeasurement(measurement, computeTargets(DRILL, { name: 'equal' }, 442), 'Alto', 10)
    const shift = 1200 * Math.log2(442 / 440) // 7.85 ¢, definition of the cent
    at440.holds.forEach((h, i) => expect(h.centsFromTarget! - at442.holds[i]!.centsFromTarget!).toBeCloseTo(shift, 2))
  })

  it('has the JSON shape of `driftline analyze --json`', () => {
    const r = scoreMeasurement(measurement, computeTargets(DRILL, { name: 'just-root' }), 'Alto', 10)
    expect(Object.keys(r)).toEqual(expect.arrayContaining(['take', 'system', 'a4', 'part', 'holds', 'summary']))
    expect(Object.keys(r.take)).toEqual(expect.arrayContaining(['durationS', 'sampleRate', 'channels']))
    for (const h of r.holds) {
      expect(Object.keys(h)).toEqual(expect.arrayContaining(['index', 'note', 'member', 'startS', 'endS', 'targetHz', 'detectedHz',
        'centsFromTarget', 'centsFromEqual', 'spreadCents', 'slopeCentsPerS', 'confidence', 'withinTolerance', 'reason']))
    }
    expect(Object.keys(r.summary)).toEqual(expect.arrayContaining(['meanAbsCents', 'withinToleranceShare', 'driftCentsPerMin', 'holdsFound', 'holdsExpected']))
    expect(r.summary.holdsFound).toBe(2)
    expect(r.summary.holdsExpected).toBe(2)
  })
})

describe('take figures', () => {
  it('a player sagging 1 ¢ per second shows a drift of about −60 ¢ per minute', () => {
    // Eight 3-s chords on alternating notes, each sung 3 ¢ flatter than the one before.
    const notes = ['D4', 'F4', 'D4', 'F4', 'D4', 'F4', 'D4', 'F4']
    const drill = { title: 'Sag', key: 'D minor', tempo: 60, parts: [{ name: 'Alto' }], chords: notes.map(n => ({ beats: 3, notes: { Alto: n } })) }
    const expected = expectedHolds(drill, 'Alto')
    const holds = expected.map((e, i) => ({ startS: 1 + e.startS + 0.04, endS: 1 + e.endS - 0.25, hz: e.expectedHz * Math.pow(2, -3 * i / 1200) }))
    const syn = synthTakeWithTruth({ sampleRate: 44100, durationS: 26, holds, timbre: 'voice-alto', seed: 4, snrDb: 35 })
    const m = measureTake(audioOf(syn.samples, 44100), expected)
    const r = scoreMeasurement(m, computeTargets(drill, { name: 'equal' }), 'Alto', 10)
    // −3 ¢ per 3-s chord = −1 ¢/s = −60 ¢/min; the regression over the steady middles recovers it.
    expect(r.summary.driftCentsPerMin!).toBeGreaterThan(-62)
    expect(r.summary.driftCentsPerMin!).toBeLessThan(-58)
    // Eight holds exactly on the line: the uncertainty is far below the 60 ¢/min value.
    expect(r.summary.driftUncertaintyCentsPerMin!).toBeLessThan(1)
    // Mean |deviation| is the mean of 0, 3, …, 21 ¢ = 10.5 ¢.
    expect(r.summary.meanAbsCents!).toBeCloseTo(10.5, 1)
    expect(r.summary.withinToleranceShare).toBeCloseTo(4 / 8, 5) // 0, 3, 6, 9 ¢ are within ±10 ¢
  })
})

describe('wrong notes in the report', () => {
  // Five 2-s chords of E4 (MIDI 64); chord 2 sung three semitones high (G4), chord 4 an octave
  // high (E5). Equal-tempered pitches 440·2^((n − 69)/12) (common practice).
  const notes = ['E4', 'E4', 'E4', 'E4', 'E4']
  const drill = { title: 'Wrong', key: 'C major', tempo: 60, parts: [{ name: 'Alto' }], chords: notes.map(n => ({ beats: 2, notes: { Alto: n } })) }
  const expected = expectedHolds(drill, 'Alto')
  const e4 = 440 * Math.pow(2, -5 / 12)
  const played = [e4, e4 * Math.pow(2, 3 / 12), e4, 2 * e4, e4 * Math.pow(2, 4 / 1200)]
  const syn = synthTakeWithTruth({
    sampleRate: 44100, durationS: 11.5, timbre: 'voice-alto', seed: 8, snrDb: 35,
    holds: expected.map((e, i) => ({ startS: 1 + e.startS + 0.04, endS: 1 + e.endS - 0.25, hz: played[i]! })),
  })
  const r = scoreMeasurement(measureTake(audioOf(syn.samples, 44100), expected), computeTargets(drill, { name: 'equal' }), 'Alto', 10)

  it('says which note was heard and how far, and scores no deviation for it', () => {
    const g = r.holds[1]!
    expect(g.reasonCode).toBe('wrong_note')
    expect(g.heardNote).toBe('G4') // E4 + 3 semitones (common practice)
    expect(g.heardCentsFromExpected!).toBeCloseTo(300, 1)
    expect(Math.abs(cents(g.detectedHz!, syn.holds[1]!.centreHz))).toBeLessThan(0.1)
    expect(g.centsFromTarget).toBeNull()
    expect(g.centsFromEqual).toBeNull()
    expect(g.withinTolerance).toBeNull()
    expect(g.reason).toMatch(/G4.*E4/)
    const o = r.holds[3]!
    expect(o.reasonCode).toBe('wrong_note')
    expect(o.heardNote).toBe('E5') // one octave above E4
    expect(o.heardCentsFromExpected!).toBeCloseTo(1200, 1)
    expect(o.centsFromTarget).toBeNull()
  })

  it('right notes carry the heard note too, and the figures leave the wrong notes out', () => {
    expect(r.holds[0]!.heardNote).toBe('E4')
    expect(r.holds[4]!.heardCentsFromExpected!).toBeCloseTo(4, 1)
    expect(r.summary.wrongNotes).toBe(2)
    expect(r.summary.holdsFound).toBe(3)
    // Mean |deviation| over 0, 0, +4 ¢ = 1.333 ¢: no 300 or 1200 ¢ leaks in.
    expect(r.summary.meanAbsCents!).toBeCloseTo(4 / 3, 1)
    for (const h of r.holds) if (h.centsFromTarget !== null) expect(Math.abs(h.centsFromTarget)).toBeLessThan(100)
  })

  it('a hold more than 50 ¢ from its note when re-scored at another reference pitch becomes a wrong note', () => {
    // 1200·log2(466/440) = 99.4 ¢: every E4 at A4 = 440 is about a semitone below E4 at A4 = 466.
    const hi = scoreMeasurement(measureTake(audioOf(syn.samples, 44100), expectedHolds(drill, 'Alto')), computeTargets(drill, { name: 'equal' }, 466), 'Alto', 10)
    expect(hi.holds[0]!.reasonCode).toBe('wrong_note')
    expect(hi.holds[0]!.heardNote).toBe('D#4')
    expect(hi.summary.meanAbsCents).toBeNull()
  })
})

describe('drift needs enough holds', () => {
  it('a steady two-hold take reports no drift figure', () => {
    const drill = { title: 'Two', key: 'C major', tempo: 60, parts: [{ name: 'Alto' }], chords: [{ beats: 3, notes: { Alto: 'E4' } }, { beats: 3, notes: { Alto: 'A4' } }] }
    const syn = synthTakeWithTruth({
      sampleRate: 44100, durationS: 7.4, timbre: 'voice-alto', seed: 3, snrDb: 35,
      holds: [{ startS: 1.04, endS: 3.8, hz: 440 * Math.pow(2, -5 / 12) }, { startS: 4.04, endS: 6.8, hz: 440 * Math.pow(2, 1.6 / 1200) }],
    })
    const r = scoreMeasurement(measureTake(audioOf(syn.samples, 44100), expectedHolds(drill, 'Alto')), computeTargets(drill, { name: 'equal' }), 'Alto', 10)
    expect(r.summary.holdsFound).toBe(2)
    expect(r.summary.driftCentsPerMin).toBeNull()
    expect(r.summary.driftUncertaintyCentsPerMin).toBeNull()
  })
})

describe('analyzeTake end to end', () => {
  it('48 kHz audio is measured at 48 kHz (a 44.1 kHz reading would be 146.7 ¢ flat)', async () => {
    const syn = sungPure(48000)
    const bytes = encodeWav(syn.samples, 48000, { bits: 24 })
    const progress: number[] = []
    const { measurement, report } = await analyzeTake(bytes, DRILL, 'Alto', { system: 'just-root', onProgress: p => progress.push(p) })
    expect(measurement.take.sampleRate).toBe(48000)
    expect(report.take.sampleRate).toBe(48000)
    // 1200·log2(44100/48000) = −146.7 ¢ is what a wrong rate would give.
    expect(1200 * Math.log2(44100 / 48000)).toBeCloseTo(-146.7, 1)
    report.holds.forEach((h, i) => {
      expect(Math.abs(cents(h.detectedHz!, syn.holds[i]!.centreHz))).toBeLessThan(0.05)
      expect(Math.abs(h.centsFromTarget!)).toBeLessThan(0.05)
    })
    expect(progress[progress.length - 1]).toBe(1)
    for (let i = 1; i < progress.length; i++) expect(progress[i]!).toBeGreaterThanOrEqual(progress[i - 1]!)
  })

  it('a part not in the drill → unknown_part, before any decoding', async () => {
    await expect(analyzeTake(new Uint8Array([1, 2, 3]), DRILL, 'Soprano')).rejects.toMatchObject({ code: 'unknown_part', status: 400 })
    expect(() => expectedHolds(DRILL, 'Soprano')).toThrow(AnalysisError)
  })

  it('a part that only rests → no_holds', async () => {
    const drill = { ...DRILL, parts: [...DRILL.parts, { name: 'Descant' }], chords: DRILL.chords.map(c => ({ ...c, notes: { ...c.notes, Descant: null } })) }
    await expect(analyzeTake(encodeWav(sungPure().samples, 44100), drill, 'Descant')).rejects.toMatchObject({ code: 'no_holds' })
  })

  it('bytes that are not audio → not_audio (from the decoder)', async () => {
    await expect(analyzeTake(new TextEncoder().encode('not a recording at all'), DRILL, 'Alto')).rejects.toMatchObject({ code: 'not_audio', status: 415 })
  })
})

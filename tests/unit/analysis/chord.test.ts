// The chord search (a take holding the whole chord while the drill asks for one part) on takes
// of known truth from our synthesiser (server/analysis/synth.ts: the truth of a hold is the mean
// synthesised log-frequency over its steady window), and the inputs it must not mistake for a
// chord: noise, and the part played an octave high, a fifth low or a tritone away from what the
// drill asks.
import { describe, expect, it } from 'vitest'
import { AnalysisError } from '../../../server/analysis/errors'
import { measureTake } from '../../../server/analysis/measure'
import { synthTake, synthTakeWithTruth } from '../../../server/analysis/synth'
import type { ExpectedHold } from '../../../server/analysis/types'
import { audioOf, cents, equalHz } from './helpers'

const SR = 16000
// Equal temperament from A4 = 440 Hz (common practice, MIDI tuning standard).
const drill: ExpectedHold[] = [60, 62, 64, 65, 67, 65, 64, 62].map((midi, index) => ({
  index, startS: index * 1.5, endS: (index + 1) * 1.5, midi, expectedHz: equalHz(midi),
}))
const audio = (samples: Float32Array) => audioOf(samples, SR)
const played = (semitones: number) => drill.map(h => ({ startS: h.startS + 0.5, endS: h.endS + 0.3, hz: h.expectedHz * Math.pow(2, semitones / 12) }))

describe('a duet: the part measured sounds above a louder part a major sixth below', () => {
  const upper = synthTakeWithTruth({ sampleRate: SR, durationS: 13, holds: played(0), timbre: 'voice-alto', snrDb: 40, seed: 5 })
  // A major sixth below (9 semitones, common practice): the lower part's 5th harmonic lies 16 ¢
  // under the upper part's 3rd (5:3 against the equal-tempered sixth), on every hold.
  const lower = synthTake({ sampleRate: SR, durationS: 13, holds: played(-9), timbre: 'brass', snrDb: 40, seed: 6 })
  const mix = new Float32Array(upper.samples.length)
  for (let i = 0; i < mix.length; i++) mix[i] = 0.5 * upper.samples[i]! + 0.8 * lower[i]!
  const m = measureTake(audio(mix), drill, { trace: false })

  it('finds and measures every hold of the upper part within 0.5 ¢, and says it was picked out of a chord', () => {
    expect(m.warnings.map(w => w.code)).toContain('whole_chord')
    upper.holds.forEach((t, i) => {
      const h = m.holds[i]!
      expect(h.reasonCode, `hold ${i}`).toBeNull()
      expect(Math.abs(cents(h.detectedHz!, t.centreHz)), `hold ${i}`).toBeLessThan(0.5)
      expect(h.confidence, `hold ${i}`).toBeLessThan(0.8)
    })
  })
})

describe('inputs that are not a chord', () => {
  it('noise: no holds, nothing measured', () => {
    let seed = 7
    const rand = () => ((seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648)
    const x = new Float32Array(13 * SR)
    for (let i = 0; i < x.length; i++) x[i] = 0.2 * (2 * rand() - 1) * (0.5 + 0.5 * Math.sin(2 * Math.PI * 0.7 * i / SR)) ** 2
    expect(() => measureTake(audio(x), drill, { trace: false })).toThrow(AnalysisError)
  })

  // An octave high, a fifth low: the expected notes' upper harmonics all sound, their fundamentals do not.
  it.each([12, -7])('the part played %i semitones away in brass: never measured as the expected notes', (shift) => {
    const x = synthTake({ sampleRate: SR, durationS: 13, holds: played(shift), timbre: 'brass', snrDb: 30, seed: 4 })
    const m = measureTake(audio(x), drill, { trace: false })
    expect(m.warnings.map(w => w.code)).not.toContain('whole_chord')
    const asRight = m.holds.filter(h => h.reasonCode === null)
    expect(asRight.length).toBeLessThanOrEqual(1)
  })

  it('the part played a tritone (6 semitones) away: wrong notes with the pitch heard, never a chord', () => {
    const x = synthTake({ sampleRate: SR, durationS: 13, holds: played(6), timbre: 'voice-alto', snrDb: 30, seed: 4 })
    const m = measureTake(audio(x), drill, { trace: false })
    expect(m.warnings.map(w => w.code)).not.toContain('whole_chord')
    for (const h of m.holds) expect(h.reasonCode, `hold ${h.index}`).not.toBeNull()
    const wrong = m.holds.filter(h => h.reasonCode === 'wrong_note')
    expect(wrong.length).toBeGreaterThanOrEqual(4)
    // The pitch heard is one of the notes played (the take is placed by its own notes, so a wrong
    // note can be heard against a neighbouring chord): nothing is invented.
    const playedHz = played(6).map(p => p.hz)
    for (const h of wrong) expect(Math.min(...playedHz.map(f => Math.abs(cents(h.detectedHz!, f)))), `hold ${h.index}`).toBeLessThan(50)
  })
})

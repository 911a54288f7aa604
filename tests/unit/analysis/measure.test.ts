// What the measurer says when it cannot tell: octave errors, wrong notes, silence, clipping,
// parts that only rest. Never a made-up pitch.
import { describe, expect, it } from 'vitest'
import { measureTake, WRONG_NOTE_CENTS } from '../../../server/analysis/measure'
import { AnalysisError } from '../../../server/analysis/errors'
import { mulberry32 } from '../../../server/analysis/synth'
import { audioOf, cents, equalHz, planOf, takeOf } from './helpers'

function expectAnalysisError (fn: () => unknown, code: string) {
  try {
    fn()
  } catch (e) {
    expect(e).toBeInstanceOf(AnalysisError)
    expect((e as AnalysisError).code).toBe(code)
    return
  }
  throw new Error(`expected AnalysisError ${code}`)
}

describe('octave guard and wrong notes', () => {
  // Drill: A3 E4 A3 (3 s each at 60 bpm); the player plays the middle chord differently.
  const plan = (playedHz?: number, timbre: 'voice-tenor' | 'brass' = 'voice-tenor') => {
    const p = planOf([57, 64, 57])
    if (playedHz) p[1]!.playedHz = playedHz
    const t = takeOf(p, { timbre })
    return { t, m: measureTake(audioOf(t.samples, t.sampleRate), t.expected) }
  }

  // Equal-tempered pitches: f = 440·2^((n − 69)/12) (common practice, MIDI tuning standard);
  // E4 = MIDI 64. A wrong note keeps the pitch heard (detectedHz), within 0.1 ¢ of what was played.
  it.each(['voice-tenor', 'brass'] as const)('an octave above is a wrong note measured an octave up, never +1200 ¢ (%s)', (timbre) => {
    const { t, m } = plan(2 * equalHz(64), timbre)
    const h = m.holds[1]!
    expect(h.reasonCode).toBe('wrong_note')
    expect(h.reason).toMatch(/octave above/)
    expect(Math.abs(cents(h.detectedHz!, t.truth[1]!))).toBeLessThan(0.1)
    // 1200·log2(2) = 1200 ¢ (definition of the cent).
    expect(cents(h.detectedHz!, equalHz(64))).toBeCloseTo(1200, 0)
    // The neighbours are unaffected.
    expect(m.holds[0]!.reasonCode).toBeNull()
    expect(m.holds[2]!.reasonCode).toBeNull()
  })

  it.each(['voice-tenor', 'brass'] as const)('an octave below is a wrong note measured an octave down (%s)', (timbre) => {
    const { t, m } = plan(equalHz(64) / 2, timbre)
    const h = m.holds[1]!
    expect(h.reasonCode).toBe('wrong_note')
    expect(h.reason).toMatch(/octave below/)
    expect(Math.abs(cents(h.detectedHz!, t.truth[1]!))).toBeLessThan(0.1)
  })

  it.each([
    ['voice-tenor', 3], ['brass', 3], ['voice-tenor', -3], ['brass', -3], ['voice-tenor', 5], ['brass', 2],
  ] as const)('%s %i semitones off is a wrong note with the pitch heard, not a deviation', (timbre, semis) => {
    expect(WRONG_NOTE_CENTS).toBe(50) // about half a semitone: the nearest-note boundary (common practice)
    const { t, m } = plan(equalHz(64 + semis), timbre)
    const h = m.holds[1]!
    expect(h.reasonCode).toBe('wrong_note')
    expect(h.reason).toMatch(new RegExp(`${Math.abs(semis)} semitones? ${semis > 0 ? 'above' : 'below'}`))
    expect(Math.abs(cents(h.detectedHz!, t.truth[1]!))).toBeLessThan(0.1)
    expect(cents(h.detectedHz!, equalHz(64))).toBeCloseTo(100 * semis, 1)
  })

  it('40 ¢ off (< 50 ¢) is still the expected note, measured as a deviation of +40 ¢', () => {
    const { t, m } = plan(equalHz(64) * Math.pow(2, 40 / 1200))
    const h = m.holds[1]!
    expect(h.reasonCode).toBeNull()
    expect(cents(h.detectedHz!, equalHz(64))).toBeCloseTo(40, 1)
    expect(Math.abs(cents(h.detectedHz!, t.truth[1]!))).toBeLessThan(0.1)
  })
})

describe('bad input gets a stable code', () => {
  const expected = [{ index: 0, startS: 0, endS: 2, midi: 57, expectedHz: 220 }]

  it('digital silence → silent', () => {
    expectAnalysisError(() => measureTake(audioOf(new Float32Array(44100 * 3), 44100), expected), 'silent')
  })

  it('noise only (no note anywhere) → no_holds, not an invented pitch', () => {
    const rand = mulberry32(9)
    const x = new Float32Array(44100 * 3)
    for (let i = 0; i < x.length; i++) x[i] = 0.05 * (rand() - 0.5)
    expectAnalysisError(() => measureTake(audioOf(x, 44100), expected), 'no_holds')
  })

  it('no samples → empty', () => {
    expectAnalysisError(() => measureTake(audioOf(new Float32Array(0), 44100), expected), 'empty')
  })

  it('a part that only rests → no_holds', () => {
    const t = takeOf(planOf([57]))
    expectAnalysisError(() => measureTake(audioOf(t.samples, 44100), [{ index: 0, startS: 0, endS: 3, midi: null, expectedHz: 0 }]), 'no_holds')
  })

  it('heavy clipping (a square-ish wave) → clipped', () => {
    const t = takeOf(planOf([57, 60]))
    const x = t.samples.map(v => Math.max(-1, Math.min(1, v * 40)))
    expectAnalysisError(() => measureTake(audioOf(x, 44100), t.expected), 'clipped')
  })

  it('light clipping is measured, with a warning', () => {
    const t = takeOf(planOf([57, 60]))
    let peak = 0
    for (const v of t.samples) peak = Math.max(peak, Math.abs(v))
    // Scale so only the top ~1 % of the waveform reaches full scale.
    const x = t.samples.map(v => Math.max(-1, Math.min(1, v * 1.08 / peak)))
    const m = measureTake(audioOf(x, 44100), t.expected)
    expect(m.warnings.map(w => w.code)).toContain('clipping')
    // Clipping a periodic wave keeps its period: the pitch is still right.
    expect(Math.abs(cents(m.holds[0]!.detectedHz!, t.truth[0]!))).toBeLessThan(0.1)
  })

  it('nothing in the measurement is NaN or Infinity', () => {
    const t = takeOf(planOf([57, null, 60, 62]), { snrDb: 15, jitterCents: 3 })
    const m = measureTake(audioOf(t.samples, 44100), t.expected)
    const walk = (v: unknown): void => {
      if (typeof v === 'number') expect(Number.isFinite(v)).toBe(true)
      else if (Array.isArray(v)) v.forEach(walk)
      else if (v && typeof v === 'object') Object.values(v).forEach(walk)
    }
    walk(m)
    expect(m.holds).toHaveLength(3) // the rest is not a hold
  })
})

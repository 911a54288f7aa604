// A take that plays the drill twice (the player went round again without stopping). The drill
// is measured once, on one whole pass: every hold on the same pass, the time map at the drill's
// tempo, and nothing from the other pass slid onto a chord. The truth is the synthesiser's own
// centre for each pass (the two passes are tuned differently, so a hold taken from the wrong
// pass is off by 5–17 ¢).
import { describe, expect, it } from 'vitest'
import { measureTake } from '../../../server/analysis/measure'
import { audioOf, cents, equalHz, planOf, takeOf } from './helpers'

// Bb major chorale-like line for an alto (our own), 3 beats each at 72 bpm: 20 s a pass.
const LINE = [65, 67, 63, 62, 60, 62, 65, 58]
const PASS1 = [4, -6, 9, -3, 0, 7, -8, 2]
const PASS2 = [-4, 6, -5, 8, -9, -3, 6, -7]

describe('a take that plays the drill twice', () => {
  const plan = planOf(LINE, 3, 72, PASS1)
  const passS = plan[plan.length - 1]!.endS
  const lead = 1.3
  const pause = 1.5
  // The second pass as extra holds: same notes, its own tuning, starting after a short pause.
  const extra = plan.map((p, i) => ({
    startS: lead + passS + pause + p.startS + 0.04,
    endS: lead + passS + pause + p.endS - 0.25,
    hz: equalHz(p.midi!) * Math.pow(2, PASS2[i]! / 1200),
  }))
  const t = takeOf(plan, { leadInS: lead, extra, tailS: passS + pause + 0.8 })
  const m = measureTake(audioOf(t.samples, t.sampleRate), t.expected)
  const pass2Truth = t.synthHolds.slice(plan.length).map(h => h.centreHz)

  it('keeps the drill\'s tempo (within 1 %) and measures every hold', () => {
    expect(Math.abs(m.timeScale - 1)).toBeLessThan(0.01)
    expect(m.holds.every(h => h.detectedHz !== null && h.reasonCode === null)).toBe(true)
  })

  it('takes every hold from one and the same pass, in order', () => {
    const fromPass = m.holds.map((h, i) => {
      if (Math.abs(cents(h.detectedHz!, t.truth[i]!)) < 0.3) return 1
      if (Math.abs(cents(h.detectedHz!, pass2Truth[i]!)) < 0.3) return 2
      return 0
    })
    expect(fromPass.every(p => p === fromPass[0] && p !== 0), `passes ${fromPass.join(',')}`).toBe(true)
    for (let i = 1; i < m.holds.length; i++) expect(m.holds[i]!.startS).toBeGreaterThan(m.holds[i - 1]!.startS)
  })

  it('places the onsets on the pass it measured, within 0.1 s of the beat', () => {
    const first = m.holds[0]!.timing!.onsetS!
    const pass = first < lead + passS ? 0 : passS + pause
    m.holds.forEach((h, i) => {
      // Each synthesised hold starts 40 ms after its beat (helpers.takeOf).
      const beat = lead + pass + plan[i]!.startS + 0.04
      if (h.timing!.onsetS !== null) expect(Math.abs(h.timing!.onsetS - beat), `hold ${i}`).toBeLessThan(0.1)
    })
  })
})

// Alignment of a part to a take: lead-in, late start, tempo ±15 %, breaths, a missing chord,
// an extra chord, repeated notes. Each found hold must be measured where it really is (its
// centre equals the synthesised truth), and a hold that is not there must say so.
import { describe, expect, it } from 'vitest'
import { measureTake } from '../../../server/analysis/measure'
import { audioOf, cents, equalHz, planOf, takeOf } from './helpers'
import type { HoldPlan } from './helpers'

// Bb major chorale-like line for an alto: F4 G4 Eb4 D4 C4 D4 F4 Bb3 (3 beats each at 72 bpm).
const LINE = [65, 67, 63, 62, 60, 62, 65, 58]
const DEV = [4, -6, 9, -3, 0, 7, -8, 2] // the player's intonation, cents from equal

function run (plan: HoldPlan[], opts: Parameters<typeof takeOf>[1] = {}) {
  const t = takeOf(plan, opts)
  const m = measureTake(audioOf(t.samples, t.sampleRate), t.expected)
  return { t, m }
}

// Every hold found and measured within `tol` cents of its truth (0.2 ¢: the holds are 2–3 s of
// clean tone, where the estimator is good to a few hundredths; a hold measured in the wrong
// place would be off by its neighbour's interval, ≥ 100 ¢).
function expectAllRight (t: ReturnType<typeof takeOf>, m: ReturnType<typeof measureTake>, tol = 0.2) {
  t.expected.forEach((e, i) => {
    if (e.midi === null || t.truth[i] === undefined) return
    const h = m.holds.find(x => x.index === e.index)!
    expect(h.detectedHz, `hold ${i}`).not.toBeNull()
    expect(Math.abs(cents(h.detectedHz!, t.truth[i]!)), `hold ${i}`).toBeLessThan(tol)
  })
}

describe('alignment', () => {
  it('lead-in silence of 2.5 s and a take at the drill tempo', () => {
    const { t, m } = run(planOf(LINE, 3, 72, DEV), { leadInS: 2.5 })
    expectAllRight(t, m)
    expect(m.timeScale).toBeGreaterThan(0.97)
    expect(m.timeScale).toBeLessThan(1.03)
  })

  it.each([0.85, 1.15])('tempo scaled by %s (±15 %) with a late start', (k) => {
    const { t, m } = run(planOf(LINE, 3, 72, DEV), { leadInS: 1.7, tempoScale: k })
    expectAllRight(t, m)
    // The map's scale follows the take (within 5 %: holds end early for breaths).
    expect(Math.abs(m.timeScale / k - 1)).toBeLessThan(0.05)
  })

  it('tempo 25 % slower than the drill', () => {
    const { t, m } = run(planOf(LINE, 3, 72, DEV), { leadInS: 0.6, tempoScale: 1.25 })
    expectAllRight(t, m)
  })

  it('a missing chord (the player is silent there) is not found, with a reason; the rest are right', () => {
    const plan = planOf(LINE, 3, 72, DEV)
    plan[3]!.skip = true
    const { t, m } = run(plan, { leadInS: 1.2 })
    const h = m.holds.find(x => x.index === 3)!
    expect(h.detectedHz).toBeNull()
    expect(h.reasonCode).toBe('no_pitch')
    expect(h.reason).toMatch(/No steady pitch/)
    expectAllRight(t, m)
  })

  it('an extra chord the drill does not have (a note sung in a long rest) is ignored', () => {
    // Rest of 6 beats in the middle, in which the player sings an A4 for 2 s.
    const notes = [65, 67, 63, null, 62, 60]
    const plan = planOf(notes, 3, 60, DEV)
    const lead = 1
    const extra = [{ startS: lead + 9.4, endS: lead + 11.4, hz: equalHz(69) }]
    const { t, m } = run(plan, { leadInS: lead, extra })
    expectAllRight(t, m)
    expect(m.holds.every(h => h.detectedHz !== null)).toBe(true)
  })

  it('an extra chord that pushes the rest of the take later', () => {
    // The player repeats chord 2 (G4) before going on: chords 3… come one chord (3 s) late.
    const plan = planOf([65, 67, 63, 62, 60], 3, 60, DEV)
    const lead = 1
    const shifted: HoldPlan[] = plan.map((p, i) => (i >= 2 ? { ...p, startS: p.startS + 3, endS: p.endS + 3 } : p))
    const t = takeOf(shifted, { leadInS: lead, extra: [{ startS: lead + 6.04, endS: lead + 8.75, hz: equalHz(66) }] })
    // The drill itself has no shift: measure against the unshifted timeline.
    const expected = plan.map((p, index) => ({ index, startS: p.startS, endS: p.endS, midi: p.midi, expectedHz: equalHz(p.midi!) }))
    const m = measureTake(audioOf(t.samples, t.sampleRate), expected)
    expectAllRight(t, m)
  })

  it('a skipped chord that pulls the rest of the take earlier', () => {
    // The player leaves chord 2 out and goes straight on: chords 3… come one chord early.
    const plan = planOf([65, 67, 63, 62, 60, 65], 3, 60, DEV)
    const played: HoldPlan[] = plan.map((p, i) => (i === 1 ? { ...p, skip: true } : i >= 2 ? { ...p, startS: p.startS - 3, endS: p.endS - 3 } : p))
    const t = takeOf(played, { leadInS: 1.5 })
    const expected = plan.map((p, index) => ({ index, startS: p.startS, endS: p.endS, midi: p.midi, expectedHz: equalHz(p.midi!) }))
    const m = measureTake(audioOf(t.samples, t.sampleRate), expected)
    expect(m.holds.find(h => h.index === 1)!.detectedHz).toBeNull()
    expectAllRight(t, m)
  })

  it('repeated notes across chords, split by timing alone (a 40-ms re-articulation)', () => {
    // Four chords on the same D4, each tuned differently, re-struck without a breath.
    const plan = planOf([62, 62, 62, 62, 65], 3, 60, [6, -6, 3, -3, 0])
    const { t, m } = run(plan, { leadInS: 1, gapS: 0, tempoScale: 1.08 })
    // Neighbours differ by 9–12 ¢: a boundary placed wrongly by more than the trims would
    // drag a centre by several cents.
    expectAllRight(t, m, 0.3)
  })

  it('breaths of up to 0.6 s before each chord', () => {
    const { t, m } = run(planOf(LINE, 4, 80, DEV), { leadInS: 0.8, gapS: 0.6 })
    expectAllRight(t, m)
  })

  it('a take that stops early: the chords after the end are beyond_take', () => {
    const plan = planOf(LINE, 3, 72, DEV)
    const t = takeOf(plan.slice(0, 5), { leadInS: 1 })
    const expected = plan.map((p, index) => ({ index, startS: p.startS, endS: p.endS, midi: p.midi, expectedHz: equalHz(p.midi!) }))
    const m = measureTake(audioOf(t.samples, t.sampleRate), expected)
    for (const i of [5, 6, 7]) {
      expect(m.holds[i]!.detectedHz).toBeNull()
      expect(m.holds[i]!.reasonCode).toBe('beyond_take')
    }
    for (let i = 0; i < 5; i++) expect(Math.abs(cents(m.holds[i]!.detectedHz!, t.truth[i]!))).toBeLessThan(0.2)
  })
})

// A part sung by five voices at once (a section recorded together), rendered from a sampled
// soundfont rather than our own synthesiser: FluidSynth 2.3 with Debian's TimGM6mb.sf2 (package
// timgm6mb-soundfont), made by `npx tsx scripts/sampled-corpus.ts --fixtures`. Each voice is
// detuned by a few cents and has its own vibrato (our own choice, in truth.json). The truth of a
// hold is independent of Driftline: aubiopitch (Debian's aubio-tools; multi-comb, YIN where it
// slips an octave) on each voice rendered alone, log-mean over the hold's steady window, then
// the mean over the five voices — the mean of the voices' log-frequencies.
import { readFileSync } from 'node:fs'
import { join } from 'node:path'
import { describe, expect, it } from 'vitest'
import { decodeAudio } from '../../../server/analysis/decode'
import { measureTake } from '../../../server/analysis/measure'
import type { ExpectedHold } from '../../../server/analysis/types'
import { centreRangeCents, severalVoicesNote } from '../../../shared/report-wording'
import { cents, equalHz } from './helpers'

const dir = join(__dirname, '../../fixtures/sampled')
const truth = JSON.parse(readFileSync(join(dir, 'truth.json'), 'utf8'))

interface Voice {
  detuneCents: number
  vibrato: { rateHz: number, extentCents: number, phase: number } | null
  wander?: Array<{ rateHz: number, cents: number, phase: number }>
}
interface Hold { index: number, midi: number, onS: number, truthHz: number, steadyStartS: number, steadyEndS: number }

async function run (id: string) {
  const take = truth.takes.find((t: { spec: { id: string } }) => t.spec.id === id)
  const spec = take.spec
  const spb = 60 / spec.tempo
  let beat = 0
  const expected: ExpectedHold[] = spec.beats.map((b: number, index: number) => {
    const startS = beat * spb
    beat += b
    const midi = spec.parts[0].notes[index]
    // Equal temperament from A4 = 440 Hz (common practice, MIDI tuning standard).
    return { index, startS, endS: beat * spb, midi, expectedHz: equalHz(midi) }
  })
  const audio = await decodeAudio(new Uint8Array(readFileSync(join(dir, take.file))))
  return { m: measureTake(audio, expected, { trace: false }), holds: take.holds as Hold[], spec }
}

type Measured = Awaited<ReturnType<typeof run>>['m']

// The spread asked for over a hold's steady window: RMS over time of the standard deviation
// across the voices of detune + vibrato (the chord's offset is shared by every voice).
function askedSpread (voices: Voice[], a: number, b: number): number {
  let sum = 0
  let n = 0
  for (let t = a; t <= b; t += 0.005) {
    const c = voices.map(v => v.detuneCents + (v.vibrato ? v.vibrato.extentCents * Math.sin(2 * Math.PI * v.vibrato.rateHz * t + v.vibrato.phase) : 0) +
      (v.wander ?? []).reduce((s, w) => s + w.cents * Math.sin(2 * Math.PI * w.rateHz * t + w.phase), 0))
    const mean = c.reduce((s, x) => s + x, 0) / c.length
    sum += c.reduce((s, x) => s + (x - mean) ** 2, 0) / c.length
    n++
  }
  return Math.sqrt(sum / n)
}

/** The take keeps its tempo within 1 % (rendered exactly in tempo) and every hold starts within 0.1 s of its onset. */
function expectEveryHoldAtItsOnset (m: Measured, holds: Hold[]) {
  expect(Math.abs(m.timeScale - 1)).toBeLessThan(0.01)
  for (const t of holds) {
    const h = m.holds.find(x => x.index === t.index)!
    expect(h.reasonCode, `hold ${t.index}`).toBeNull()
    expect(Math.abs(h.startS - t.onS), `hold ${t.index}`).toBeLessThan(0.1)
  }
}

/** Every centre within 1 ¢ of the mean of the voices, and their median within 0.6 ¢. */
function expectCentresWithin1Cent (m: Measured, holds: Hold[]) {
  const errs = holds.map((t) => {
    const h = m.holds.find(x => x.index === t.index)!
    const err = Math.abs(cents(h.detectedHz!, t.truthHz))
    expect(err, `hold ${t.index}`).toBeLessThan(1)
    return err
  }).sort((a, b) => a - b)
  expect(errs[errs.length >> 1]!).toBeLessThan(0.6)
}

/**
 * The truth lies inside the ± range the report shows on every hold: two standard errors plus a
 * 0.25 ¢ floor (shared/report-wording.ts); over the benchmark's sampled corpus it held the truth
 * on 95 % of the holds.
 */
function expectTruthInsideRange (m: Measured, holds: Hold[]) {
  for (const t of holds) {
    const h = m.holds.find(x => x.index === t.index)!
    const range = centreRangeCents(h.centreErrorCents)
    expect(range, `hold ${t.index}`).not.toBeNull()
    expect(Math.abs(cents(h.detectedHz!, t.truthHz)), `hold ${t.index}`).toBeLessThanOrEqual(range!)
  }
}

/** Every hold reports a spread between its voices within a factor of 2 of the spread asked for. */
function expectSpreadNearAsked (m: Measured, holds: Hold[], voices: Voice[]) {
  for (const t of holds) {
    const h = m.holds.find(x => x.index === t.index)!
    const asked = askedSpread(voices, t.steadyStartS, t.steadyEndS)
    expect(h.voiceSpreadCents, `hold ${t.index}`).not.toBeNull()
    expect(h.voiceSpreadCents!, `hold ${t.index}`).toBeGreaterThan(asked / 2)
    expect(h.voiceSpreadCents!, `hold ${t.index}`).toBeLessThan(asked * 2)
  }
}

describe('sampled section: five voices on one part (choir aahs)', async () => {
  const { m, holds, spec } = await run('section-aahs-5')

  it('finds every hold at its onset and keeps the take\'s tempo within 1 % (rendered exactly in tempo)', () => {
    expect(Math.abs(m.timeScale - 1)).toBeLessThan(0.01)
    for (const t of holds) {
      const h = m.holds.find(x => x.index === t.index)!
      expect(h.reasonCode, `hold ${t.index}`).toBeNull()
      // The voices' beats dip the level every few tenths of a second: none of them is taken for
      // a new note. The repeated E4 (chords 4–5, re-struck 30 ms apart under the beats) is split
      // at its onset or, when the re-strike cannot be told from a beat, at the chord boundary.
      if (h.timing!.onsetS !== null) expect(Math.abs(h.timing!.onsetS - t.onS), `hold ${t.index}`).toBeLessThan(0.1)
      else expect(Math.abs(h.startS - t.onS), `hold ${t.index}`).toBeLessThan(0.1)
    }
  })

  it('measures each centre within 3 ¢ of the mean of the voices, and never claims more than it knows', () => {
    for (const t of holds) {
      const h = m.holds.find(x => x.index === t.index)!
      const err = Math.abs(cents(h.detectedHz!, t.truthHz))
      // A choir patch is itself a recorded chorus, and published estimators disagree on its centre
      // by a few cents (Praat's autocorrelation against aubiopitch: median 3.6 ¢ on the sampled
      // sections of the benchmark), so 3 ¢ is what this patch allows.
      expect(err, `hold ${t.index}`).toBeLessThan(3)
      // Confidence calibration: a hold at 0.8 or more is within 1 ¢.
      if (err > 1) expect(h.confidence, `hold ${t.index}`).toBeLessThan(0.8)
      expect(h.centreErrorCents!, `hold ${t.index}`).toBeGreaterThan(0.5)
    }
  })

  it('reports the spread between the voices on every hold, near what was asked', () => {
    // Within a factor of 2: the patch's own chorus widens what the five voices were asked for.
    expectSpreadNearAsked(m, holds, spec.parts[0].voices as Voice[])
  })
})

describe('sampled section: four singers on one part (voice oohs), each starting on their own', async () => {
  // section-oohs-4: four voices, each detuned (−6…+5 ¢) with its own vibrato (10–22 ¢) and a slow
  // wander of a cent or two, starting up to 31 ms apart. The truth is aubiopitch on each voice
  // rendered alone; Praat's autocorrelation pitch on the same solo renders agreed with it to
  // 0.06 ¢ (median over the five holds) when the fixture was made, so this patch's truth is
  // settled to well under the tolerance below.
  const { m, holds, spec } = await run('section-oohs-4')

  it('finds every hold at its onset', () => {
    expectEveryHoldAtItsOnset(m, holds)
  })

  it('measures each centre within 1 ¢ of the mean of the voices (median within 0.6 ¢)', () => {
    // The target for a section (2–12 voices) is a median within 0.5 ¢ and a p95 within 1.5 ¢ of
    // the mean of the voices' log-frequencies. Weighed by power, the fundamental of an "oo" carried
    // the centre and this fixture's first hold came out 2.7 ¢ off; one vote per harmonic heard
    // brings every hold within 0.8 ¢.
    expectCentresWithin1Cent(m, holds)
  })

  it('tells the voices apart: a spread on every hold, near what was asked', () => {
    expectSpreadNearAsked(m, holds, spec.parts[0].voices as Voice[])
  })

  it('puts the truth inside the ± range the report shows for every hold', () => {
    expectTruthInsideRange(m, holds)
  })

  it('gets the summary\'s note that several voices blur short holds', () => {
    // The holds last about 2.5 s (the fixture's tempo), each with a voice spread told.
    expect(severalVoicesNote(m.holds)).toMatch(/^[2-5] holds of under 3 seconds were sung by several voices at once\./)
  })
})

describe('sampled section: six singers on long tones', async () => {
  // section-oohs-long: six voices (voice oohs) on holds of 4.5 s (40 bpm, three beats), each
  // detuned (−7…+5 ¢) with its own vibrato (9–24 ¢), slow wander and start (up to 35 ms apart):
  // our own choice, in truth.json. The truth is aubiopitch on each voice rendered alone; Praat's
  // autocorrelation pitch on the same solo renders, over the same windows, read 0.35–0.51 ¢ lower
  // when the fixture was made, so the truth itself is settled to about half a cent.
  const { m, holds } = await run('section-oohs-long')

  it('finds every hold at its onset and keeps the take\'s tempo within 1 %', () => {
    expectEveryHoldAtItsOnset(m, holds)
  })

  it('measures each centre within 1 ¢ of the mean of the voices (median within 0.6 ¢), the truth inside the range shown', () => {
    // A section's centre carries a chance error from its voices' beats that falls as the hold
    // grows; on long tones the section target (median 0.5 ¢, p95 1.5 ¢) is within reach, where
    // the holds of about 1.8 s of the benchmark's sections miss it.
    expectCentresWithin1Cent(m, holds)
    expectTruthInsideRange(m, holds)
  })

  it('gets no note that the holds were too short for several voices', () => {
    expect(severalVoicesNote(m.holds)).toBeNull()
  })
})

describe('sampled section: four singers whose beats dip deeper than their repeated notes re-strike', async () => {
  // section-oohs-repeats: four voices (voice oohs) at 60 bpm, each detuned (−4…+4 ¢) with its own
  // vibrato (9–13 ¢) and start (up to 38 ms apart), drifting −30 ¢/min; two repeated E4s re-struck
  // 30 ms apart. Their beats dip the level by up to about 20 dB inside a hold, while the re-strikes,
  // under the patch's slow release, show no dip of their own. Truth: the onsets are the MIDI
  // note-ons FluidSynth rendered (truth.json); the pitches are aubiopitch on each voice rendered alone.
  const { m, holds } = await run('section-oohs-repeats')

  it('keeps the take\'s tempo within 1 % (rendered exactly in tempo)', () => {
    expect(Math.abs(m.timeScale - 1)).toBeLessThan(0.01)
  })

  it('starts every hold within 0.1 s of its onset, and never on a beat between the voices', () => {
    for (const t of holds) {
      const h = m.holds.find(x => x.index === t.index)!
      expect(h.reasonCode, `hold ${t.index}`).toBeNull()
      expect(Math.abs(h.startS - t.onS), `hold ${t.index}`).toBeLessThan(0.1)
      // An onset the take shows is the hold's own; a repeated note whose re-strike cannot be told
      // from a beat is split at the chord boundary under the map and says so.
      if (h.timing!.start === 'onset') expect(Math.abs(h.timing!.onsetS! - t.onS), `hold ${t.index}`).toBeLessThan(0.1)
      else expect(t.index > 0 && holds[t.index - 1]!.midi === t.midi, `hold ${t.index}`).toBe(true)
    }
  })

  it('keeps every hold on its own chord: none runs more than 0.1 s into the next', () => {
    for (const t of holds.slice(0, -1)) {
      const h = m.holds.find(x => x.index === t.index)!
      expect(h.endS, `hold ${t.index}`).toBeLessThan(holds[t.index + 1]!.onS + 0.1)
    }
  })

  it('never claims more than it knows: a hold more than 1 ¢ off stays below confidence 0.8', () => {
    for (const t of holds) {
      const h = m.holds.find(x => x.index === t.index)!
      if (Math.abs(cents(h.detectedHz!, t.truthHz)) > 1) expect(h.confidence, `hold ${t.index}`).toBeLessThan(0.8)
    }
  })
})

describe('one voice on a part reports no spread between voices', async () => {
  // oohs-bass-vibrato: one singer (Voice Oohs) low in the range with a ±15 ¢ vibrato, where the
  // harmonics' spread alone passed the several-voices threshold on two of its six holds.
  it.each(['trumpet-wrong-tie', 'oohs-octave', 'oohs-bass-vibrato'])('%s', async (id) => {
    const { m } = await run(id)
    for (const h of m.holds) if (h.reasonCode === null) expect(h.voiceSpreadCents ?? null, `hold ${h.index}`).toBeNull()
  })
})

// Takes rendered from a sampled soundfont, not from our own synthesiser: FluidSynth 2.3 with
// Debian's TimGM6mb.sf2 (package timgm6mb-soundfont), made by `npx tsx scripts/sampled-corpus.ts
// --fixtures`. The truth of every hold is independent of Driftline: aubiopitch (Debian's
// aubio-tools; multi-comb, YIN where it slips an octave) on each voice rendered alone, log-mean
// over the hold's steady window (tests/fixtures/sampled/truth.json records it with the asked
// offsets and each sampled note's own mistuning).
import { readFileSync } from 'node:fs'
import { join } from 'node:path'
import { describe, expect, it } from 'vitest'
import { computeTargets } from '../../../shared/tuning/index'
import { decodeAudio } from '../../../server/analysis/decode'
import { measureTake } from '../../../server/analysis/measure'
import { scoreMeasurement } from '../../../server/analysis/score'
import { cents } from './helpers'

const dir = join(__dirname, '../../fixtures/sampled')
const truth = JSON.parse(readFileSync(join(dir, 'truth.json'), 'utf8'))
const NAMES: Record<number, string> = { 57: 'A3', 60: 'C4', 62: 'D4', 64: 'E4', 65: 'F4', 67: 'G4', 69: 'A4' }

interface Hold { index: number, midi: number, onS: number, truthHz: number, tied: boolean }

async function run (id: string) {
  const take = truth.takes.find((t: { spec: { id: string } }) => t.spec.id === id)
  const spec = take.spec
  const drill = {
    title: id, key: 'C major', tempo: spec.tempo, a4: 440, tolerance: 10, parts: [{ name: 'P' }],
    chords: spec.beats.map((b: number, i: number) => ({ beats: b, notes: { P: NAMES[spec.parts[0].notes[i]] } })),
  }
  const spb = 60 / spec.tempo
  let beat = 0
  const expected = spec.beats.map((b: number, index: number) => {
    const startS = beat * spb
    beat += b
    const midi = spec.parts[0].notes[index]
    return { index, startS, endS: beat * spb, midi, expectedHz: 440 * Math.pow(2, (midi - 69) / 12) }
  })
  const audio = await decodeAudio(new Uint8Array(readFileSync(join(dir, take.file))))
  const m = measureTake(audio, expected, { trace: false })
  const report = scoreMeasurement(m, computeTargets(drill, { name: 'equal' }), 'P', 10)
  return { m, report, holds: take.holds as Hold[], spec }
}

describe('sampled trumpet: a wrong note and a tied repeat', async () => {
  const { m, report, holds } = await run('trumpet-wrong-tie')

  it('keeps the take\'s tempo within 1 % (rendered exactly in tempo)', () => {
    expect(Math.abs(m.timeScale - 1)).toBeLessThan(0.01)
  })

  it('measures every right note within 2 ¢ of the calibrated truth and finds its onset within 0.1 s', () => {
    for (const t of holds) {
      const h = m.holds.find(x => x.index === t.index)!
      if (t.index === 2) continue
      expect(h.reasonCode, `hold ${t.index}`).toBeNull()
      expect(Math.abs(cents(h.detectedHz!, t.truthHz)), `hold ${t.index}`).toBeLessThan(2)
      if (!t.tied || t.index === 4) expect(Math.abs(h.timing!.onsetS! - t.onS), `hold ${t.index}`).toBeLessThan(0.1)
    }
  })

  it('reports the G4 played for E4 as a wrong note, with the pitch heard', () => {
    const h = report.holds[2]!
    expect(h.reasonCode).toBe('wrong_note')
    expect(h.heardNote).toBe('G4') // E4 + 3 semitones (common practice)
    expect(h.centsFromTarget).toBeNull()
    expect(Math.abs(cents(h.detectedHz!, holds[2]!.truthHz))).toBeLessThan(2)
    expect(report.summary.holdsFound).toBe(5)
  })

  it('splits the tie at the chord boundary and says so', () => {
    expect(m.holds[5]!.timing!.start).toBe('chord_boundary')
    expect(m.holds[5]!.timing!.onsetS).toBeNull()
    // Chord 6 begins 0.8 s + 10 beats at 90 bpm = 7.467 s into the take.
    expect(Math.abs(m.holds[5]!.startS - 7.467)).toBeLessThan(0.1)
  })
})

describe('sampled voice with vibrato: a note an octave low', async () => {
  const { m, report, holds } = await run('oohs-octave')

  it('measures the sung notes within 2 ¢ of the truth, onsets within 0.1 s', () => {
    for (const t of holds) {
      if (t.index === 3) continue
      const h = m.holds.find(x => x.index === t.index)!
      expect(Math.abs(cents(h.detectedHz!, t.truthHz)), `hold ${t.index}`).toBeLessThan(2)
      expect(Math.abs(h.timing!.onsetS! - t.onS), `hold ${t.index}`).toBeLessThan(0.1)
    }
  })

  it('reports A3 sung for A4 as a wrong note an octave below', () => {
    const h = report.holds[3]!
    expect(h.reasonCode).toBe('wrong_note')
    expect(h.heardNote).toBe('A3')
    expect(h.heardCentsFromExpected!).toBeCloseTo(-1200, -1) // within ±5 ¢ of an octave
    expect(h.centsFromTarget).toBeNull()
  })
})

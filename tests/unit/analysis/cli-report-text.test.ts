// The text `driftline analyze` prints for people: a wrong note is named in the same words as on
// the take page and never printed as a tuning deviation; a drift without enough holds says so.
import { describe, expect, it } from 'vitest'
import { formatReport } from '../../../cli/analyze'
import type { TakeReport } from '../../../server/analysis/index'
import type { DrillDocument } from '../../../shared/drill/schema'

// Equal-tempered frequencies at A4 = 440 Hz (standard table): C4 261.626 Hz, E♭4 311.127 Hz,
// E4 329.628 Hz, G4 391.995 Hz. E♭4 is 300 ¢ above C4 (100 ¢ per semitone, common practice).
const drill = { title: 'Fixture drill', key: 'C major', tempo: 60, a4: 440, tolerance: 10 } as unknown as DrillDocument
const hold = (over: Record<string, unknown>) => ({
  index: 0, note: 'C4', member: 'root', startS: 0, endS: 2, targetHz: 261.626, detectedHz: 262.38,
  centsFromTarget: 4.99, centsFromEqual: 4.99, spreadCents: 2, slopeCentsPerS: 0.1, confidence: 0.95, withinTolerance: true,
  reason: null, reasonCode: null, writtenNote: null, equalHz: 261.626, ratio: null, vibrato: null,
  steadyStartS: 0.2, steadyEndS: 1.8, centreErrorCents: 0.2, ...over,
})
const report = {
  take: { durationS: 8, sampleRate: 44100, channels: 1 },
  system: 'equal', a4: 440, part: 'Lead', tolerance: 10, description: 'Equal temperament, A4 = 440 Hz',
  holds: [
    hold({}),
    hold({
      index: 1, startS: 2, endS: 4, detectedHz: 311.127, centsFromTarget: null, centsFromEqual: null, withinTolerance: null,
      spreadCents: null, slopeCentsPerS: null, confidence: 0.58, reasonCode: 'wrong_note', heardNote: 'Eb4', heardCentsFromExpected: 300.0,
      reason: 'Heard a pitch about 3 semitones above C4',
    }),
    hold({ index: 2, note: 'G4', startS: 4, endS: 6, detectedHz: null, centsFromTarget: null, centsFromEqual: null, withinTolerance: null, spreadCents: null, slopeCentsPerS: null, confidence: 0, reasonCode: 'no_pitch', reason: 'no steady pitch where the chord was expected' }),
  ],
  summary: { meanAbsCents: 4.99, withinToleranceShare: 1, driftCentsPerMin: null, holdsFound: 1, holdsExpected: 3, meanCents: 4.99 },
  memberBias: { root: 4.99 }, memberCounts: { root: 1 }, warnings: [], timeScale: 1, offsetS: 0,
} as unknown as TakeReport

describe('driftline analyze text output', () => {
  const text = formatReport(drill, report)

  it('names the wrong note as the take page does, and prints no deviation for it', () => {
    expect(text).toContain('chord 2: Wrong note: heard Eb4, +300 ¢ from the expected C4')
    const row = text.split('\n').find(l => /^\s*2\s/.test(l))!
    expect(row).toContain('wrong note')
    expect(row).toContain('311.127')
    expect(row).not.toMatch(/[+\u2212]\d+\.\d+ ¢/)
    expect(text).not.toContain('undefined')
    expect(text).not.toContain('NaN')
  })

  it('says how closely a measured centre is known, as the take page does', () => {
    // centreErrorCents 0.2: two standard errors plus the 0.25 ¢ floor = 0.65 → ±0.7 ¢.
    const row = text.split('\n').find(l => /^\s*1\s/.test(l))!
    expect(row).toContain('+4.99 ¢ ±0.7 ¢')
  })

  it('says "not enough holds" instead of a drift figure', () => {
    expect(text).toContain('drift: not enough holds')
  })

  it('lists a hold without a pitch under "Not measured", not as a wrong note', () => {
    expect(text).toMatch(/Not measured:\n\s+chord 3 \(G4\): no steady pitch/)
  })
})

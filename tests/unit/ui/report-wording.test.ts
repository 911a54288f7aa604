import { describe, expect, it } from 'vitest'
import { CENTRE_RANGE_FLOOR_CENTS, centreRangeCents, centreRangeText, DRIFT_TOO_FEW, SEVERAL_VOICES_LONG_S, SEVERAL_VOICES_WIDE_CENTS, severalVoicesNote, driftText, formatWholeCents, holdKind, timingText, voicesText, withReferencePitch, wrongNote, wrongNoteText } from '../../../shared/report-wording'
import { computeTargets } from '../../../shared/tuning/index'
import type { DrillDocument } from '../../../shared/drill/schema'

// 100 cents to the equal-tempered semitone, 1200 to the octave (common practice; A. J. Ellis's
// definition of the cent, 1885). Equal-tempered frequencies at A4 = 440 Hz from the standard
// table (C4 261.626 Hz, E♭4 311.127 Hz, A3 220.000 Hz, C5 523.251 Hz).
const C4 = 261.6256
const cents = (f1: number, f2: number) => 1200 * Math.log2(f2 / f1)

const base = { note: 'C4', centsFromTarget: null, centsFromEqual: null, reason: null }

describe('wrong notes are named, never scored', () => {
  it.each([
    // Three semitones above C4 is E♭4: 1200·log2(311.127/261.626) = +300.0 ¢.
    [{ ...base, detectedHz: 311.127, reasonCode: 'wrong_note', heardNote: 'Eb4', heardCentsFromExpected: cents(C4, 311.127) }, 'Wrong note: heard Eb4, +300 ¢ from the expected C4'],
    // Three semitones below C4 is A3 (220 Hz): −300 ¢, with the true minus sign (U+2212).
    [{ ...base, detectedHz: 220, reasonCode: 'wrong_note', heardNote: 'A3', heardCentsFromExpected: cents(C4, 220) }, 'Wrong note: heard A3, \u2212300 ¢ from the expected C4'],
    // An octave error is a wrong note too: C5 is 1200 ¢ above C4.
    [{ ...base, detectedHz: 523.251, reasonCode: 'octave_high', heardNote: 'C5', heardCentsFromExpected: cents(C4, 523.251) }, 'Wrong note: heard C5, +1200 ¢ from the expected C4'],
  ])('%#: %j', (hold, text) => {
    expect(wrongNoteText(hold)).toBe(text)
    expect(holdKind(hold)).toBe('wrong')
  })

  it('reads a report stored before wrong notes were told apart: a hold 294 ¢ sharp of C4 was E♭4', () => {
    // 294 ¢ rounds to 3 semitones; C4 + 3 semitones = E♭4 (common practice).
    const old = { ...base, detectedHz: C4 * 2 ** (294 / 1200), centsFromTarget: 294, centsFromEqual: 294, reasonCode: null }
    expect(wrongNote(old)).toEqual({ heardNote: 'Eb4', cents: 294, expected: 'C4' })
    expect(wrongNoteText(old)).toBe('Wrong note: heard Eb4, +294 ¢ from the expected C4')
    expect(holdKind(old)).toBe('wrong')
  })

  it('a hold within half a semitone is a tuning deviation, however far off', () => {
    // 49 ¢ is under half of the 100-cent semitone: still the expected note, badly tuned.
    const sharp = { ...base, detectedHz: C4 * 2 ** (49 / 1200), centsFromTarget: 49, centsFromEqual: 49, reasonCode: null }
    expect(wrongNote(sharp)).toBeNull()
    expect(holdKind(sharp)).toBe('measured')
  })

  it('keeps the analysis\' sentence when it gives no heard note, and writes display names when asked', () => {
    const sentence = { ...base, detectedHz: null, reasonCode: 'wrong_note', reason: 'Heard a pitch about 3 semitones above C4' }
    expect(wrongNoteText(sentence)).toBe('Wrong note: heard a pitch about 3 semitones above C4')
    const pretty = { ...base, note: 'Bb3', detectedHz: 293.665, reasonCode: 'wrong_note', heardNote: 'D4', heardCentsFromExpected: 400 }
    expect(wrongNoteText(pretty, n => n.replace('b', '\u266d'))).toBe('Wrong note: heard D4, +400 ¢ from the expected B\u266d3')
  })

  it('a hold without a pitch is neither measured nor a wrong note', () => {
    expect(holdKind({ ...base, detectedHz: null, reasonCode: 'no_pitch', reason: 'silence' })).toBe('missing')
  })

  it.each([[300, '+300 ¢'], [-1200, '\u22121200 ¢'], [0.4, '0 ¢'], [299.6, '+300 ¢']])('whole cents %d → %s', (c, s) => {
    expect(formatWholeCents(c)).toBe(s)
  })
})

describe('drift', () => {
  it.each([
    [null, DRIFT_TOO_FEW],
    [undefined, DRIFT_TOO_FEW],
    [Number.NaN, DRIFT_TOO_FEW],
    [-1.23, '\u22121.2 ¢/min'],
    [0.02, '0.0 ¢/min'],
    [4, '+4.0 ¢/min'],
  ])('%s → %s', (d, text) => {
    expect(driftText(d as number | null | undefined)).toBe(text)
  })
  it('says "not enough holds" in those words', () => {
    expect(DRIFT_TOO_FEW).toBe('not enough holds')
  })
})

describe('the reference pitch is named once', () => {
  const drill = (system: DrillDocument['system'], a4: number): DrillDocument => ({
    title: 'Check', key: 'C major', tempo: 60, a4, tolerance: 10, system,
    parts: [{ name: 'Lead' }], chords: [{ beats: 2, notes: { Lead: 'C4' } }],
  } as unknown as DrillDocument)

  it('an equal-temperament description already names A4: it is not repeated', () => {
    const d = computeTargets(drill({ name: 'equal', seventh: 'harmonic', fraction: '1/4' } as DrillDocument['system'], 440)).description
    const text = withReferencePitch(d, 440)
    expect(text.match(/A4 = 440 Hz/g)).toHaveLength(1)
  })

  it('other systems get the reference pitch added once', () => {
    const d = computeTargets(drill({ name: 'just-root', seventh: 'harmonic', fraction: '1/4' } as DrillDocument['system'], 442)).description
    expect(d).not.toContain('A4')
    expect(withReferencePitch(d, 442)).toBe(`${d}, A4 = 442 Hz`)
    expect(withReferencePitch(withReferencePitch(d, 442), 442).match(/A4 =/g)).toHaveLength(1)
  })
})

describe('a hold says when it started against its beat', () => {
  it.each([
    [{ start: 'onset', fromBeatS: 0.123 }, '0.12 s late'],
    [{ start: 'onset', fromBeatS: -0.08 }, '0.08 s early'],
    [{ start: 'onset', fromBeatS: 0.049 }, 'on the beat'],
    [{ start: 'onset', fromBeatS: -0.02 }, 'on the beat'],
    [{ start: 'onset', fromBeatS: null }, '—'],
    [{ start: 'chord_boundary', fromBeatS: null }, 'held over (no new attack)'],
    [null, '—'],
  ] as const)('%j → %s', (t, text) => {
    expect(timingText(t)).toBe(text)
  })
})

describe('a hold sung by several voices says how far apart they are', () => {
  it('rounds to whole cents and says nothing for one voice', () => {
    expect(voicesText(14.4)).toBe('voices about 14 ¢ apart')
    expect(voicesText(8.6)).toBe('voices about 9 ¢ apart')
    expect(voicesText(null)).toBeNull()
    expect(voicesText(undefined)).toBeNull()
    expect(voicesText(Number.NaN)).toBeNull()
  })
})

describe('a hold says how closely its centre is known', () => {
  it('is two standard errors (about 95 % of a normal estimate, common practice) plus the floor, rounded up to 0.1 ¢', () => {
    expect(CENTRE_RANGE_FLOOR_CENTS).toBe(0.25)
    // 2 × 0.5 + 0.25 = 1.25 → 1.3; 2 × 0.1 + 0.25 = 0.45 → 0.5; 2 × 1.2 + 0.25 = 2.65 → 2.7.
    expect(centreRangeCents(0.5)).toBe(1.3)
    expect(centreRangeCents(0.1)).toBe(0.5)
    expect(centreRangeCents(1.2)).toBe(2.7)
    // Exactly on a tenth stays there: 2 × 0.375 + 0.25 = 1.0.
    expect(centreRangeCents(0.375)).toBe(1)
    expect(centreRangeText(0.5)).toBe('±1.3 ¢')
    expect(centreRangeText(0)).toBe('±0.3 ¢')
  })

  it('says nothing without a standard error, and never shows NaN', () => {
    for (const v of [null, undefined, Number.NaN, Number.POSITIVE_INFINITY, -1]) {
      expect(centreRangeCents(v)).toBeNull()
      expect(centreRangeText(v)).toBeNull()
    }
  })
})

describe('the summary says when several voices blur the holds\' centres', () => {
  // Standard errors chosen so the ranges are round: 2 × se + 0.25, rounded up to 0.1 ¢.
  const section = (se: number, durationS = 1.8) => ({ voiceSpreadCents: 12, centreErrorCents: se, startS: 10, endS: 10 + durationS })
  const solo = (se: number) => ({ voiceSpreadCents: null, centreErrorCents: se, startS: 10, endS: 11.8 })

  it('gives the median ± over the short holds sung by several voices, with the advice to hold longer', () => {
    expect(SEVERAL_VOICES_WIDE_CENTS).toBe(1.5)
    expect(SEVERAL_VOICES_LONG_S).toBe(3)
    // Ranges 1.3, 2.7 and 3.3 ¢: the median is 2.7 ¢. Neither the one-voice hold (±0.5 ¢) nor
    // the long tone (4 s, ±5.3 ¢) counts.
    const note = severalVoicesNote([section(0.5), section(1.2), section(1.5), solo(0.1), section(2.5, 4)])
    expect(note).toBe('3 holds of under 3 seconds were sung by several voices at once. Their beats blur the centre of a short hold: ' +
      'these are known to within ±2.7 ¢ (median). Holding each chord for 3 seconds or more narrows it.')
    // Two holds: the mean of the middle pair, (1.3 + 2.7) / 2 = 2.0.
    expect(severalVoicesNote([section(0.5), section(1.2)])).toContain('±2.0 ¢ (median)')
    expect(severalVoicesNote([section(1.2)])).toBe('1 hold of under 3 seconds was sung by several voices at once. Their beats blur the centre ' +
      'of a short hold: it is known to within ±2.7 ¢. Holding each chord for 3 seconds or more narrows it.')
  })

  it('says nothing when the centres are known closely, for long tones, for one voice, or without the figures', () => {
    // 2 × 0.6 + 0.25 = 1.45 → 1.5 ¢: not above the threshold.
    expect(severalVoicesNote([section(0.6), section(0.6)])).toBeNull()
    expect(severalVoicesNote([section(2, 3), section(2, 4.5)])).toBeNull()
    expect(severalVoicesNote([solo(3), solo(4)])).toBeNull()
    expect(severalVoicesNote([{ voiceSpreadCents: 14, centreErrorCents: null, startS: 1, endS: 2 }, { voiceSpreadCents: Number.NaN, centreErrorCents: 3, startS: 1, endS: 2 }])).toBeNull()
    expect(severalVoicesNote([{ voiceSpreadCents: 14, centreErrorCents: 3 }])).toBeNull()
    expect(severalVoicesNote([])).toBeNull()
  })
})

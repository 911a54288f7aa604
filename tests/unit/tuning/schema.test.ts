import { describe, expect, it } from 'vitest'
import { DrillDocument, parseDrill, parseSystem } from '../../../shared/drill/schema'
import { TuningError } from '../../../shared/tuning/index'
import { plainIssueMessage } from '../../../shared/text'

const good = {
  title: 'Long tones',
  key: 'Eb major',
  parts: [{ name: 'Cornet', instrument: 'cornet-bb' }, { name: 'Bass' }],
  chords: [{ beats: 4, notes: { Cornet: 'Bb4', Bass: 'Eb2' } }, { beats: 4, symbol: 'Ab', notes: { Cornet: 'C5', Bass: null } }],
}

function issueOf(input: unknown): TuningError {
  try { parseDrill(input) } catch (e) { return e as TuningError }
  throw new Error('expected a failure')
}

describe('drill documents', () => {
  it('fills in the defaults', () => {
    const d = parseDrill(good)
    expect(d).toMatchObject({ tempo: 60, a4: 440, tolerance: 10, system: { name: 'equal', seventh: 'harmonic', fraction: '1/4' } })
  })

  it('accepts JSON text', () => {
    expect(parseDrill(JSON.stringify(good)).title).toBe('Long tones')
  })

  it('refuses broken JSON with the parser\'s position', () => {
    const e = issueOf('{"title": "x",')
    expect(e.code).toBe('invalid_json')
    expect(e.message).toMatch(/not valid JSON/)
  })

  it.each([
    [{ ...good, title: '' }, 'title'],
    [{ ...good, a4: 470 }, 'a4'],
    [{ ...good, a4: 400 }, 'a4'],
    [{ ...good, tempo: 'fast' }, 'tempo'],
    [{ ...good, key: 'E flat' }, 'key'],
    [{ ...good, parts: [] }, 'parts'],
    [{ ...good, parts: [{ name: 'Cornet' }, { name: 'Cornet' }] }, 'parts.1.name'],
    [{ ...good, parts: [{ name: 'Cornet', instrument: 'kazoo' }, { name: 'Bass' }] }, 'parts.0.instrument'],
    [{ ...good, chords: [{ beats: 0, notes: { Cornet: 'C5', Bass: null } }] }, 'chords.0.beats'],
    [{ ...good, chords: [{ beats: 1, notes: { Cornet: 'C5' } }] }, 'chords.0.notes.Bass'],
    [{ ...good, chords: [{ beats: 1, notes: { Cornet: 'C5', Bass: null, Tuba: 'C2' } }] }, 'chords.0.notes.Tuba'],
    [{ ...good, chords: [good.chords[0], { beats: 1, notes: { Cornet: 'H5', Bass: null } }] }, 'chords.1.notes.Cornet'],
    [{ ...good, system: { name: 'werckmeister' } }, 'system.name'],
    [{ ...good, system: { name: 'meantone', fraction: '2/1' } }, 'system.fraction'],
    [{ ...good, system: { name: 'pythagorean', wolf: 'H' } }, 'system.wolf'],
    [{ ...good, system: { name: 'just-tonic', tonic: 'Bb4' } }, 'system.tonic'],
    [{ ...good, system: { name: 'scala' } }, 'system.scala'],
    [{ ...good, system: { name: 'scala', scala: 'x\n 2\n 3/2\n' } }, 'system.scala'],
    [{ ...good, tolerance: -1 }, 'tolerance'],
  ])('a failing field is named (%#: %s)', (input, path) => {
    const e = issueOf(input)
    expect(e).toBeInstanceOf(TuningError)
    expect(e.code).toBe('invalid_drill')
    expect(e.issues.map(i => i.path)).toContain(path)
    expect(e.message).toContain(path)
  })

  it('the note message says which chord and part', () => {
    const e = issueOf({ ...good, chords: [{ beats: 1, notes: { Cornet: 'H5', Bass: null } }] })
    expect(e.message).toMatch(/chords\.0\.notes\.Cornet: chord 1, part "Cornet": "H5" is not a note name/)
  })

  it('an empty chord is named once, with what to do', () => {
    const e = issueOf({ ...good, chords: [good.chords[0], { beats: 2, notes: {} }] })
    expect(e.issues).toEqual([{ path: 'chords.1.notes', message: 'chord 2 is empty: give every part a note or a rest' }])
  })

  it('a bad .scl inside a drill reports its line', () => {
    const e = issueOf({ ...good, system: { name: 'scala', scala: 'x\n 2\n 3/2\n' } })
    expect(e.message).toMatch(/line 2 declares 2 pitches but only 1 follow/)
  })

  it('parseSystem names the field under "system"', () => {
    expect(() => parseSystem({ name: 'meantone', fraction: 'a quarter' })).toThrow(expect.objectContaining({ path: 'system.fraction' }))
    expect(parseSystem({ name: 'just-root' })).toMatchObject({ seventh: 'harmonic' })
  })

  it('the zod schema itself is still usable by forms', () => {
    expect(DrillDocument.safeParse(good).success).toBe(true)
  })
})

describe('field messages the editor and the routes share', () => {
  // The routes parse with plainIssueMessage as a fallback (server/utils/validate.ts); a field's own
  // words win, so a 400 names the problem as the editor's field does. Limits: shared/drill/schema.ts.
  it('answers a route-style parse in the field\'s own words, never zod\'s', () => {
    const r = DrillDocument.safeParse({ ...good, title: '', a4: 0, tolerance: -5, tempo: 400 }, { error: plainIssueMessage })
    expect(r.success).toBe(false)
    expect(Object.fromEntries(r.error!.issues.map(i => [i.path.join('.'), i.message]))).toEqual({
      title: 'Give the drill a title',
      a4: 'A reference pitch from 415 to 466 Hz',
      tolerance: 'A tolerance above 0 and at most 50 cents',
      tempo: 'A tempo from 20 to 300 beats per minute',
    })
    expect(issueOf({ ...good, a4: 0 }).message).toBe('The drill is not valid: a4: A reference pitch from 415 to 466 Hz')
  })
})

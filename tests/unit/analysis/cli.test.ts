// `driftline analyze` on real files: the JSON shape, the table, and stable error codes.
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, describe, expect, it } from 'vitest'
import { Midi } from '@tonejs/midi'
import { run } from '../../../cli/analyze'
import { encodeWav } from '../../../server/analysis/wav'
import { synthTakeWithTruth } from '../../../server/analysis/synth'

const dir = mkdtempSync(join(tmpdir(), 'driftline-analyze-'))
afterAll(() => rmSync(dir, { recursive: true, force: true }))

const DRILL = {
  title: 'Two thirds', key: 'C major', tempo: 60, tolerance: 10,
  parts: [{ name: 'Bass' }, { name: 'Alto' }],
  chords: [
    { beats: 3, symbol: 'C', notes: { Bass: 'C3', Alto: 'E4' } },
    { beats: 3, symbol: 'F', notes: { Bass: 'F2', Alto: 'A4' } },
  ],
}
// The alto sings both thirds pure (5/4 above the equal-tempered roots C4 and F4; common practice).
const syn = synthTakeWithTruth({
  sampleRate: 44100, durationS: 7.4, timbre: 'voice-alto', seed: 8, snrDb: 35,
  holds: [{ startS: 1.04, endS: 3.8, hz: 261.6255653 * 1.25 }, { startS: 4.04, endS: 6.8, hz: 349.2282315 * 1.25 }],
})
const wavPath = join(dir, 'take.wav')
writeFileSync(wavPath, encodeWav(syn.samples, 44100))
const drillPath = join(dir, 'drill.json')
writeFileSync(drillPath, JSON.stringify(DRILL))

async function cli (...argv: string[]) {
  let out = ''
  let err = ''
  const code = await run(argv, { stdout: s => { out += s }, stderr: s => { err += s } })
  return { code, out, err }
}

describe('driftline analyze', () => {
  it('--json prints exactly the documented fields (plus extras)', async () => {
    const { code, out, err } = await cli('--audio', wavPath, '--drill', drillPath, '--part', 'Alto', '--system', 'just-root', '--json')
    expect(err).toBe('')
    expect(code).toBe(0)
    const j = JSON.parse(out)
    expect(Object.keys(j).slice(0, 6)).toEqual(['take', 'system', 'a4', 'part', 'holds', 'summary'])
    expect(Object.keys(j.take)).toEqual(['durationS', 'sampleRate', 'channels'])
    expect(Object.keys(j.holds[0]).slice(0, 14)).toEqual(['index', 'note', 'member', 'startS', 'endS', 'targetHz', 'detectedHz',
      'centsFromTarget', 'centsFromEqual', 'spreadCents', 'slopeCentsPerS', 'confidence', 'withinTolerance', 'reason'])
    expect(Object.keys(j.summary).slice(0, 5)).toEqual(['meanAbsCents', 'withinToleranceShare', 'driftCentsPerMin', 'holdsFound', 'holdsExpected'])
    expect(j.system).toBe('just-root')
    expect(j.take.sampleRate).toBe(44100)
    // Pure thirds sung exactly: ≈ 0 ¢ from just-root, 1200·log2(5/4) − 400 = −13.686 ¢ from equal.
    for (const h of j.holds) {
      expect(Math.abs(h.centsFromTarget)).toBeLessThan(0.05)
      expect(h.centsFromEqual).toBeCloseTo(-13.686, 1)
    }
  })

  it('prints a table by default, scored against the drill system and a chosen A4', async () => {
    const { code, out } = await cli('--audio', wavPath, '--drill', drillPath, '--part', 'Alto', '--a4', '442', '--tolerance', '5')
    expect(code).toBe(0)
    expect(out).toMatch(/Two thirds — part Alto/)
    expect(out).toMatch(/A4 = 442 Hz · tolerance ±5 ¢/)
    expect(out).toMatch(/2 of 2 holds found/)
    expect(out).toMatch(/Bias by chord member: third/)
    // Two holds cannot tell a drift from scatter: no figure.
    expect(out).toMatch(/drift: not enough holds/)
  })

  it('a wrong note shows the note heard, in the table and the JSON, never a deviation', async () => {
    // The alto sings G4 (E4 + 3 semitones, common practice) in the first chord.
    const wrong = synthTakeWithTruth({
      sampleRate: 44100, durationS: 7.4, timbre: 'voice-alto', seed: 8, snrDb: 35,
      holds: [{ startS: 1.04, endS: 3.8, hz: 261.6255653 * Math.pow(2, 7 / 12) }, { startS: 4.04, endS: 6.8, hz: 349.2282315 * 1.25 }],
    })
    const path = join(dir, 'wrong.wav')
    writeFileSync(path, encodeWav(wrong.samples, 44100))
    const table = await cli('--audio', path, '--drill', drillPath, '--part', 'Alto')
    expect(table.code).toBe(0)
    expect(table.out).toMatch(/heard G4/)
    expect(table.out).toMatch(/1 wrong note/)
    expect(table.out).toMatch(/chord 1: Wrong note: heard G4, \+300 ¢ from the expected E4/)
    const j = JSON.parse((await cli('--audio', path, '--drill', drillPath, '--part', 'Alto', '--json')).out)
    expect(j.holds[0]).toMatchObject({ reasonCode: 'wrong_note', heardNote: 'G4', centsFromTarget: null, withinTolerance: null })
    expect(j.holds[0].heardCentsFromExpected).toBeCloseTo(300, 1)
    expect(j.holds[1].heardNote).toBe('A4')
    expect(j.summary.holdsFound).toBe(1)
  })

  it('reads the drill from a Standard MIDI File', async () => {
    const midi = new Midi()
    midi.header.setTempo(60)
    const bass = midi.addTrack()
    bass.name = 'Bass'
    const alto = midi.addTrack()
    alto.name = 'Alto'
    bass.addNote({ midi: 48, time: 0, duration: 3 }); bass.addNote({ midi: 41, time: 3, duration: 3 })
    alto.addNote({ midi: 64, time: 0, duration: 3 }); alto.addNote({ midi: 69, time: 3, duration: 3 })
    const midPath = join(dir, 'drill.mid')
    writeFileSync(midPath, midi.toArray())
    const { code, out, err } = await cli('--audio', wavPath, '--drill', midPath, '--part', 'Alto', '--key', 'C major', '--system', 'equal', '--json')
    expect(err).toBe('')
    expect(code).toBe(0)
    const j = JSON.parse(out)
    expect(j.holds.map((h: { note: string }) => h.note)).toEqual(['E4', 'A4'])
    for (const h of j.holds) expect(h.centsFromTarget).toBeCloseTo(-13.686, 1)
  })

  it.each([
    [['--drill', 'x.json', '--part', 'Alto'], 2, /usage: --audio FILE is required/],
    [['--audio', 'x.wav', '--drill', 'x.json', '--part', 'Alto', '--system', 'mystery'], 2, /usage: --system must be one of/],
    [['--audio', 'x.wav', '--drill', 'x.json', '--part', 'Alto', '--tolerance', 'ten'], 2, /usage: --tolerance must be a number/],
    [['--audio', 'x.wav', '--drill', 'x.json', '--part', 'Alto', '--bogus'], 2, /usage: .*bogus/],
  ])('bad usage %j → exit %i', async (argv, exit, message) => {
    const { code, err } = await cli(...argv)
    expect(code).toBe(exit)
    expect(err).toMatch(message)
  })

  it('stable codes on stderr for input that cannot be used', async () => {
    const notAudio = join(dir, 'notes.txt')
    writeFileSync(notAudio, 'just some words')
    const silent = join(dir, 'silent.wav')
    writeFileSync(silent, encodeWav(new Float32Array(44100 * 2), 44100))
    const cases: Array<[string[], RegExp]> = [
      [['--audio', join(dir, 'missing.wav'), '--drill', drillPath, '--part', 'Alto'], /^driftline analyze: unreadable_file: /],
      [['--audio', notAudio, '--drill', drillPath, '--part', 'Alto'], /^driftline analyze: not_audio: /],
      [['--audio', silent, '--drill', drillPath, '--part', 'Alto'], /^driftline analyze: silent: /],
      [['--audio', wavPath, '--drill', drillPath, '--part', 'Tenor'], /^driftline analyze: unknown_part: /],
      [['--audio', wavPath, '--drill', notAudio, '--part', 'Alto'], /^driftline analyze: invalid_json: /],
    ]
    for (const [argv, message] of cases) {
      const { code, err, out } = await cli(...argv)
      expect(code, argv.join(' ')).toBe(1)
      expect(err).toMatch(message)
      expect(out).toBe('')
    }
  })
})

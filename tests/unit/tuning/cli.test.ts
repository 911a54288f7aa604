import { mkdtempSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import pkg from '@tonejs/midi'
import { afterAll, describe, expect, it } from 'vitest'
import { run } from '../../../cli/targets'
import { drillOf } from './helpers'

const { Midi } = pkg
const dir = mkdtempSync(join(tmpdir(), 'driftline-targets-'))
afterAll(() => rmSync(dir, { recursive: true, force: true }))

const file = (name: string, content: string | Uint8Array) => {
  const path = join(dir, name)
  writeFileSync(path, content)
  return path
}

async function cli(...argv: string[]) {
  let stdout = ''
  let stderr = ''
  const code = await run(argv, { stdout: s => { stdout += s }, stderr: s => { stderr += s } })
  return { code, stdout, stderr }
}

const pumpPath = file('pump.json', JSON.stringify({
  ...drillOf(['C3 G3 E4 C5', 'A2 A3 E4 C5', 'D3 A3 F4 D5', 'G2 B3 D4 D5', 'C3 G3 E4 C5']),
  title: 'Comma pump',
  parts: [{ name: 'P1' }, { name: 'P2', instrument: 'voice-tenor' }, { name: 'P3' }, { name: 'P4' }],
}))

describe('driftline targets', () => {
  it('--json prints exactly the documented shape', async () => {
    const { code, stdout, stderr } = await cli('--drill', pumpPath, '--system', 'just-common', '--json')
    expect(stderr).toBe('')
    expect(code).toBe(0)
    const out = JSON.parse(stdout)
    for (const k of ['system', 'a4', 'chords', 'driftCents', 'warnings']) expect(out).toHaveProperty(k)
    expect(out.system).toBe('just-common')
    expect(out.a4).toBe(440)
    expect(Array.isArray(out.warnings)).toBe(true)
    for (const c of out.chords) {
      for (const k of ['index', 'startBeat', 'beats', 'symbol', 'root', 'notes']) expect(c).toHaveProperty(k)
      for (const n of c.notes) for (const k of ['part', 'note', 'midi', 'member', 'targetHz', 'centsFromEqual', 'ratio']) expect(n).toHaveProperty(k)
    }
    expect(out.chords.map((c: { startBeat: number }) => c.startBeat)).toEqual([0, 2, 4, 6, 8])
    expect(out.driftCents).toBeCloseTo(-21.506, 3) // one syntonic comma (common practice)
    expect(out.chords[0].notes[0]).toMatchObject({ part: 'P1', note: 'C3', midi: 48, member: 'root', ratio: '1/1' })
    expect(out.chords[0].notes[0].targetHz).toBeCloseTo(130.8127826502993, 9) // MIDI Tuning Standard, C3 at 440
  })

  it('prints a table for people', async () => {
    const { code, stdout } = await cli('--drill', pumpPath, '--system', 'just-common')
    expect(code).toBe(0)
    expect(stdout).toMatch(/Comma pump/)
    expect(stdout).toMatch(/Chord 3 .*pitch centre −21\.51 ¢/)
    expect(stdout).toMatch(/Part\s+Note\s+Written\s+Member\s+Target Hz\s+From equal\s+Ratio/)
    expect(stdout).toMatch(/P2\s+G3\s+G4\s+fifth\s+196\.219\s+\+1\.96 ¢\s+3\/2/) // tenor reads an octave up
    expect(stdout).toMatch(/Drift after the last chord: −21\.506 ¢/)
  })

  it.each([
    [['--system', 'meantone', '--fraction', '1/3'], 'meantone'],
    [['--system', 'meantone', '--fraction', '0.2'], 'meantone'],
    [['--system', 'pythagorean', '--start', 'Eb', '--wolf', 'G#'], 'pythagorean'],
    [['--system', 'just-tonic', '--tonic', 'C'], 'just-tonic'],
    [['--system', 'just-root', '--seventh', '5-limit'], 'just-root'],
    [['--system', 'equal', '--a4', '442'], 'equal'],
  ])('accepts %j', async (args, system) => {
    const { code, stdout, stderr } = await cli('--drill', pumpPath, ...args, '--json')
    expect(stderr).toBe('')
    expect(code).toBe(0)
    expect(JSON.parse(stdout).system).toBe(system)
  })

  it('--a4 moves every target', async () => {
    const out = JSON.parse((await cli('--drill', pumpPath, '--system', 'equal', '--a4', '442', '--json')).stdout)
    expect(out.a4).toBe(442)
    expect(out.chords[0].notes[0].targetHz).toBeCloseTo(442 * 2 ** ((48 - 69) / 12), 9)
  })

  it('--scala reads a .scl file', async () => {
    const scl = file('just.scl', '! just.scl\n!\n5-limit\n 12\n!\n 16/15\n 9/8\n 6/5\n 5/4\n 4/3\n 45/32\n 3/2\n 8/5\n 5/3\n 16/9\n 15/8\n 2/1\n')
    const out = JSON.parse((await cli('--drill', pumpPath, '--system', 'scala', '--scala', scl, '--json')).stdout)
    expect(out.chords[0].notes.find((n: { note: string }) => n.note === 'E4').ratio).toBe('5/2')
  })

  it('reads a MIDI file as the drill', async () => {
    const m = new Midi()
    const t = m.addTrack()
    t.name = 'Horn'
    t.addNote({ midi: 65, ticks: 0, durationTicks: 960 })
    const mid = file('horn.mid', m.toArray())
    const out = JSON.parse((await cli('--drill', mid, '--system', 'equal', '--json')).stdout)
    expect(out.chords[0].notes[0]).toMatchObject({ part: 'Horn', note: 'F4', midi: 65 })
    expect(out.chords[0].beats).toBe(2)
  })

  it.each([
    [['--system', 'equal'], 2, /--drill FILE is required/],
    [['--drill', pumpPath, '--system', 'werckmeister'], 2, /--system must be one of/],
    [['--drill', pumpPath, '--seventh', 'septimal'], 2, /--seventh must be harmonic or 5-limit/],
    [['--drill', pumpPath, '--a4', 'high'], 2, /--a4 must be a number/],
    [['--drill', pumpPath, '--fraction', 'quarter'], 2, /--fraction must be a fraction/],
    [['--drill', pumpPath, '--colour'], 2, /Unknown option '--colour'/],
    [['--drill', pumpPath, '--system', 'scala'], 2, /needs --scala FILE/],
    [['--drill', pumpPath, '--a4', '500'], 1, /A4 must be from 415 to 466 Hz \(got 500\)/],
    [['--drill', join(dir, 'missing.json')], 1, /Cannot read the drill file .*no such file/],
    [['--drill', pumpPath, '--system', 'scala', '--scala', join(dir, 'none.scl')], 1, /Cannot read the Scala file/],
    [['--drill', pumpPath, '--system', 'pythagorean', '--wolf', 'H'], 1, /system\.wolf/],
    [['--drill', pumpPath, '--system', 'meantone', '--fraction', '3/2'], 1, /system\.fraction/],
  ])('%j fails with exit %i and a message on stderr', async (args, exit, message) => {
    const { code, stdout, stderr } = await cli(...args)
    expect(code).toBe(exit)
    expect(stdout).toBe('')
    expect(stderr).toMatch(message)
  })

  it('a drill that fails the schema lists every failing field', async () => {
    const bad = file('bad.json', JSON.stringify({ title: '', parts: [{ name: 'A' }], chords: [{ beats: 1, notes: { A: 'H4' } }] }))
    const { code, stderr } = await cli('--drill', bad, '--system', 'equal')
    expect(code).toBe(1)
    expect(stderr).toMatch(/^ {2}title: /m)
    expect(stderr).toMatch(/^ {2}chords\.0\.notes\.A: chord 1, part "A": "H4" is not a note name/m)
  })

  it('a bad .scl names its line', async () => {
    const scl = file('bad.scl', 'Broken\n 2\n 3/2\n -2/1\n')
    const { code, stderr } = await cli('--drill', pumpPath, '--system', 'scala', '--scala', scl)
    expect(code).toBe(1)
    expect(stderr).toMatch(/line 4: "-2\/1" is not a positive ratio/)
  })

  it('broken JSON and overlapping MIDI notes are reported, not crashed on', async () => {
    expect((await cli('--drill', file('broken.json', '{"title":'))).stderr).toMatch(/not valid JSON/)
    const m = new Midi()
    const t = m.addTrack()
    t.name = 'Alto'
    t.addNote({ midi: 64, ticks: 0, durationTicks: 960 })
    t.addNote({ midi: 67, ticks: 480, durationTicks: 960 })
    const { code, stderr } = await cli('--drill', file('overlap.mid', m.toArray()))
    expect(code).toBe(1)
    expect(stderr).toMatch(/Track 1 "Alto" has overlapping notes in bar 1/)
  })

  it('--help prints the usage and exits 0', async () => {
    const { code, stdout } = await cli('--help')
    expect(code).toBe(0)
    expect(stdout).toMatch(/Usage: driftline targets --drill FILE --system SYSTEM/)
  })
})

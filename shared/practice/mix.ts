// What the practice tones play: the drill's chords as tone events for a chosen mix of parts, a
// looped chord, and the pitch of a drone. Plain functions (no audio), so they are tested directly.
import type { TargetChord } from '../tuning/index'
import { midiToHz, parseKey, parsePitchClass } from '../tuning/pitch'

/**
 * A tone event on a timeline: seconds from the start, length, frequencies sounding together and,
 * optionally, their relative levels (a player's own part louder than the others).
 */
export interface ToneEvent { atS: number, durationS: number, hz: number[], weights?: number[] }

/**
 * all: every part at one level; with-me: every part, the player's own louder; without-me: the
 * others only (the player sings or plays the missing part); mine: the player's part alone.
 */
export type PracticeMix = 'all' | 'with-me' | 'without-me' | 'mine'

/** How much louder the player's own part is than each other part in 'with-me' (about +6 dB). */
export const OWN_PART_WEIGHT = 2

/** A chord's tones for a mix: frequencies with relative weights (empty when nothing sounds). */
export function chordTones(chord: TargetChord, mix: PracticeMix, part: string | null): { hz: number[], weights: number[] } {
  const notes = chord.notes.filter((n) => {
    if (mix === 'all' || !part) return true
    if (mix === 'mine') return n.part === part
    if (mix === 'without-me') return n.part !== part
    return true
  })
  return {
    hz: notes.map(n => n.targetHz),
    weights: notes.map(n => (mix === 'with-me' && n.part === part ? OWN_PART_WEIGHT : 1)),
  }
}

/** The drill as tone events at `tempo`; a short gap between chords lets repeated notes sound again. */
export function drillEvents(chords: TargetChord[], tempo: number, mix: PracticeMix, part: string | null): ToneEvent[] {
  const spb = 60 / tempo
  const gap = Math.min(0.08, spb / 4)
  return chords.map((c) => {
    const t = chordTones(c, mix, part)
    return { atS: c.startBeat * spb, durationS: Math.max(0.2, c.beats * spb - gap), hz: t.hz, weights: t.weights }
  }).filter(e => e.hz.length)
}

/** One chord repeated: its length at the tempo (at least a second) and its events for one turn. */
export function loopEvents(chord: TargetChord, tempo: number, mix: PracticeMix, part: string | null): { periodS: number, events: ToneEvent[] } {
  const periodS = Math.max(1, chord.beats * 60 / tempo)
  const t = chordTones(chord, mix, part)
  const gap = Math.min(0.12, periodS / 8)
  return { periodS, events: t.hz.length ? [{ atS: 0, durationS: periodS - gap, hz: t.hz, weights: t.weights }] : [] }
}

/** `hz` moved by octaves into [lo, 2·lo), about G2 to G3: low under the voices, still heard in small headphones. */
function low(hz: number, lo = 95): number {
  let f = hz
  while (f >= 2 * lo) f /= 2
  while (f < lo) f *= 2
  return f
}

/**
 * Drone pitch on a chord's root: the root's own target when the chord sounds it (so the drone is
 * in tune with the chord in the drill's system), else the root at its equal-tempered place; null
 * when the chord has no root (it cannot be named).
 */
export function rootDroneHz(chord: TargetChord, a4: number): number | null {
  const root = chord.notes.filter(n => n.member === 'root').sort((a, b) => a.targetHz - b.targetHz)[0]
  if (root) return low(root.targetHz)
  if (!chord.root) return null
  try { return low(midiToHz(parsePitchClass(chord.root).chroma + 48, a4)) } catch { return null }
}

/** Drone pitch on the key's tonic at its equal-tempered place (where every system anchors it), low octave. */
export function tonicDroneHz(key: string, a4: number): number | null {
  try { return low(midiToHz(parseKey(key).tonic.chroma + 48, a4)) } catch { return null }
}

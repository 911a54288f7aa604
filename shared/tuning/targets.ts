import type { DrillDocument, SystemName, SystemOptions } from '../drill/schema'
import { parseDrill, parseSystem } from '../drill/schema'
import type { ChordAnalysis, ChordMember } from './chord'
import { analyzeChord } from './chord'
import { TuningError } from './errors'
import type { FixedTuning } from './fixed'
import { justTonic, meantone, pythagorean, scalaTuning } from './fixed'
import type { SeventhOption } from './just'
import { pureRatio, TONIC_SCALES } from './just'
import type { ParsedNote, ParsedPc } from './pitch'
import { checkA4, midiToHz, mod, parseKey, parseNote, parsePitchClass, prettyPc } from './pitch'
import { commaName, Ratio, toRatio } from './ratio'
import { parseScala } from './scala'
import { writtenNote } from './transpose'

export interface TargetNote {
  part: string
  /** Concert-pitch note as spelled in the drill ("Bb3"). */
  note: string
  midi: number
  member: ChordMember | null
  targetHz: number
  equalHz: number
  centsFromEqual: number
  /** Exact ratio to the chord root (in the root's octave at or below the bass), e.g. "5/4", "5/1"; null when irrational. */
  ratio: string | null
  /** The note the player reads (transposing instruments); the concert note when the part has no instrument. */
  writtenNote: string | null
}

export interface TargetChord {
  index: number
  startBeat: number
  beats: number
  symbol: string | null
  root: string | null
  quality: string | null
  /** just-common: offset of the tuning frame after this chord from the starting frame, in cents; else 0. */
  centreCents: number
  notes: TargetNote[]
}

export interface TargetWarning {
  code: string
  chord: number | null
  message: string
}

export interface TargetsResult {
  system: SystemName
  a4: number
  key: string
  tonic: string
  /** How the system was set up, in words ("Meantone, fifths narrowed by 1/4 syntonic comma, …"). */
  description: string
  chords: TargetChord[]
  /** just-common: the pitch centre's offset after the last chord (cents); 0 for the other systems. */
  driftCents: number
  warnings: TargetWarning[]
}

interface Placed {
  note: ParsedNote
  part: string
  dev: number
  ratio: Ratio | null
}

/** Cents above the root reference and exact ratio of each note of a chord tuned pure from its root. */
function pureFromRoot(notes: ParsedNote[], a: ChordAnalysis, seventh: SeventhOption): { dev: number, ratio: Ratio | null }[] {
  return notes.map((n, i) => {
    const role = a.roles[i]!
    const base = role.interval && a.rootRefMidi !== null ? pureRatio(role.interval, a.intervals, seventh) : null
    if (!base || a.rootRefMidi === null) return { dev: 0, ratio: null }
    const semis = n.midi - a.rootRefMidi
    // The ratio is taken in the octave where the note sounds: a third two octaves up is 5/1.
    const k = Math.round((100 * semis - base.cents()) / 1200)
    const ratio = base.octaves(k)
    return { dev: ratio.cents() - 100 * semis, ratio }
  })
}

const chordLabel = (i: number, a: ChordAnalysis, symbol?: string) => {
  const name = symbol ?? a.name
  return `Chord ${i + 1}${name ? ` (${name.replace(/b/g, '♭').replace(/#/g, '♯')})` : ''}`
}

const MEMBER_WORD: Partial<Record<ChordMember, string>> = { second: 'second', third: 'third', fourth: 'fourth', fifth: 'fifth', sixth: 'sixth', seventh: 'seventh', ninth: 'ninth', eleventh: 'eleventh', thirteenth: 'thirteenth', added: 'added tone' }

const fmt = (x: number, digits = 3) => x.toFixed(digits)

// Sums of cents leave −0 and 1e−14 crumbs; a report should say 0.
const clean = (x: number) => (Math.abs(x) < 1e-9 ? 0 : x)

/**
 * Target frequency of every note of a drill in a tuning system: Hz, cents from equal temperament at
 * the reference pitch, and the exact ratio to the chord root where the target is rational. `system`
 * (whole, not merged with the drill's) and `a4` override the drill's own. Throws TuningError on bad
 * input; never returns NaN.
 *
 * just-common: the first chord is tuned as in just-root. Each later chord is pure around its root;
 * pitch classes it shares with the previous sounding chord keep their frequency (octaves apart), and
 * when several shared notes cannot all stay the root goes where they move least (least squares, with
 * a 'held_moved' warning). A chord sharing nothing keeps the pitch centre. The pitch centre of a
 * chord is its root's cents from equal minus the root's cents from equal in the key's fixed 5-limit
 * scale, that scale being shifted so the first chord's centre is 0: it is the cumulative offset of
 * the tuning's frame from the starting frame (I–vi–ii–V–I ends one syntonic comma low, −21.506 ¢).
 */
export function computeTargets(drillInput: DrillDocument | unknown, systemInput?: Partial<SystemOptions> | SystemOptions, a4Input?: number): TargetsResult {
  const drill = parseDrill(drillInput)
  const system = parseSystem(systemInput ?? drill.system)
  const a4 = checkA4(a4Input ?? drill.a4)
  const key = parseKey(drill.key)
  const tonic: ParsedPc = system.tonic ? parsePitchClass(system.tonic, 'system.tonic') : key.tonic
  const warnings: TargetWarning[] = []

  let fixed: FixedTuning | null = null
  let description: string
  switch (system.name) {
    case 'equal': description = `Equal temperament, A4 = ${a4} Hz`; break
    case 'just-root': description = `Just intonation from each chord's root (seventh ${system.seventh === 'harmonic' ? '7/4' : '5-limit'})`; break
    case 'just-common': description = `Just intonation with common tones held (seventh ${system.seventh === 'harmonic' ? '7/4' : '5-limit'}), pitch centre measured against the 5-limit ${key.mode} scale on ${tonic.pc}`; break
    case 'just-tonic': fixed = justTonic(tonic, key.mode); description = fixed.description; break
    case 'pythagorean': fixed = pythagorean(tonic, { start: system.start, wolf: system.wolf, mode: key.mode }); description = fixed.description; break
    case 'meantone': {
      let fraction: Ratio
      try { fraction = toRatio(system.fraction) } catch (e) {
        const why = e instanceof TuningError ? `: ${e.message}` : ''
        throw new TuningError('bad_fraction', `The meantone fraction is not valid${why}`, 'system.fraction')
      }
      fixed = meantone(tonic, fraction, { start: system.start, wolf: system.wolf, mode: key.mode }); description = fixed.description; break
    }
    case 'scala': {
      if (!system.scala) throw new TuningError('scala_missing', 'The scala system needs the text of a Scala .scl file', 'system.scala')
      fixed = scalaTuning(tonic, parseScala(system.scala)); description = fixed.description; break
    }
  }

  // just-common: the pitch centre is read against the key's 5-limit scale, anchored on the first chord.
  const scale = TONIC_SCALES[key.mode]
  const scaleDev = (chroma: number) => {
    const k = mod(chroma - tonic.chroma, 12)
    return scale[k]!.cents() - 100 * k
  }
  let frameShift: number | null = null
  let centre = 0
  let previous: Map<number, { dev: number, name: string }> | null = null

  const chords: TargetChord[] = []
  let beat = 0
  drill.chords.forEach((chord, ci) => {
    const notes: { part: string, note: ParsedNote }[] = []
    for (const part of drill.parts) {
      const name = chord.notes[part.name]
      if (name === null || name === undefined) continue
      notes.push({ part: part.name, note: parseNote(name, `chords.${ci}.notes.${part.name}`) })
    }
    const parsed = notes.map(n => n.note)
    const a = analyzeChord(parsed, chord.symbol)
    const label = chordLabel(ci, a, chord.symbol)
    for (const w of a.warnings) {
      let message = `${label}: ${w.message}`
      if (w.code === 'unnamed_chord') {
        message += system.name === 'just-root' || system.name === 'just-common'
          ? `; its notes are scored against equal temperament${system.name === 'just-common' && centre !== 0 ? ' at the pitch level the progression has reached' : ''}`
          : '; members and ratios are left blank'
      }
      warnings.push({ code: w.code, chord: ci, message })
    }
    let placed: Placed[]
    const rootRef = a.rootRefMidi
    switch (system.name) {
      case 'equal':
        placed = notes.map(n => ({ ...n, dev: 0, ratio: rootRef !== null && mod(n.note.midi - rootRef, 12) === 0 ? Ratio.TWO.pow((n.note.midi - rootRef) / 12) : null }))
        break
      case 'just-root': {
        const pure = pureFromRoot(parsed, a, system.seventh)
        placed = notes.map((n, i) => ({ ...n, ...pure[i]! }))
        break
      }
      case 'just-common': {
        if (!parsed.length) { placed = []; break }
        const pure = pureFromRoot(parsed, a, system.seventh)
        let rootDev: number
        if (!a.root) {
          rootDev = centre
          if (frameShift === null) frameShift = 0
          placed = notes.map(n => ({ ...n, dev: centre, ratio: null }))
        } else {
          if (frameShift === null) {
            rootDev = 0
            frameShift = -scaleDev(a.root.chroma)
          } else {
            const held: { chroma: number, need: number, name: string }[] = []
            const seen = new Set<number>()
            parsed.forEach((n, i) => {
              const before = previous?.get(n.chroma)
              if (before && !seen.has(n.chroma)) {
                seen.add(n.chroma)
                held.push({ chroma: n.chroma, need: before.dev - pure[i]!.dev, name: n.pc })
              }
            })
            if (held.length) {
              // Held notes that cannot all stay (their interval differs between the two pure chords)
              // share the difference: the root goes where the held notes move least (least squares).
              rootDev = held.reduce((s, h) => s + h.need, 0) / held.length
              const spread = Math.max(...held.map(h => h.need)) - Math.min(...held.map(h => h.need))
              if (spread > 0.001) {
                const moves = held.map(h => `${prettyPc(h.name)} ${rootDev - h.need >= 0 ? '+' : '−'}${fmt(Math.abs(rootDev - h.need))} ¢`).join(', ')
                warnings.push({ code: 'held_moved', chord: ci, message: `${label}: the common tones cannot all stay where they were in a pure chord; they move ${moves}` })
              }
            } else {
              rootDev = scaleDev(a.root.chroma) + frameShift + centre
            }
          }
          centre = rootDev - scaleDev(a.root.chroma) - frameShift
          placed = notes.map((n, i) => ({ ...n, dev: rootDev + pure[i]!.dev, ratio: pure[i]!.ratio }))
        }
        previous = new Map(placed.map(p => [p.note.chroma, { dev: p.dev, name: p.note.pc }]))
        break
      }
      default: {
        const f = fixed!
        const rootPlace = rootRef !== null ? f.place(rootRef) : null
        placed = notes.map(n => {
          const p = f.place(n.note.midi)
          if (!p) {
            warnings.push({ code: 'not_in_scale', chord: ci, message: `${label}: ${prettyPc(n.note.name)} (${n.part}) is not within 50 ¢ of any degree of the scale; it is scored against equal temperament` })
            return { ...n, dev: 0, ratio: null }
          }
          return { ...n, dev: p.dev, ratio: p.exact && rootPlace?.exact ? p.exact.div(rootPlace.exact) : null }
        })
        if (system.name === 'just-tonic' && a.root) commaWarnings(ci, label, a, parsed, placed, warnings)
        if (f.wolf) {
          const chromas = new Set(parsed.map(n => n.chroma))
          if (chromas.has(f.wolf.lowerChroma) && chromas.has(f.wolf.upperChroma)) {
            warnings.push({ code: 'wolf', chord: ci, message: `${label}: ${prettyPc(f.wolf.lower)}–${prettyPc(f.wolf.upper)} is the wolf fifth (${fmt(f.wolf.cents)} ¢ instead of a fifth)` })
          }
        }
      }
    }

    const out: TargetNote[] = placed.map((p, i) => {
      const eq = midiToHz(p.note.midi, a4)
      const part = drill.parts.find(x => x.name === p.part)!
      return {
        part: p.part,
        note: p.note.name,
        midi: p.note.midi,
        member: a.roles[i]!.member,
        targetHz: eq * 2 ** (p.dev / 1200),
        equalHz: eq,
        centsFromEqual: clean(p.dev),
        ratio: p.ratio ? p.ratio.toString() : null,
        writtenNote: part.instrument ? writtenNote(p.note.name, part.instrument) : p.note.name,
      }
    })
    for (const n of out) {
      if (!Number.isFinite(n.targetHz) || !Number.isFinite(n.centsFromEqual)) {
        throw new TuningError('internal', `${label}: no finite target for ${n.note}`, `chords.${ci}`)
      }
    }
    chords.push({
      index: ci,
      startBeat: beat,
      beats: chord.beats,
      symbol: chord.symbol ?? null,
      root: a.root?.pc ?? null,
      quality: a.quality,
      centreCents: system.name === 'just-common' ? clean(centre) : 0,
      notes: out,
    })
    beat += chord.beats
  })

  return {
    system: system.name,
    a4,
    key: key.name,
    tonic: tonic.pc,
    description,
    chords,
    driftCents: system.name === 'just-common' ? clean(centre) : 0,
    warnings,
  }
}

/** just-tonic: warns on every root-to-member interval of a chord that the fixed scale puts a comma off pure. */
function commaWarnings(ci: number, label: string, a: ChordAnalysis, notes: ParsedNote[], placed: Placed[], warnings: TargetWarning[]) {
  const seen = new Set<number>()
  notes.forEach((n, i) => {
    const role = a.roles[i]!
    const actual = placed[i]!.ratio
    if (!actual || !role.interval || role.member === 'root' || seen.has(n.chroma)) return
    seen.add(n.chroma)
    const pure = pureRatio(role.interval, a.intervals, '5-limit')
    if (!pure) return
    const got = actual.reduceOctave()
    const want = pure.reduceOctave()
    if (got.equals(want)) return
    const diff = got.cents() - want.cents()
    const comma = commaName(got, want)
    const what = comma ? `${comma.name} (${comma.ratio}, ${fmt(comma.ratio.cents())} ¢)` : `${fmt(Math.abs(diff))} ¢`
    warnings.push({
      code: 'comma',
      chord: ci,
      message: `${label}: the ${MEMBER_WORD[role.member ?? 'added'] ?? 'note'} ${prettyPc(a.root!.pc)}–${prettyPc(n.pc)} is ${got} (${fmt(got.cents())} ¢), ${what} ${diff < 0 ? 'narrower' : 'wider'} than pure ${want} (${fmt(want.cents())} ¢)`,
    })
  })
}

// Reads a partwise MusicXML score (or a compressed .mxl) into a drill: every part, and every voice
// within a part, becomes a drill part; a chord starts wherever the sounding set changes; tied
// notes are one note; transposing parts are read at concert pitch.
import { unzipSync, strFromU8 } from 'fflate'
import { TuningError } from '../tuning/errors'
import { INSTRUMENTS } from '../tuning/transpose'
import { mod } from '../tuning/pitch'
import { DrillDocument as DrillSchema, SystemOptions, type DrillDocument, type DrillInput } from './schema'
import { child, childrenOf, childText, parseXml, type XmlElement } from './xml'
import { SETTINGS_FIELD } from './export-musicxml'

export interface ScoreImportOptions {
  /** Replaces the score's own title. */
  title?: string
  /** The uploaded file's name: the title when neither `title` nor the score gives one. */
  fileName?: string
  /** Bars to keep (the score's bar numbers, inclusive). */
  bars?: BarRange
  /** Notes a person should know about the import (what was done with crossing voices, and where). */
  warnings?: string[]
}

export interface BarRange { from: number, to: number }

/** Reads "3-6" (or "3–6", or "4") as a bar range; throws TuningError('invalid_bars'). */
export function parseBars(text: string | undefined | null): BarRange | undefined {
  if (text == null || !text.trim()) return undefined
  const m = /^\s*(\d{1,5})\s*(?:[-–]\s*(\d{1,5}))?\s*$/.exec(text)
  if (!m) throw new TuningError('invalid_bars', `"${text}" is not a bar range such as 3-6`, 'bars')
  const from = Number(m[1])
  const to = m[2] === undefined ? from : Number(m[2])
  if (to < from) throw new TuningError('invalid_bars', `The bar range ${from}-${to} ends before it starts`, 'bars')
  return { from, to }
}


const EPS = 1e-6
/** Largest unpacked score read from an .mxl file. */
const MAX_SCORE_BYTES = 32 * 1024 * 1024
const LETTERS = ['C', 'D', 'E', 'F', 'G', 'A', 'B']
const NATURAL = [0, 2, 4, 5, 7, 9, 11]
const NEUTRAL = ['C', 'C#', 'D', 'Eb', 'E', 'F', 'F#', 'G', 'Ab', 'A', 'Bb', 'B']
const MAJOR_BY_FIFTHS = ['Cb', 'Gb', 'Db', 'Ab', 'Eb', 'Bb', 'F', 'C', 'G', 'D', 'A', 'E', 'B', 'F#', 'C#']
const MINOR_BY_FIFTHS = ['Ab', 'Eb', 'Bb', 'F', 'C', 'G', 'D', 'A', 'E', 'B', 'F#', 'C#', 'G#', 'D#', 'A#']

/** Chord-symbol suffix for a MusicXML <kind> value when the file gives no text of its own. */
export const KIND_SUFFIX: Record<string, string> = {
  'major': '', 'minor': 'm', 'augmented': 'aug', 'diminished': 'dim', 'dominant': '7',
  'major-seventh': 'maj7', 'minor-seventh': 'm7', 'diminished-seventh': 'dim7', 'augmented-seventh': 'aug7',
  'half-diminished': 'm7b5', 'major-minor': 'm(maj7)', 'major-sixth': '6', 'minor-sixth': 'm6',
  'dominant-ninth': '9', 'major-ninth': 'maj9', 'minor-ninth': 'm9', 'suspended-second': 'sus2',
  'suspended-fourth': 'sus4', 'power': '5',
}

const q = (x: number) => Math.round(x * 1e6) / 1e6

function spellAt(letter: number, octave: number, midi: number): string | null {
  const alt = midi - ((octave + 1) * 12 + NATURAL[letter]!)
  if (Math.abs(alt) > 2) return null
  return `${LETTERS[letter]}${alt > 0 ? '#'.repeat(alt) : 'b'.repeat(-alt)}${octave}`
}

function neutralName(midi: number): string {
  return `${NEUTRAL[mod(midi, 12)]}${Math.floor(midi / 12) - 1}`
}

interface Transpose { diatonic: number, chromatic: number, octaveChange: number }

/** Concert pitch of a written note: <transpose> says what to add to the written pitch (MusicXML 4.0). */
export function soundingNote(step: string, alter: number, octave: number, tr: Transpose | null): { midi: number, name: string } {
  const letter = LETTERS.indexOf(step)
  const written = (octave + 1) * 12 + NATURAL[letter]! + alter
  if (!tr) return { midi: written, name: spellAt(letter, octave, written) ?? neutralName(written) }
  const midi = written + tr.chromatic + 12 * tr.octaveChange
  const steps = letter + tr.diatonic + 7 * tr.octaveChange
  const name = spellAt(mod(steps, 7), octave + Math.floor(steps / 7), midi) ?? neutralName(midi)
  return { midi, name }
}

interface Item {
  voice: string
  start: number
  end: number
  midi: number | null
  name: string | null
  tieStart: boolean
  chain: number
}

interface PartRead {
  id: string
  name: string
  instrumentNames: string[]
  items: Item[]
  transpose: Transpose | null
  octaveClef: boolean
  keys: { time: number, fifths: number, mode: string }[]
  tempos: { time: number, bpm: number }[]
  harmonies: { time: number, symbol: string }[]
  measureLengths: number[]
}

/** Unpacks a compressed MusicXML file (.mxl): the score named by META-INF/container.xml. */
export function readMxl(bytes: Uint8Array): string {
  let files: Record<string, Uint8Array>
  let tooLarge: string | null = null
  try {
    // Only the container and scores are unpacked, and none larger than a score can reasonably be.
    files = unzipSync(bytes, {
      filter: (f) => {
        const wanted = f.name === 'META-INF/container.xml' || /\.(musicxml|xml)$/i.test(f.name)
        if (wanted && f.originalSize > MAX_SCORE_BYTES) tooLarge = f.name
        return wanted && f.originalSize <= MAX_SCORE_BYTES
      },
    })
  } catch {
    throw new TuningError('mxl_unreadable', 'The compressed MusicXML file (.mxl) cannot be unpacked; it is not a valid zip archive')
  }
  if (tooLarge) throw new TuningError('mxl_too_large', `"${tooLarge}" in the .mxl file unpacks to more than ${MAX_SCORE_BYTES / 1024 / 1024} MB; a drill's score is far smaller`)
  const container = files['META-INF/container.xml']
  let path: string | undefined
  if (container) {
    const root = parseXml(strFromU8(container))
    const rootfile = childrenOf(child(root, 'rootfiles'), 'rootfile')
      .find(r => !r.attrs['media-type'] || r.attrs['media-type'] === 'application/vnd.recordare.musicxml+xml')
    path = rootfile?.attrs['full-path']
    if (path && !files[path]) throw new TuningError('mxl_unreadable', `The .mxl file's container names "${path}", which is not in the archive`)
  }
  path ??= Object.keys(files).find(f => !f.startsWith('META-INF/') && /\.(musicxml|xml)$/i.test(f))
  if (!path) throw new TuningError('mxl_unreadable', 'The .mxl file holds no MusicXML score (no META-INF/container.xml and no .musicxml file)')
  return strFromU8(files[path]!)
}

function num(text: string, fallback = 0): number {
  const n = Number(text)
  return text !== '' && Number.isFinite(n) ? n : fallback
}

function readPart(part: XmlElement, info: { name: string, instrumentNames: string[] }, warnings: Set<string>, barLabels: string[]): PartRead {
  const out: PartRead = { id: part.attrs.id ?? '', name: info.name, instrumentNames: info.instrumentNames, items: [], transpose: null, octaveClef: false, keys: [], tempos: [], harmonies: [], measureLengths: [] }
  let divisions = 1
  let transpose: Transpose | null = null
  let measureStart = 0
  let chain = 0
  const measures = childrenOf(part, 'measure')
  measures.forEach((measure, mi) => {
    barLabels[mi] ??= measure.attrs.number ?? String(mi + 1)
    const bar = barLabels[mi]
    let cursor = 0
    let maxPos = 0
    let lastStart = 0
    const at = () => measureStart + cursor
    const tempoFrom = (sound: XmlElement | undefined) => {
      const t = num(sound?.attrs.tempo ?? '', NaN)
      if (t > 0) out.tempos.push({ time: at(), bpm: t })
    }
    for (const el of measure.children) {
      switch (el.name) {
        case 'attributes': {
          const d = num(childText(el, 'divisions'), NaN)
          if (d > 0) divisions = d
          const key = child(el, 'key')
          if (key && child(key, 'fifths')) out.keys.push({ time: at(), fifths: num(childText(key, 'fifths')), mode: childText(key, 'mode') || 'major' })
          const tr = child(el, 'transpose')
          if (tr) {
            const chromatic = num(childText(tr, 'chromatic'))
            transpose = { chromatic, octaveChange: num(childText(tr, 'octave-change')), diatonic: child(tr, 'diatonic') ? num(childText(tr, 'diatonic')) : Math.round(chromatic * 7 / 12) }
            if (!transpose.chromatic && !transpose.octaveChange && !transpose.diatonic) transpose = null
            out.transpose ??= transpose
          }
          for (const clef of childrenOf(el, 'clef')) {
            if (childText(clef, 'sign') === 'G' && num(childText(clef, 'clef-octave-change')) === -1) out.octaveClef = true
          }
          break
        }
        case 'sound': tempoFrom(el); break
        case 'direction': {
          tempoFrom(child(el, 'sound'))
          for (const dt of childrenOf(el, 'direction-type')) {
            const m = child(dt, 'metronome')
            const perMinute = num(childText(m, 'per-minute'), NaN)
            if (m && perMinute > 0 && !child(el, 'sound')?.attrs.tempo) {
              const unit = { whole: 4, half: 2, quarter: 1, eighth: 0.5, '16th': 0.25 }[childText(m, 'beat-unit')] ?? 1
              out.tempos.push({ time: at(), bpm: perMinute * unit * (child(m, 'beat-unit-dot') ? 1.5 : 1) })
            }
          }
          break
        }
        case 'harmony': {
          const root = child(el, 'root')
          if (!root) break
          const alter = num(childText(root, 'root-alter'))
          const kind = child(el, 'kind')
          const suffix = kind?.attrs.text ?? KIND_SUFFIX[kind?.text ?? 'major'] ?? ''
          const bass = child(el, 'bass')
          const bassName = bass ? `/${childText(bass, 'bass-step')}${accidental(num(childText(bass, 'bass-alter')))}` : ''
          const offset = num(childText(el, 'offset')) / divisions
          const symbol = `${childText(root, 'root-step')}${accidental(alter)}${suffix}${bassName}`.slice(0, 20)
          if (kind?.text !== 'none') out.harmonies.push({ time: q(at() + offset), symbol })
          break
        }
        case 'backup': cursor -= num(childText(el, 'duration')) / divisions; break
        case 'forward': {
          // A forward within a voice is an invisible rest in that voice.
          const dur = num(childText(el, 'duration')) / divisions
          const voice = childText(el, 'voice')
          if (voice && dur > 0) out.items.push({ voice, start: q(measureStart + cursor), end: q(measureStart + cursor + dur), midi: null, name: null, tieStart: false, chain: ++chain })
          cursor += dur
          maxPos = Math.max(maxPos, cursor)
          break
        }
        case 'barline':
          if (child(el, 'repeat')) warnings.add('The score has repeat signs; the drill follows the music as written, without repeats')
          break
        case 'note': {
          if (child(el, 'grace')) break // grace notes take no time of their own
          const dur = num(childText(el, 'duration')) / divisions
          const isChord = !!child(el, 'chord')
          const start = isChord ? lastStart : cursor
          if (!isChord) { lastStart = cursor; cursor += dur }
          maxPos = Math.max(maxPos, cursor)
          if (dur <= 0) break
          const voice = childText(el, 'voice') || '1'
          const pitch = child(el, 'pitch')
          let midi: number | null = null
          let name: string | null = null
          if (pitch && !child(el, 'cue')) {
            const step = childText(pitch, 'step').toUpperCase()
            let alter = num(childText(pitch, 'alter'))
            if (!LETTERS.includes(step)) throw new TuningError('musicxml_invalid', `Bar ${bar} of "${info.name}": a note has no valid <step> (got "${childText(pitch, 'step')}")`, `bar ${bar}`)
            if (!Number.isInteger(alter)) {
              warnings.add(`Bar ${bar} of "${info.name}": a microtonal alteration (${alter}) was rounded to the nearest semitone`)
              alter = Math.round(alter)
            }
            const octave = num(childText(pitch, 'octave'), NaN)
            if (!Number.isInteger(octave)) throw new TuningError('musicxml_invalid', `Bar ${bar} of "${info.name}": a note has no valid <octave>`, `bar ${bar}`)
            const sounding = soundingNote(step, alter, octave, transpose)
            if (sounding.midi < 0 || sounding.midi > 127) throw new TuningError('musicxml_invalid', `Bar ${bar} of "${info.name}": the note ${sounding.name} is outside the MIDI range`, `bar ${bar}`)
            midi = sounding.midi
            name = sounding.name
          }
          const ties = [...childrenOf(el, 'tie'), ...childrenOf(child(el, 'notations'), 'tied')].map(t => t.attrs.type)
          out.items.push({ voice, start: q(measureStart + start), end: q(measureStart + start + dur), midi, name, tieStart: ties.includes('start') || ties.includes('continue'), chain: ++chain })
          break
        }
      }
    }
    out.measureLengths.push(q(Math.max(maxPos, cursor)))
    measureStart = q(measureStart + Math.max(maxPos, cursor))
  })
  return out
}

function accidental(alter: number): string {
  return alter > 0 ? '#'.repeat(alter) : alter < 0 ? 'b'.repeat(-alter) : ''
}

/** Merges tied notes: a note tied to the next one of the same pitch in the same voice shares its chain. */
function linkTies(items: Item[]): void {
  const byVoice = new Map<string, Item[]>()
  for (const it of items) if (it.midi !== null) (byVoice.get(it.voice) ?? byVoice.set(it.voice, []).get(it.voice)!).push(it)
  for (const list of byVoice.values()) {
    list.sort((a, b) => a.start - b.start)
    for (const it of list) {
      if (!it.tieStart) continue
      const next = list.find(n => n !== it && n.midi === it.midi && Math.abs(n.start - it.end) < EPS)
      if (next) next.chain = it.chain
    }
  }
}

const VOICE_WORDS: Record<string, string> = {
  s: 'Soprano', sop: 'Soprano', soprano: 'Soprano', sopranos: 'Soprano', a: 'Alto', alt: 'Alto', alto: 'Alto', altos: 'Alto',
  t: 'Tenor', ten: 'Tenor', tenor: 'Tenor', tenors: 'Tenor', b: 'Bass', bs: 'Bass', bass: 'Bass', basses: 'Bass',
  bar: 'Baritone', bari: 'Baritone', baritone: 'Baritone', baritones: 'Baritone', mezzo: 'Mezzo', mez: 'Mezzo',
}

/** Names for the `count` drill parts a score part becomes: its own name split ("Soprano/Alto", "S. A.", "TB"), else numbered. */
export function voiceNames(partName: string, count: number): string[] {
  if (count === 1) return [partName]
  const bySign = partName.split(/\s*(?:\/|&|\+|,|\band\b)\s*/i).map(s => s.trim()).filter(Boolean)
  if (bySign.length === count) return bySign.map(s => VOICE_WORDS[s.toLowerCase().replace(/\.$/, '')] ?? s)
  const words = partName.split(/[\s.]+/).filter(Boolean)
  if (words.length === count && words.every(w => VOICE_WORDS[w.toLowerCase()])) return words.map(w => VOICE_WORDS[w.toLowerCase()]!)
  if (words.length === 1 && /^[satb]+$/i.test(partName) && partName.length === count) return [...partName.toLowerCase()].map(c => VOICE_WORDS[c]!)
  return Array.from({ length: count }, (_, i) => `${partName.slice(0, 56)} ${i + 1}`)
}

function normalise(s: string): string {
  return s.toLowerCase().replace(/♭/g, 'b').replace(/♯/g, '#').replace(/[()]/g, ' ').replace(/\s+/g, ' ').trim()
}

/** The instrument of a part: its label exactly, else (for a transposing part) the best match by name among instruments of that transposition. */
export function guessInstrument(names: string[], writtenMinusConcert: number, octaveClef: boolean): string | undefined {
  const wanted = names.map(normalise).filter(Boolean)
  const all = Object.values(INSTRUMENTS).filter(i => i.id !== 'concert')
  // The label itself (our export writes it): the notes are read at concert pitch either way.
  const exact = all.find(i => wanted.includes(normalise(i.label)))
  if (exact) return exact.id
  if (!writtenMinusConcert) {
    if (octaveClef && wanted.some(w => /\bten/.test(w))) return 'voice-tenor'
    return undefined
  }
  const words = new Set(wanted.flatMap(w => w.split(/[^a-z#]+/)).map(w => (w === 'sax' ? 'saxophone' : w)).filter(w => w.length > 2))
  let best: { id: string, score: number, size: number } | undefined
  for (const i of all.filter(i => i.semitones === writtenMinusConcert)) {
    const label = normalise(i.label).split(/[^a-z#]+/).filter(w => w.length > 2 && !['clef', 'treble', 'pitch', 'concert'].includes(w))
    const score = label.filter(w => words.has(w)).length
    if (score > 0 && (!best || score > best.score || (score === best.score && label.length < best.size))) best = { id: i.id, score, size: label.length }
  }
  return best?.id
}

function keyName(fifths: number, mode: string): string {
  const f = Math.max(-7, Math.min(7, Math.round(fifths)))
  return mode === 'minor' ? `${MINOR_BY_FIFTHS[f + 7]} minor` : `${MAJOR_BY_FIFTHS[f + 7]} major`
}

interface DrillPartSeq { name: string, instrument?: string, source: number, states: { start: number, end: number, chain: number | null, name: string | null, midi: number | null }[] }

/**
 * A drill from MusicXML text (partwise). Errors (TuningError) name the bar: not XML, not a
 * partwise score, no pitched notes, a bar range outside the score, more than 16 parts.
 */
export function musicXmlToDrill(text: string, opts: ScoreImportOptions = {}): DrillDocument {
  const warnings = new Set<string>()
  const root = parseXml(text)
  if (root.name === 'score-timewise') throw new TuningError('musicxml_timewise', 'This MusicXML score is timewise; save it as a partwise score (what notation programs write by default) and import it again')
  if (root.name !== 'score-partwise') throw new TuningError('not_musicxml', `This XML file is not a MusicXML score (its root element is <${root.name}>, not <score-partwise>)`)

  const partInfo = new Map<string, { name: string, instrumentNames: string[] }>()
  childrenOf(child(root, 'part-list'), 'score-part').forEach((sp, i) => {
    const name = (childText(sp, 'part-name') || childText(sp, 'part-abbreviation') || `Part ${i + 1}`).replace(/\s+/g, ' ').trim().slice(0, 60)
    partInfo.set(sp.attrs.id ?? '', { name, instrumentNames: childrenOf(sp, 'score-instrument').map(si => childText(si, 'instrument-name')).filter(Boolean) })
  })
  const barLabels: string[] = []
  const parts = childrenOf(root, 'part').map((p, i) => readPart(p, partInfo.get(p.attrs.id ?? '') ?? { name: `Part ${i + 1}`, instrumentNames: [] }, warnings, barLabels))
  if (!parts.length) throw new TuningError('no_pitched_notes', 'The score has no parts')

  // Bars line up across parts: a bar lasts as long as its longest part.
  const barCount = Math.max(...parts.map(p => p.measureLengths.length))
  const barStarts: number[] = [0]
  for (let m = 0; m < barCount; m++) barStarts.push(q(barStarts[m]! + Math.max(0, ...parts.map(p => p.measureLengths[m] ?? 0))))
  // Each part measured time from its own bar starts; move every event onto the shared ones.
  for (const p of parts) {
    let own = 0
    const shift: number[] = p.measureLengths.map((len, m) => { const s = barStarts[m]! - own; own = q(own + len); return s })
    const ownStarts = p.measureLengths.reduce<number[]>((acc, len) => { acc.push(q(acc[acc.length - 1]! + len)); return acc }, [0])
    const moveTime = (t: number, isEnd: boolean) => {
      let m = 0
      while (m + 1 < ownStarts.length - 1 && (isEnd ? t > ownStarts[m + 1]! + EPS : t >= ownStarts[m + 1]! - EPS)) m++
      return q(t + (shift[m] ?? 0))
    }
    for (const it of p.items) { it.start = moveTime(it.start, false); it.end = moveTime(it.end, true) }
    for (const h of p.harmonies) h.time = moveTime(h.time, false)
    for (const k of p.keys) k.time = moveTime(k.time, false)
    for (const t of p.tempos) t.time = moveTime(t.time, false)
  }
  const barAt = (t: number) => {
    let m = 0
    while (m + 1 < barCount && t >= barStarts[m + 1]! - EPS) m++
    return barLabels[m] ?? String(m + 1)
  }

  // The bar range, by the score's own bar numbers.
  let windowStart = 0
  let windowEnd = barStarts[barCount]!
  if (opts.bars) {
    const numbers = barLabels.map(l => Number.parseInt(l, 10))
    const first = numbers.indexOf(opts.bars.from)
    const last = numbers.lastIndexOf(opts.bars.to)
    const known = numbers.filter(Number.isFinite)
    const span = known.length ? `${Math.min(...known)}–${Math.max(...known)}` : 'none'
    if (first < 0) throw new TuningError('invalid_bars', `Bar ${opts.bars.from} is not in this score (its bars are numbered ${span})`, 'bars')
    if (last < 0) throw new TuningError('invalid_bars', `Bar ${opts.bars.to} is not in this score (its bars are numbered ${span})`, 'bars')
    windowStart = barStarts[first]!
    windowEnd = barStarts[last + 1]!
  }
  const where = opts.bars ? ` in bars ${opts.bars.from}–${opts.bars.to}` : ''

  for (const p of parts) {
    linkTies(p.items)
    p.items = p.items
      .map(it => ({ ...it, start: Math.max(it.start, windowStart), end: Math.min(it.end, windowEnd) }))
      .filter(it => it.end - it.start > EPS)
  }
  if (!parts.some(p => p.items.some(it => it.midi !== null))) {
    throw new TuningError('no_pitched_notes', `The score has no pitched notes${where}; a drill needs notes to tune`)
  }

  // Every part becomes one drill part per voice (and per note of a chord within a voice), top to bottom.
  const seqs: DrillPartSeq[] = []
  parts.forEach((p, pi) => {
    if (!p.items.some(it => it.midi !== null)) {
      warnings.add(`"${p.name}" has no notes${where} and was left out`)
      return
    }
    const weight = new Map<string, { sum: number, dur: number }>()
    for (const it of p.items) {
      if (it.midi === null) continue
      const w = weight.get(it.voice) ?? { sum: 0, dur: 0 }
      w.sum += it.midi * (it.end - it.start)
      w.dur += it.end - it.start
      weight.set(it.voice, w)
    }
    const voices = [...weight.keys()].sort((a, b) => weight.get(b)!.sum / weight.get(b)!.dur - weight.get(a)!.sum / weight.get(a)!.dur)
    const edges = [...new Set(p.items.flatMap(it => [it.start, it.end]))].sort((a, b) => a - b)
    type Entry = Item | null
    const segments: { start: number, end: number, entries: Entry[] }[] = []
    const byStart = [...p.items].sort((a, b) => a.start - b.start)
    let next = 0
    let active: Item[] = []
    for (let i = 0; i + 1 < edges.length; i++) {
      const start = edges[i]!
      const end = edges[i + 1]!
      while (next < byStart.length && byStart[next]!.start <= start + EPS) active.push(byStart[next++]!)
      active = active.filter(it => it.end > start + EPS)
      const covering = active.filter(it => it.end >= end - EPS)
      const entries: Entry[] = []
      for (const v of voices) {
        const inVoice = covering.filter(it => it.voice === v)
        const pitched = inVoice.filter(it => it.midi !== null).sort((a, b) => b.midi! - a.midi!)
        if (pitched.length) entries.push(...pitched.filter((it, k) => k === 0 || it.midi !== pitched[k - 1]!.midi))
        else if (inVoice.length) entries.push(null)
      }
      segments.push({ start, end, entries })
    }
    const count = Math.max(1, ...segments.map(s => s.entries.length))
    const names = voiceNames(p.name, count)
    const instrument = guessInstrument([...p.instrumentNames, p.name], p.transpose ? -(p.transpose.chromatic + 12 * p.transpose.octaveChange) : 0, p.octaveClef)
    if (p.transpose && !instrument) {
      warnings.add(`"${p.name}" is written ${Math.abs(p.transpose.chromatic + 12 * p.transpose.octaveChange)} semitones away from concert pitch; its notes were read at concert pitch. Choose its instrument in the drill to show it written`)
    }
    const mine: DrillPartSeq[] = names.map(name => ({ name, ...(instrument ? { instrument } : {}), source: pi, states: [] }))
    const fewer: string[] = []
    for (const s of segments) {
      const n = s.entries.length
      if (count > 1 && n > 0 && n < count && s.entries.some(e => e !== null)) fewer.push(barAt(s.start))
      mine.forEach((seq, j) => {
        const e = n === 0 ? null : s.entries[Math.floor(j * n / count)] ?? null
        seq.states.push({ start: s.start, end: s.end, chain: e?.chain ?? null, name: e?.name ?? null, midi: e?.midi ?? null })
      })
      // Crossing: a lower-listed voice above the one listed over it.
      if (n === count && count > 1) {
        for (let j = 0; j + 1 < count; j++) {
          const a = s.entries[j]
          const b = s.entries[j + 1]
          if (a && b && a.voice !== b.voice && a.midi! < b.midi!) {
            warnings.add(`Bar ${barAt(s.start)}: ${mine[j + 1]!.name} goes above ${mine[j]!.name} (the voices cross); each part keeps its own voice as written`)
          }
        }
      }
    }
    if (fewer.length && fewer.length < segments.length) {
      const bars = [...new Set(fewer)]
      const shown = bars.slice(0, 4).join(', ') + (bars.length > 4 ? ` and ${bars.length - 4} more` : '')
      warnings.add(`"${p.name}" divides into ${count} notes in places but not throughout: in bar${bars.length === 1 ? '' : 's'} ${shown} ${names.join(' and ')} share a note where it has fewer`)
    }
    seqs.push(...mine)
  })
  if (seqs.length > 16) throw new TuningError('too_many_parts', `The score makes ${seqs.length} drill parts (one per voice); a drill has at most 16. Import fewer parts or a bar range`)
  const used = new Set<string>()
  for (const s of seqs) {
    let name = s.name
    for (let n = 2; used.has(name); n++) name = `${s.name.slice(0, 54)} (${n})`
    used.add(name)
    s.name = name
  }

  // One chord wherever the sounding set changes in any part.
  const globalEdges = [...new Set(seqs.flatMap(s => s.states.flatMap(st => [st.start, st.end])))].sort((a, b) => a - b)
  const cursors = seqs.map(() => 0)
  const chords: { start: number, end: number, states: (DrillPartSeq['states'][number] | null)[] }[] = []
  for (let i = 0; i + 1 < globalEdges.length; i++) {
    const start = globalEdges[i]!
    const end = globalEdges[i + 1]!
    const states = seqs.map((s, si) => {
      while (cursors[si]! < s.states.length && s.states[cursors[si]!]!.end <= start + EPS) cursors[si]!++
      const st = s.states[cursors[si]!]
      return st && st.start <= start + EPS ? st : null
    })
    const last = chords[chords.length - 1]
    if (last && Math.abs(last.end - start) < EPS && last.states.every((st, k) => (st?.chain ?? null) === (states[k]?.chain ?? null))) last.end = end
    else chords.push({ start, end, states })
  }
  while (chords.length && chords[chords.length - 1]!.states.every(st => !st?.name)) chords.pop()
  if (chords.length > 500) throw new TuningError('too_many_chords', `The score makes ${chords.length} chords${where}; a drill has at most 500. Import a bar range`)

  const harmonies = parts.flatMap(p => p.harmonies)
  const drillChords = chords.map((c) => {
    const beats = q(c.end - c.start)
    if (beats > 64) throw new TuningError('chord_too_long', `Bar ${barAt(c.start)}: a chord or rest lasts ${beats} beats; a drill chord lasts at most 64`, `bar ${barAt(c.start)}`)
    const symbol = harmonies.find(h => Math.abs(h.time - c.start) < EPS)?.symbol
    return { beats, ...(symbol ? { symbol } : {}), notes: Object.fromEntries(seqs.map((s, k) => [s.name, c.states[k]?.name ?? null])) }
  })

  // Key, tempo and title from the score; the drill's own settings when the file carries them.
  const before = <T extends { time: number }>(list: T[]) => [...list].filter(x => x.time <= windowStart + EPS).pop() ?? list[0]
  const concertPart = parts.find(p => !p.transpose && p.keys.length)
  let key = 'C major'
  const k = concertPart ? before(concertPart.keys) : undefined
  if (k) key = keyName(k.fifths, k.mode)
  else {
    const tp = parts.find(p => p.keys.length)
    const tk = tp ? before(tp.keys) : undefined
    if (tk && tp?.transpose) {
      const tonic = (tk.mode === 'minor' ? MINOR_BY_FIFTHS : MAJOR_BY_FIFTHS)[Math.max(-7, Math.min(7, tk.fifths)) + 7]!
      const sounding = soundingNote(tonic[0]!, tonic.length > 1 ? (tonic[1] === '#' ? 1 : -1) : 0, 4, tp.transpose).name.replace(/-?\d+$/, '')
      key = `${sounding} ${tk.mode === 'minor' ? 'minor' : 'major'}`
    }
  }
  if (k && !['major', 'minor'].includes(k.mode)) warnings.add(`The score's mode "${k.mode}" is read as ${key}`)
  const tempos = parts.flatMap(p => p.tempos).sort((a, b) => a.time - b.time)
  let tempo = before(tempos)?.bpm
  if (tempo === undefined) warnings.add('The score gives no tempo; the drill uses 60 beats per minute')
  else if (tempos.some(t => t.time > windowStart + EPS && t.time < windowEnd - EPS && Math.abs(t.bpm - tempo!) > 0.01)) warnings.add(`The score changes tempo; the drill uses ${q(tempo)} beats per minute throughout`)
  tempo = Math.min(300, Math.max(20, q(tempo ?? 60)))

  const settings = readSettings(root)
  const scoreTitle = childText(child(root, 'work'), 'work-title') || childText(root, 'movement-title')
  const stem = (opts.fileName ?? '').replace(/\.[^.]*$/, '').trim()
  const input: DrillInput = {
    title: (opts.title?.trim() || scoreTitle.trim() || stem || 'Imported score').slice(0, 120),
    key,
    tempo,
    ...settings,
    parts: seqs.map(s => ({ name: s.name, ...(s.instrument ? { instrument: s.instrument } : {}) })),
    chords: drillChords,
  }
  opts.warnings?.push(...warnings)
  const result = DrillSchema.safeParse(input)
  if (!result.success) {
    const issue = result.error.issues[0]!
    const path = issue.path.map(String).join('.')
    throw new TuningError('invalid_drill', `The imported drill is not valid: ${path}: ${issue.message}`, path)
  }
  return result.data
}

/** A4, tolerance and tuning system as written by our own export (ignored when unreadable). */
function readSettings(root: XmlElement): { a4?: number, tolerance?: number, system?: SystemOptions } {
  const field = childrenOf(child(child(root, 'identification'), 'miscellaneous'), 'miscellaneous-field').find(f => f.attrs.name === SETTINGS_FIELD)
  if (!field) return {}
  try {
    const v = JSON.parse(field.text) as { a4?: unknown, tolerance?: unknown, system?: unknown }
    return {
      ...(typeof v.a4 === 'number' ? { a4: v.a4 } : {}),
      ...(typeof v.tolerance === 'number' ? { tolerance: v.tolerance } : {}),
      ...(SystemOptions.safeParse(v.system).success ? { system: SystemOptions.parse(v.system) } : {}),
    }
  } catch {
    return {}
  }
}

// Writes a drill as a MusicXML 4.0 partwise score, at written or concert pitch. Importing the file
// gives back the same drill. No Node-only code: the notation preview runs it in the browser.
import { Interval, Note } from '@tonaljs/tonal'
import { getInstrument, writtenNote } from '../tuning/transpose'
import { parseKey, parseNote } from '../tuning/pitch'
import type { DrillDocument } from './schema'

/** The drill's extra settings a MusicXML file carries in <miscellaneous-field> (no element holds them). */
export const SETTINGS_FIELD = 'driftline-settings'

/** Escapes text for an XML element or attribute. */
function esc(s: string): string {
  return s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;')
}

const LETTER_FIFTHS: Record<string, number> = { F: -1, C: 0, G: 1, D: 2, A: 3, E: 4, B: 5 }

/** Where a drill's file names come from: its title without characters file systems refuse. */
export function exportFileName(title: string, ext: string): string {
  const base = title.replace(/[\\/:*?"<>|\u0000-\u001f]+/g, ' ').replace(/\s+/g, ' ').trim().slice(0, 100) || 'drill'
  return `${base}.${ext}`
}

/** Key signature of a key as fifths (−7 … 7), the circle of fifths (common practice). */
export function keyFifths(key: string): { fifths: number, mode: 'major' | 'minor' } {
  const k = parseKey(key)
  const pc = k.tonic.pc
  let f = LETTER_FIFTHS[pc[0]!]! + 7 * (pc.slice(1).startsWith('b') ? -(pc.length - 1) : pc.length - 1) - (k.mode === 'minor' ? 3 : 0)
  while (f > 7) f -= 12 // enharmonic: D# major (9 sharps) is written as E♭ major
  while (f < -7) f += 12
  return { fifths: f, mode: k.mode }
}

/** What the drill's settings the notation formats have no element for. */
export function settingsOf(doc: DrillDocument) {
  return { a4: doc.a4, tolerance: doc.tolerance, system: doc.system }
}

/** True when every part has the same note in chords i and i+1: the chord is sounded again. */
function restruck(doc: DrillDocument, i: number): boolean {
  const a = doc.chords[i]
  const b = doc.chords[i + 1]
  return !!a && !!b && doc.parts.every(p => (a.notes[p.name] ?? null) === (b.notes[p.name] ?? null))
}

/** A part's notes with common tones held: a note carried into the next chord is one note. */
export function partEvents(doc: DrillDocument, part: string): { start: number, beats: number, note: string | null, symbols: { at: number, symbol: string }[] }[] {
  const out: { start: number, beats: number, note: string | null, symbols: { at: number, symbol: string }[] }[] = []
  let t = 0
  doc.chords.forEach((c, i) => {
    const note = c.notes[part] ?? null
    const last = out[out.length - 1]
    const hold = last && last.note === note && (note === null || !restruck(doc, i - 1))
    if (hold) last.beats += c.beats
    else out.push({ start: t, beats: c.beats, note, symbols: [] })
    if (c.symbol) out[out.length - 1]!.symbols.push({ at: t, symbol: c.symbol })
    t += c.beats
  })
  return out
}

const TYPES: [string, number][] = [['whole', 4], ['half', 2], ['quarter', 1], ['eighth', 0.5], ['16th', 0.25], ['32nd', 0.125], ['64th', 0.0625]]

/** A length in divisions as notated values (with dots), largest first. */
function notated(length: number, divisions: number): { dur: number, type: string | null, dots: number }[] {
  const out: { dur: number, type: string | null, dots: number }[] = []
  let left = length
  while (left > 0) {
    let piece: { dur: number, type: string | null, dots: number } | null = null
    for (const [type, quarters] of TYPES) {
      const base = quarters * divisions
      for (const [dots, factor] of [[2, 1.75], [1, 1.5], [0, 1]] as const) {
        const d = base * factor
        if (Number.isInteger(d) && d <= left) { piece = { dur: d, type, dots }; break }
      }
      if (piece) break
    }
    // A length no plain value spells (a tuplet): one note of that length, its type left to the reader.
    piece ??= { dur: left, type: null, dots: 0 }
    out.push(piece)
    left -= piece.dur
  }
  return out
}

function divisionsFor(doc: DrillDocument): number {
  for (let d = 1; d <= 960; d++) {
    if (doc.chords.every(c => Math.abs(c.beats * d - Math.round(c.beats * d)) < 1e-6)) return d
  }
  return 960
}

function clefXml(clef: string): string {
  switch (clef) {
    case 'bass': return '<clef><sign>F</sign><line>4</line></clef>'
    case 'alto': return '<clef><sign>C</sign><line>3</line></clef>'
    case 'tenor': return '<clef><sign>C</sign><line>4</line></clef>'
    case 'treble-8vb': return '<clef><sign>G</sign><line>2</line><clef-octave-change>-1</clef-octave-change></clef>'
    default: return '<clef><sign>G</sign><line>2</line></clef>'
  }
}

/** <transpose> for an instrument: what to add to the written pitch to get the sounding pitch (MusicXML 4.0). */
function transposeOf(interval: string): { diatonic: number, chromatic: number, octaveChange: number } {
  const iv = Interval.get(interval)
  const steps = (Math.abs(iv.num ?? 1) - 1) * (iv.dir ?? 1)
  const semis = iv.semitones ?? 0
  const octaves = Math.trunc(steps / 7)
  return { diatonic: -(steps - 7 * octaves), chromatic: -(semis - 12 * octaves), octaveChange: -octaves }
}

export interface MusicXmlExportOptions {
  /** 'written': transposing parts at written pitch with <transpose> (what a player reads); 'concert': every part as it sounds. */
  pitch?: 'written' | 'concert'
}

/** The drill as a MusicXML 4.0 partwise score, one part per drill part, common tones tied, in 4/4. */
export function drillToMusicXml(doc: DrillDocument, opts: MusicXmlExportOptions = {}): string {
  const written = (opts.pitch ?? 'written') === 'written'
  const divisions = divisionsFor(doc)
  const measure = 4 * divisions
  const total = Math.round(doc.chords.reduce((s, c) => s + c.beats, 0) * divisions)
  const measures = Math.max(1, Math.ceil(total / measure))
  const { fifths, mode } = keyFifths(doc.key)
  const lines: string[] = []
  lines.push('<?xml version="1.0" encoding="UTF-8" standalone="no"?>')
  lines.push('<!DOCTYPE score-partwise PUBLIC "-//Recordare//DTD MusicXML 4.0 Partwise//EN" "http://www.musicxml.org/dtds/partwise.dtd">')
  lines.push('<score-partwise version="4.0">')
  lines.push(`  <work><work-title>${esc(doc.title)}</work-title></work>`)
  lines.push('  <identification>')
  lines.push('    <encoding><software>Driftline</software></encoding>')
  lines.push(`    <miscellaneous><miscellaneous-field name="${SETTINGS_FIELD}">${esc(JSON.stringify(settingsOf(doc)))}</miscellaneous-field></miscellaneous>`)
  lines.push('  </identification>')
  lines.push('  <part-list>')
  doc.parts.forEach((p, i) => {
    const inst = p.instrument ? getInstrument(p.instrument) : null
    lines.push(`    <score-part id="P${i + 1}"><part-name>${esc(p.name)}</part-name>${inst ? `<score-instrument id="P${i + 1}-I1"><instrument-name>${esc(inst.label)}</instrument-name></score-instrument>` : ''}</score-part>`)
  })
  lines.push('  </part-list>')

  doc.parts.forEach((p, pi) => {
    const inst = p.instrument ? getInstrument(p.instrument) : null
    const octaveClef = inst?.clef === 'treble-8vb'
    const transposing = written && !!inst && inst.interval !== '1P' && !octaveClef
    const midis = doc.chords.map(c => c.notes[p.name]).filter((n): n is string => !!n).map(n => parseNote(n).midi)
    const average = midis.length ? midis.reduce((s, m) => s + m, 0) / midis.length : 60
    const clef = inst && (written || octaveClef || inst.clef !== 'treble') ? inst.clef : average < 60 ? 'bass' : 'treble'
    let partFifths = fifths
    if (transposing) {
      const tonic = Note.transpose(`${parseKey(doc.key).tonic.pc}4`, inst!.interval)
      partFifths = keyFifths(`${Note.get(tonic).pc} ${mode}`).fifths
    }
    const events = partEvents(doc, p.name)
    lines.push(`  <part id="P${pi + 1}">`)
    let ei = 0
    let usedInEvent = 0 // divisions of the current event already written
    for (let m = 0; m < measures; m++) {
      lines.push(`    <measure number="${m + 1}">`)
      if (m === 0) {
        lines.push(`      <attributes><divisions>${divisions}</divisions><key><fifths>${partFifths}</fifths><mode>${mode}</mode></key><time><beats>4</beats><beat-type>4</beat-type></time>${clefXml(clef)}${transposing ? transposeXml(inst!.interval) : ''}</attributes>`)
        if (pi === 0) lines.push(`      <direction placement="above"><direction-type><metronome><beat-unit>quarter</beat-unit><per-minute>${doc.tempo}</per-minute></metronome></direction-type><sound tempo="${doc.tempo}"/></direction>`)
      }
      let room = measure
      while (room > 0) {
        const ev = events[ei]
        const evLength = ev ? Math.round(ev.beats * divisions) : room
        const take = Math.min(room, evLength - usedInEvent)
        const pieceStart = m * measure + (measure - room)
        const tieIn = ev?.note != null && usedInEvent > 0
        const pieces = notated(take, divisions)
        let offsetInTake = 0
        pieces.forEach((piece, k) => {
          const startDiv = pieceStart + offsetInTake
          if (pi === 0 && ev) {
            for (const s of ev.symbols) {
              const at = Math.round(s.at * divisions)
              if (at >= startDiv && at < startDiv + piece.dur) lines.push(`      ${harmonyXml(s.symbol, at - startDiv)}`)
            }
          }
          const tieStart = ev?.note != null && (k < pieces.length - 1 || usedInEvent + take < evLength)
          const tieStop = ev?.note != null && (k > 0 || tieIn)
          lines.push(`      ${noteXml(ev?.note ?? null, piece, { tieStart, tieStop, instrument: transposing ? p.instrument! : null })}`)
          offsetInTake += piece.dur
        })
        room -= take
        usedInEvent += take
        if (ev && usedInEvent >= evLength) { ei++; usedInEvent = 0 }
      }
      lines.push('    </measure>')
    }
    lines.push('  </part>')
  })
  lines.push('</score-partwise>')
  return `${lines.join('\n')}\n`
}

function transposeXml(interval: string): string {
  const t = transposeOf(interval)
  return `<transpose><diatonic>${t.diatonic}</diatonic><chromatic>${t.chromatic}</chromatic>${t.octaveChange ? `<octave-change>${t.octaveChange}</octave-change>` : ''}</transpose>`
}

function noteXml(note: string | null, piece: { dur: number, type: string | null, dots: number }, o: { tieStart: boolean, tieStop: boolean, instrument: string | null }): string {
  const type = piece.type ? `<type>${piece.type}</type>${'<dot/>'.repeat(piece.dots)}` : ''
  if (note === null) return `<note><rest/><duration>${piece.dur}</duration><voice>1</voice>${type}</note>`
  const shown = parseNote(o.instrument ? writtenNote(note, o.instrument) : note)
  const alter = shown.alt ? `<alter>${shown.alt}</alter>` : ''
  const ties = `${o.tieStop ? '<tie type="stop"/>' : ''}${o.tieStart ? '<tie type="start"/>' : ''}`
  const tied = `${o.tieStop ? '<tied type="stop"/>' : ''}${o.tieStart ? '<tied type="start"/>' : ''}`
  return `<note><pitch><step>${shown.letter}</step>${alter}<octave>${shown.oct}</octave></pitch><duration>${piece.dur}</duration>${ties}<voice>1</voice>${type}${tied ? `<notations>${tied}</notations>` : ''}</note>`
}

const SUFFIX_KIND: [RegExp, string][] = [
  [/^$/, 'major'], [/^m$/, 'minor'], [/^7$/, 'dominant'], [/^maj7$/, 'major-seventh'], [/^m7$/, 'minor-seventh'],
  [/^dim7$/, 'diminished-seventh'], [/^dim$/, 'diminished'], [/^aug$/, 'augmented'], [/^m7b5$/, 'half-diminished'],
  [/^6$/, 'major-sixth'], [/^m6$/, 'minor-sixth'], [/^9$/, 'dominant-ninth'], [/^sus4$/, 'suspended-fourth'], [/^sus2$/, 'suspended-second'],
]

/** A chord symbol as <harmony>; the symbol's own spelling goes in kind's text so it reads back unchanged. */
function harmonyXml(symbol: string, offset: number): string {
  const m = /^([A-G])(#{1,2}|b{1,2})?(.*?)(?:\/([A-G])(#{1,2}|b{1,2})?)?$/.exec(symbol)
  if (!m) return ''
  const alter = (s?: string) => (s ? (s.startsWith('#') ? s.length : -s.length) : 0)
  const suffix = m[3] ?? ''
  const kind = SUFFIX_KIND.find(([re]) => re.test(suffix))?.[1] ?? 'other'
  const rootAlter = alter(m[2]) ? `<root-alter>${alter(m[2])}</root-alter>` : ''
  const bass = m[4] ? `<bass><bass-step>${m[4]}</bass-step>${alter(m[5]) ? `<bass-alter>${alter(m[5])}</bass-alter>` : ''}</bass>` : ''
  return `<harmony><root><root-step>${m[1]}</root-step>${rootAlter}</root><kind text="${esc(suffix)}">${kind}</kind>${bass}${offset ? `<offset>${offset}</offset>` : ''}</harmony>`
}


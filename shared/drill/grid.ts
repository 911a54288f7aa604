// The voicing grid editor's model: a drill as parts (rows) and chords (columns) of cells that may
// still be blank while the director types. Plain functions over plain data, so the editor's
// keyboard entry, column edits and checks are tested without a browser.
import { Key } from '@tonaljs/tonal'
import { DrillDocument, issuePath, type DrillInput, type SystemOptions } from './schema'
import { plainIssueMessage } from '../text'
import { concertNote, writtenNote } from '../tuning/transpose'
import { parseKey, parseNote } from '../tuning/pitch'
import { analyzeChord } from '../tuning/chord'

/** A cell: a concert-pitch note ("Bb3"), a rest (null), or not filled in yet (''). */
export type GridCell = string | null

export interface GridPart { name: string, instrument: string | null }
export interface GridChord { beats: number, symbol: string, cells: GridCell[] }
export interface GridDraft {
  title: string
  key: string
  tempo: number
  a4: number
  tolerance: number
  system: SystemOptions
  parts: GridPart[]
  chords: GridChord[]
}
export interface GridIssue { path: string, message: string, chord: number | null, part: number | null }

export const MAX_PARTS = 16
export const MAX_CHORDS = 500

/** The editable form of a saved drill document. */
export function draftFromDocument(doc: DrillDocument): GridDraft {
  return {
    title: doc.title, key: doc.key, tempo: doc.tempo, a4: doc.a4, tolerance: doc.tolerance, system: { ...doc.system },
    parts: doc.parts.map(p => ({ name: p.name, instrument: p.instrument ?? null })),
    chords: doc.chords.map(c => ({ beats: c.beats, symbol: c.symbol ?? '', cells: doc.parts.map(p => c.notes[p.name] ?? null) })),
  }
}

/** The document a draft stands for; blank cells count as rests (for live targets while typing). */
export function draftDocument(draft: GridDraft): DrillInput {
  return {
    title: draft.title, key: draft.key, tempo: draft.tempo, a4: draft.a4, tolerance: draft.tolerance, system: draft.system,
    parts: draft.parts.map(p => ({ name: p.name.trim(), ...(p.instrument ? { instrument: p.instrument } : {}) })),
    chords: draft.chords.map(c => ({
      beats: c.beats,
      ...(c.symbol.trim() ? { symbol: c.symbol.trim() } : {}),
      notes: Object.fromEntries(draft.parts.map((p, i) => [p.name.trim(), c.cells[i] || null])),
    })),
  }
}

/**
 * Checks a draft before saving: every cell filled in (a note or a rest), every chord sounding at
 * least one note, then the shared drill schema. Issues name the chord and part as people count them.
 */
export function checkDraft(draft: GridDraft): { document: DrillDocument | null, issues: GridIssue[] } {
  const issues: GridIssue[] = []
  draft.chords.forEach((c, ci) => {
    const blank = draft.parts.map((p, pi) => (c.cells[pi] === '' || c.cells[pi] === undefined ? pi : -1)).filter(i => i >= 0)
    for (const pi of blank) {
      issues.push({ path: `chords.${ci}.notes.${draft.parts[pi]!.name}`, chord: ci, part: pi, message: `Chord ${ci + 1}, ${draft.parts[pi]!.name || `part ${pi + 1}`}: no note yet; type a note or R for a rest` })
    }
    if (!blank.length && c.cells.every(n => n === null)) {
      issues.push({ path: `chords.${ci}.notes`, chord: ci, part: null, message: `Chord ${ci + 1} is empty: every part rests. Give it a note or delete the chord` })
    }
  })
  // Field messages come from the schema; plainIssueMessage words anything it leaves to zod.
  const parsed = DrillDocument.safeParse(draftDocument(draft), { error: plainIssueMessage })
  if (!parsed.success) {
    for (const i of parsed.error.issues) {
      const path = issuePath(i.path)
      const chord = i.path[0] === 'chords' && typeof i.path[1] === 'number' ? i.path[1] : null
      const part = i.path[0] === 'parts' && typeof i.path[1] === 'number' ? i.path[1] : null
      const message = sentence(i.code === 'custom' ? i.message : `${place(draft, i.path)}${i.message}`)
      // One line per problem: a field the blank-cell check (or an earlier issue) already named stays one line.
      if (issues.some(x => x.path === path || x.message === message)) continue
      issues.push({ path, chord, part, message })
    }
  }
  return { document: issues.length || !parsed.success ? null : parsed.data, issues }
}

/** Where a field-level issue is, as people count ("Chord 3: ", "Part 2: "); settings name themselves. */
function place(draft: GridDraft, path: readonly PropertyKey[]): string {
  const n = typeof path[1] === 'number' ? path[1] + 1 : null
  if (path[0] === 'chords' && n !== null) {
    const part = path[2] === 'notes' && typeof path[3] === 'string' ? `, ${path[3]}` : ''
    return `Chord ${n}${part}: `
  }
  if (path[0] === 'parts' && n !== null) return `Part ${n}${draft.parts[n - 1]?.name.trim() ? ` (${draft.parts[n - 1]!.name.trim()})` : ''}: `
  if (path[0] === 'system') return 'Tuning system: '
  if (path[0] === 'parts') return 'Parts: '
  if (path[0] === 'chords') return 'Chords: '
  return ''
}

const sentence = (text: string) => text.charAt(0).toUpperCase() + text.slice(1)

// ---- note entry --------------------------------------------------------------------------------

const ALT_TEXT: Record<number, string> = { [-2]: 'bb', [-1]: 'b', 0: '', 1: '#', 2: '##' }

function split(note: string): { letter: string, alt: number, oct: number } | null {
  try {
    const n = parseNote(note)
    return { letter: n.letter, alt: n.alt, oct: n.oct }
  } catch { return null }
}

const join = (letter: string, alt: number, oct: number) => `${letter}${ALT_TEXT[alt] ?? ''}${oct}`

/** The accidental the key signature gives a letter (F major: B → −1), from the key's scale. */
export function keyAlteration(key: string, letter: string): number {
  try {
    const k = parseKey(key)
    const scale = k.mode === 'major' ? Key.majorKey(k.tonic.pc).scale : Key.minorKey(k.tonic.pc).natural.scale
    const pc = scale.find(n => n[0] === letter.toUpperCase())
    if (!pc) return 0
    return pc.slice(1).split('').reduce((s, ch) => s + (ch === '#' ? 1 : ch === 'b' ? -1 : 0), 0)
  } catch { return 0 }
}

/**
 * The note a typed letter makes: the key signature's accidental, in the octave nearest `near` (the
 * note before it in the same part, or the cell's own note), else octave `fallbackOctave`.
 */
export function letterNote(letter: string, key: string, near: string | null, fallbackOctave = 4): string {
  const L = letter.toUpperCase()
  const alt = keyAlteration(key, L)
  const ref = near ? split(near) : null
  if (!ref) return join(L, alt, fallbackOctave)
  const refMidi = parseNote(join(ref.letter, ref.alt, ref.oct)).midi
  let best = join(L, alt, ref.oct)
  let bestD = Infinity
  for (const oct of [ref.oct - 1, ref.oct, ref.oct + 1]) {
    if (oct < 0 || oct > 8) continue
    const d = Math.abs(parseNote(join(L, alt, oct)).midi - refMidi)
    if (d < bestD) { best = join(L, alt, oct); bestD = d }
  }
  return best
}

/** Raises (+1) or lowers (−1) a note's accidental by one step, at most a double sharp or flat. */
export function alterNote(note: string, step: 1 | -1): string {
  const n = split(note)
  if (!n) return note
  return join(n.letter, Math.max(-2, Math.min(2, n.alt + step)), n.oct)
}

/** The note without its accidental. */
export function naturalNote(note: string): string {
  const n = split(note)
  return n ? join(n.letter, 0, n.oct) : note
}

/** The note moved to an octave (0–8), or by `delta` octaves. */
export function octaveNote(note: string, to: { octave?: number, delta?: number }): string {
  const n = split(note)
  if (!n) return note
  const oct = to.octave ?? n.oct + (to.delta ?? 0)
  if (oct < 0 || oct > 8) return note
  return join(n.letter, n.alt, oct)
}

/** What a cell shows: the concert note, or the note the part's player reads when `written`. */
export function shownNote(cell: GridCell, instrument: string | null, written: boolean): GridCell {
  if (!cell || !written || !instrument) return cell
  try { return writtenNote(cell, instrument) } catch { return cell }
}

/** The concert note for a note typed as shown (written pitch for a transposing part when `written`). */
export function enteredNote(shown: string, instrument: string | null, written: boolean): string {
  if (!written || !instrument) return shown
  try { return concertNote(shown, instrument) } catch { return shown }
}

/** The chord symbol the tuning engine reads from a column's notes (null when it cannot name them). */
export function autoSymbol(cells: GridCell[]): string | null {
  const notes = cells.filter((c): c is string => !!c).map(c => { try { return parseNote(c) } catch { return null } }).filter(n => n !== null)
  if (!notes.length) return null
  const name = analyzeChord(notes).name
  // The engine spells a major triad "CM"; chord symbols write it "C".
  return name ? name.replace(/^([A-G](?:bb|b|##|#)?)M(?=\/|$)/, '$1') : null
}

// ---- column and row edits (each returns a new draft) -------------------------------------------

function withChords(draft: GridDraft, chords: GridChord[]): GridDraft {
  return { ...draft, chords }
}

/** A blank chord (every cell to fill in) before column `at`, as long as the one next to it. */
export function insertChord(draft: GridDraft, at: number): GridDraft {
  if (draft.chords.length >= MAX_CHORDS) return draft
  const i = Math.max(0, Math.min(at, draft.chords.length))
  const beats = draft.chords[Math.max(0, i - 1)]?.beats ?? 4
  const chords = [...draft.chords]
  chords.splice(i, 0, { beats, symbol: '', cells: draft.parts.map(() => '') })
  return withChords(draft, chords)
}

/** Removes chord `at`; a drill keeps at least one chord. */
export function deleteChord(draft: GridDraft, at: number): GridDraft {
  if (draft.chords.length <= 1 || at < 0 || at >= draft.chords.length) return draft
  return withChords(draft, draft.chords.filter((_, i) => i !== at))
}

/** A copy of column `at` (for the clipboard). */
export function copyChord(draft: GridDraft, at: number): GridChord | null {
  const c = draft.chords[at]
  return c ? { beats: c.beats, symbol: c.symbol, cells: [...c.cells] } : null
}

/** Pastes a copied column over column `at`; parts it lacks become blank, extra cells are dropped. */
export function pasteChord(draft: GridDraft, at: number, column: GridChord): GridDraft {
  if (!draft.chords[at]) return draft
  const chords = [...draft.chords]
  chords[at] = { beats: column.beats, symbol: column.symbol, cells: draft.parts.map((_, i) => column.cells[i] ?? '') }
  return withChords(draft, chords)
}

/** Sets one cell. */
export function setCell(draft: GridDraft, chord: number, part: number, value: GridCell): GridDraft {
  const c = draft.chords[chord]
  if (!c || part < 0 || part >= draft.parts.length) return draft
  const chords = [...draft.chords]
  const cells = [...c.cells]
  cells[part] = value
  chords[chord] = { ...c, cells }
  return withChords(draft, chords)
}

/** Changes one chord's beats or symbol. */
export function setChord(draft: GridDraft, chord: number, patch: Partial<Pick<GridChord, 'beats' | 'symbol'>>): GridDraft {
  const c = draft.chords[chord]
  if (!c) return draft
  const chords = [...draft.chords]
  chords[chord] = { ...c, ...patch }
  return withChords(draft, chords)
}

/** A new part (row) of blank cells before row `at`, named "Part N" with the first free N. */
export function insertPart(draft: GridDraft, at: number): GridDraft {
  if (draft.parts.length >= MAX_PARTS) return draft
  const i = Math.max(0, Math.min(at, draft.parts.length))
  let n = draft.parts.length + 1
  while (draft.parts.some(p => p.name === `Part ${n}`)) n++
  const parts = [...draft.parts]
  parts.splice(i, 0, { name: `Part ${n}`, instrument: null })
  return { ...draft, parts, chords: draft.chords.map(c => { const cells = [...c.cells]; cells.splice(i, 0, ''); return { ...c, cells } }) }
}

/** Removes part `at` with its cells; a drill keeps at least one part. */
export function deletePart(draft: GridDraft, at: number): GridDraft {
  if (draft.parts.length <= 1 || !draft.parts[at]) return draft
  return { ...draft, parts: draft.parts.filter((_, i) => i !== at), chords: draft.chords.map(c => ({ ...c, cells: c.cells.filter((_, i) => i !== at) })) }
}

/** Renames a part or changes its instrument (the cells stay concert pitch). */
export function setPart(draft: GridDraft, at: number, patch: Partial<GridPart>): GridDraft {
  if (!draft.parts[at]) return draft
  const parts = [...draft.parts]
  parts[at] = { ...parts[at]!, ...patch }
  return { ...draft, parts }
}

/** The note before chord `chord` in part `part` (for choosing a typed letter's octave). */
export function previousNote(draft: GridDraft, chord: number, part: number): string | null {
  for (let i = chord; i >= 0; i--) {
    const c = draft.chords[i]?.cells[part]
    if (c) return c
  }
  for (let p = part - 1; p >= 0; p--) {
    const c = draft.chords[chord]?.cells[p]
    if (c) return octaveNote(c, { delta: -1 })
  }
  return null
}



// Drills as data: saving and loading the document with its normalised copy, the lists the take
// pages read, and reading an uploaded drill file.
import type { Knex } from 'knex'
import { noteToMidi } from '../../shared/tuning/pitch'
import { DrillDocument, type DrillInput } from '../../shared/drill/schema'
import type { DrillListItem } from '../../shared/types/drill-view'
import type { DrillAccess } from './access'
import { partForSection } from './home'
import { describeValue, jsonErrorPlace } from '../../shared/text'

/** A note name in a drill that names no pitch ("H4", "Bb" without octave). */
export class DrillNoteError extends Error {
  override name = 'DrillNoteError'
  code = 'invalid_note'
  constructor (readonly path: (string | number)[], readonly note: string) {
    super(`${describeValue(note)} is not a note with an octave (such as "Bb3")`)
  }
}

export interface StoredDrill {
  id: number
  ensembleId: number
  title: string
  version: number
  archivedAt: string | null
  updatedAt: string
  document: DrillDocument
}

/** MIDI number of a concert note such as "Bb3" or "F#4", or null when it names no pitch. */
export function noteMidi (name: string): number | null {
  try {
    const midi = noteToMidi(name)
    return Number.isInteger(midi) ? midi : null
  } catch {
    return null // the tuning engine's parser throws TuningError for anything that is not a note
  }
}

/**
 * Creates a drill (or, with `drillId`, replaces its document and bumps its version) and rewrites
 * its parts, chords and notes, all in one transaction. Throws ZodError for an invalid document and
 * DrillNoteError for a note that names no pitch.
 */
export async function saveDrill (db: Knex, ensembleId: number, input: DrillInput | DrillDocument, userId: number | null, opts: { drillId?: number } = {}): Promise<{ id: number, version: number }> {
  const doc = DrillDocument.parse(input)
  const midis = doc.chords.map((c, i) => Object.fromEntries(doc.parts.map((p) => {
    const note = c.notes[p.name] ?? null
    if (note == null) return [p.name, null]
    const midi = noteMidi(note)
    if (midi == null) throw new DrillNoteError(['chords', i, 'notes', p.name], note)
    return [p.name, midi]
  })) as Record<string, number | null>)

  const run = async (trx: Knex.Transaction) => {
    const now = new Date().toISOString()
    const columns = {
      title: doc.title,
      key_name: doc.key,
      tempo: doc.tempo,
      a4: doc.a4,
      system_name: doc.system.name,
      tolerance: doc.tolerance,
      document: JSON.stringify(doc),
      updated_by: userId,
      updated_at: now,
    }
    let id: number
    let version = 1
    if (opts.drillId) {
      const row = await trx('drills').where({ id: opts.drillId, ensemble_id: ensembleId }).first('id', 'version')
      if (!row) throw new Error(`drill ${opts.drillId} is not in ensemble ${ensembleId}`)
      id = row.id
      version = row.version + 1
      await trx('drills').where({ id }).update({ ...columns, version })
      await trx('drill_parts').where({ drill_id: id }).delete() // notes go with them (cascade)
      await trx('drill_chords').where({ drill_id: id }).delete()
    } else {
      const [row] = await trx('drills').insert({ ...columns, ensemble_id: ensembleId, created_by: userId, created_at: now, version }).returning('id')
      id = typeof row === 'object' ? row.id : row
    }

    const partIds = new Map<string, number>()
    for (const [position, p] of doc.parts.entries()) {
      const [row] = await trx('drill_parts').insert({ drill_id: id, position, name: p.name, instrument: p.instrument ?? null }).returning('id')
      partIds.set(p.name, typeof row === 'object' ? row.id : row)
    }
    await trx('drill_versions').insert({ drill_id: id, version, document: columns.document, created_by: userId, created_at: now })
    let startBeat = 0
    for (const [position, c] of doc.chords.entries()) {
      const [row] = await trx('drill_chords').insert({ drill_id: id, position, start_beat: startBeat, beats: c.beats, symbol: c.symbol ?? null }).returning('id')
      const chordId = typeof row === 'object' ? row.id : row
      startBeat += c.beats
      const notes = doc.parts.map(p => ({
        drill_id: id,
        chord_id: chordId,
        part_id: partIds.get(p.name)!,
        note: c.notes[p.name] ?? null,
        midi: midis[position]![p.name],
      }))
      await trx('drill_notes').insert(notes)
    }
    return { id, version }
  }
  return (db as Knex & { isTransaction?: boolean }).isTransaction ? run(db as Knex.Transaction) : db.transaction(run)
}

/** A drill with its parsed document, or null. */
export async function loadDrill (db: Knex, id: number): Promise<StoredDrill | null> {
  const row = await db('drills').where({ id }).first('id', 'ensemble_id', 'title', 'version', 'archived_at', 'updated_at', 'document')
  if (!row) return null
  return {
    id: row.id,
    ensembleId: row.ensemble_id,
    title: row.title,
    version: row.version,
    archivedAt: row.archived_at,
    updatedAt: row.updated_at,
    document: DrillDocument.parse(JSON.parse(row.document)),
  }
}

/** The part to preselect for the caller: the assignment's, else the one named like their section. */
export async function preselectedPart (db: Knex, access: DrillAccess, assignmentId?: number | null): Promise<string | null> {
  const parts = access.drill.document.parts.map(p => p.name)
  let assignmentPart: string | null = null
  if (assignmentId) {
    const a = await db('assignment_assignees as aa').join('assignments as x', 'x.id', 'aa.assignment_id')
      .where({ 'aa.assignment_id': assignmentId, 'aa.user_id': access.membership.userId, 'x.drill_id': access.drill.id }).first('aa.part')
    assignmentPart = a?.part ?? null
  }
  let sectionName: string | null = null
  if (access.membership.sectionId) {
    const s = await db('sections').where({ id: access.membership.sectionId }).first('name')
    sectionName = s?.name ?? null
  }
  const pick = partForSection(parts, assignmentPart, sectionName)
  return pick && parts.includes(pick) ? pick : null
}

/** Largest drill file taken by the import. */
export const MAX_DRILL_FILE_BYTES = 2 * 1024 * 1024

/** Why a drill file could not be read (the route answers 415 for `not_a_drill`, else 400). */
export interface DrillFileProblem { refused: string, message: string, details: Record<string, unknown> }

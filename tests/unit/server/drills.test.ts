import { afterEach, beforeEach, describe, expect, it } from 'vitest'
import type { Knex } from 'knex'
import { ZodError } from 'zod'
import { createKnex } from '../../../server/database/knex'
import { migrateLatest } from '../../../server/database/migrations'
import { DrillNoteError, loadDrill, noteMidi, saveDrill } from '../../../server/utils/drills'
import type { DrillInput } from '../../../shared/drill/schema'

let db: Knex
let ensembleId: number
let userId: number
beforeEach(async () => {
  db = createKnex(':memory:')
  await migrateLatest(db)
  userId = (await db('users').insert({ email: 'd@example.org', name: 'D' }).returning('id'))[0].id
  ensembleId = (await db('ensembles').insert({ name: 'E' }).returning('id'))[0].id
})
afterEach(async () => { await db.destroy() })

const drill: DrillInput = {
  title: 'Two chords',
  key: 'C major',
  tempo: 90,
  parts: [{ name: 'Upper', instrument: 'cornet-bb' }, { name: 'Lower' }],
  chords: [
    { beats: 2, symbol: 'C', notes: { Upper: 'E4', Lower: 'C3' } },
    { beats: 3, notes: { Upper: 'F#4', Lower: null } },
  ],
}

describe('noteMidi', () => {
  // MIDI note numbers: middle C (C4) = 60, A4 = 69, one per semitone (MIDI 1.0 specification; common practice).
  it.each([['C4', 60], ['A4', 69], ['Bb3', 58], ['F#4', 66], ['Cx5', 74], ['B#3', 60], ['Cb4', 59], ['C-1', 0], ['G9', 127]])('%s is %i', (n, m) => {
    expect(noteMidi(n)).toBe(m)
  })
  it.each(['H4', 'Bb', '4', ''])('"%s" names no pitch', (n) => {
    expect(noteMidi(n)).toBeNull()
  })
})

describe('saveDrill / loadDrill', () => {
  it('writes the document and its parts, chords (with start beats) and notes in one go', async () => {
    const { id, version } = await saveDrill(db, ensembleId, drill, userId)
    expect(version).toBe(1)
    const parts = await db('drill_parts').where({ drill_id: id }).orderBy('position')
    expect(parts.map(p => [p.name, p.instrument])).toEqual([['Upper', 'cornet-bb'], ['Lower', null]])
    const chords = await db('drill_chords').where({ drill_id: id }).orderBy('position')
    expect(chords.map(c => [c.start_beat, c.beats, c.symbol])).toEqual([[0, 2, 'C'], [2, 3, null]])
    const notes = await db('drill_notes as n').join('drill_parts as p', 'p.id', 'n.part_id').join('drill_chords as c', 'c.id', 'n.chord_id')
      .where('n.drill_id', id).orderBy(['c.position', 'p.position']).select('p.name', 'n.note', 'n.midi')
    expect(notes).toEqual([
      { name: 'Upper', note: 'E4', midi: 64 }, { name: 'Lower', note: 'C3', midi: 48 },
      { name: 'Upper', note: 'F#4', midi: 66 }, { name: 'Lower', note: null, midi: null },
    ])
    const loaded = await loadDrill(db, id)
    expect(loaded).toMatchObject({ id, ensembleId, title: 'Two chords', version: 1, archivedAt: null })
    expect(loaded!.document).toMatchObject({ title: 'Two chords', tempo: 90, a4: 440, tolerance: 10, system: { name: 'equal' } }) // defaults filled in
    expect(await loadDrill(db, id + 100)).toBeNull()
  })

  it('replaces the rows and bumps the version on update', async () => {
    const { id } = await saveDrill(db, ensembleId, drill, userId)
    const next = { ...drill, title: 'One chord', chords: [drill.chords[0]!] }
    expect(await saveDrill(db, ensembleId, next, userId, { drillId: id })).toEqual({ id, version: 2 })
    expect(await db('drill_chords').where({ drill_id: id }).count({ n: '*' }).first()).toEqual({ n: 1 })
    expect(await db('drill_notes').where({ drill_id: id }).count({ n: '*' }).first()).toEqual({ n: 2 })
    expect((await loadDrill(db, id))!.title).toBe('One chord')
  })

  it('refuses an invalid document or a note without a pitch and writes nothing', async () => {
    await expect(saveDrill(db, ensembleId, { ...drill, parts: [] }, userId)).rejects.toBeInstanceOf(ZodError)
    const bad = { ...drill, chords: [{ beats: 1, notes: { Upper: 'H4', Lower: 'C3' } }] }
    // The schema itself refuses the note; DrillNoteError guards anything it lets through.
    const err = await saveDrill(db, ensembleId, bad, userId).catch(e => e)
    const path = err instanceof ZodError ? err.issues[0]!.path : err instanceof DrillNoteError ? err.path : null
    expect(path).toEqual(['chords', 0, 'notes', 'Upper'])
    expect(await db('drills').count({ n: '*' }).first()).toEqual({ n: 0 })
  })

  it('rolls back every row when a write fails half-way', async () => {
    await expect(db.transaction(async (trx) => {
      await saveDrill(trx, ensembleId, drill, userId)
      throw new Error('later step failed')
    })).rejects.toThrow('later step failed')
    expect(await db('drill_parts').count({ n: '*' }).first()).toEqual({ n: 0 })
  })
})

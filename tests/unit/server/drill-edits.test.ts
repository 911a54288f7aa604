// Drill editing on a real (in-memory) database: versions, conflicts, copies, archive and search.
import { afterEach, beforeEach, describe, expect, it } from 'vitest'
import type { Knex } from 'knex'
import { createKnex } from '../../../server/database/knex'
import { migrateLatest } from '../../../server/database/migrations'
import { loadDrill, saveDrill } from '../../../server/utils/drills'
import { drillDefaults, duplicateDrill, loadDrillVersion, searchEnsembleDrills, setDrillArchived, updateDrill } from '../../../server/utils/drill-edits'
import { DrillDocument, type DrillInput } from '../../../shared/drill/schema'

let db: Knex
let ensembleId: number
let userId: number
let otherId: number
beforeEach(async () => {
  db = createKnex(':memory:')
  await migrateLatest(db)
  userId = (await db('users').insert({ email: 'd@example.org', name: 'Dana Director' }).returning('id'))[0].id
  otherId = (await db('users').insert({ email: 'e@example.org', name: 'Eli Director' }).returning('id'))[0].id
  ensembleId = (await db('ensembles').insert({ name: 'E', a4: 442, tolerance: 8, default_system: JSON.stringify({ name: 'just-root' }) }).returning('id'))[0].id
  await db('sections').insert([{ ensemble_id: ensembleId, name: 'Cornet', position: 0, instrument: 'cornet-bb' }, { ensemble_id: ensembleId, name: 'Bass', position: 1 }])
})
afterEach(async () => { await db.destroy() })

const drill: DrillInput = {
  title: 'Cadence in F',
  key: 'F major',
  parts: [{ name: 'Upper' }, { name: 'Lower' }],
  chords: [
    { beats: 2, notes: { Upper: 'A4', Lower: 'F3' } },
    { beats: 2, notes: { Upper: 'G4', Lower: 'C3' } },
  ],
}

describe('drill versions and conflicts', () => {
  it('saves a new version only from the stored one, keeping each version of the document', async () => {
    const { id } = await saveDrill(db, ensembleId, drill, userId)
    const stored = (await loadDrill(db, id))!
    const edited = DrillDocument.parse({ ...drill, title: 'Cadence in F, slower', tempo: 48 })
    expect(await updateDrill(db, stored, edited, 1, userId)).toEqual({ version: 2 })

    // A second director still holding version 1 is told who saved version 2; nothing changes.
    const stale = DrillDocument.parse({ ...drill, title: 'Overwrite attempt' })
    const result = await updateDrill(db, stored, stale, 1, otherId)
    expect(result).toMatchObject({ conflict: { code: 'version_conflict', currentVersion: 2, updatedBy: 'Dana Director' } })
    expect((await loadDrill(db, id))!.document.title).toBe('Cadence in F, slower')

    expect((await loadDrillVersion(db, id, 1))!.title).toBe('Cadence in F')
    expect((await loadDrillVersion(db, id, 2))!.tempo).toBe(48)
    expect(await loadDrillVersion(db, id, 3)).toBeNull()
  })
})

describe('duplicate, archive, restore and search', () => {
  it('copies a drill as a new one, and archiving hides it from the active list but keeps its takes', async () => {
    const { id } = await saveDrill(db, ensembleId, drill, userId)
    const copy = await duplicateDrill(db, (await loadDrill(db, id))!, userId)
    expect(copy.id).not.toBe(id)
    expect(copy.version).toBe(1)
    const copied = (await loadDrill(db, copy.id))!
    expect(copied.document.title).toBe('Cadence in F (copy)')
    expect(copied.document.chords).toEqual((await loadDrill(db, id))!.document.chords)

    await db('takes').insert({ ensemble_id: ensembleId, drill_id: id, user_id: userId, part: 'Upper', object_key: 'k1' })
    await setDrillArchived(db, id, true, userId)
    expect((await searchEnsembleDrills(db, ensembleId)).map(d => d.id)).toEqual([copy.id])
    const archived = await searchEnsembleDrills(db, ensembleId, { status: 'archived' })
    expect(archived).toMatchObject([{ id, takes: 1 }])
    expect(archived[0]!.archivedAt).toBeTruthy()
    expect(await db('takes').where({ drill_id: id }).count({ n: '*' })).toEqual([{ n: 1 }])

    await setDrillArchived(db, id, false, userId)
    expect((await searchEnsembleDrills(db, ensembleId)).map(d => d.id).sort()).toEqual([id, copy.id].sort())
  })

  it('searches titles, part names and keys, case-insensitively and with LIKE wildcards taken literally', async () => {
    const a = await saveDrill(db, ensembleId, drill, userId)
    const b = await saveDrill(db, ensembleId, { ...drill, title: '100% tuned', key: 'D minor', parts: [{ name: 'Alto' }], chords: [{ beats: 1, notes: { Alto: 'D4' } }] }, userId)
    expect((await searchEnsembleDrills(db, ensembleId, { q: 'cadence' })).map(d => d.id)).toEqual([a.id])
    expect((await searchEnsembleDrills(db, ensembleId, { q: 'alto' })).map(d => d.id)).toEqual([b.id])
    expect((await searchEnsembleDrills(db, ensembleId, { q: 'd minor' })).map(d => d.id)).toEqual([b.id])
    expect((await searchEnsembleDrills(db, ensembleId, { q: '0%' })).map(d => d.id)).toEqual([b.id])
    expect(await searchEnsembleDrills(db, ensembleId, { q: '_' })).toEqual([])
  })
})

describe('a new drill starts from the ensemble', () => {
  it('takes the ensemble reference pitch, tolerance and system, one part per section', async () => {
    const d = (await drillDefaults(db, ensembleId))!
    expect(d.document).toMatchObject({ a4: 442, tolerance: 8, system: { name: 'just-root' } })
    expect(d.document.parts).toEqual([{ name: 'Cornet', instrument: 'cornet-bb' }, { name: 'Bass' }])
    expect(await drillDefaults(db, ensembleId + 99)).toBeNull()
  })
})

import type { Knex } from 'knex'
import { DrillDocument, parseSystem, type SystemOptions } from '../../shared/drill/schema'
import type { DrillArchiveState, DrillConflict, DrillDefaults } from '../../shared/types/drill'
import type { DrillListItem } from '../../shared/types/drill-view'
import { loadDrill, saveDrill, type StoredDrill } from './drills'

/** Characters LIKE treats specially, escaped so a search for "50%" finds "50%". */
const likeEscape = (s: string) => s.replace(/[\\%_]/g, m => `\\${m}`)

/** The drills of an ensemble, newest change first; `q` matches the title, a part name or the key. */
export async function searchEnsembleDrills (db: Knex, ensembleId: number, opts: { q?: string, status?: 'active' | 'archived' | 'all' } = {}): Promise<DrillListItem[]> {
  const q = db('drills as d').where('d.ensemble_id', ensembleId)
    .select('d.id', 'd.document', 'd.version', 'd.created_at', 'd.updated_at', 'd.archived_at',
      db.raw('(select count(*) from takes t where t.drill_id = d.id) as take_count'))
    .orderBy([{ column: 'd.updated_at', order: 'desc' }, { column: 'd.id', order: 'desc' }])
  if ((opts.status ?? 'active') === 'active') q.whereNull('d.archived_at')
  else if (opts.status === 'archived') q.whereNotNull('d.archived_at')
  const term = opts.q?.trim()
  if (term) {
    const like = `%${likeEscape(term.toLowerCase())}%`
    q.where(function () {
      this.whereRaw("lower(d.title) like ? escape '\\'", [like])
        .orWhereRaw("lower(d.key_name) like ? escape '\\'", [like])
        .orWhereExists(function () {
          this.from('drill_parts as p').whereRaw('p.drill_id = d.id').whereRaw("lower(p.name) like ? escape '\\'", [like])
        })
    })
  }
  const rows = await q
  return rows.map((r: Record<string, any>) => {
    const d = JSON.parse(r.document) as DrillDocument
    return {
      id: r.id,
      title: d.title,
      key: d.key,
      tempo: d.tempo,
      a4: d.a4,
      system: d.system,
      tolerance: d.tolerance,
      parts: d.parts.map(p => ({ name: p.name, instrument: p.instrument ?? null })),
      chords: d.chords.length,
      version: r.version,
      takes: Number(r.take_count),
      createdAt: r.created_at,
      updatedAt: r.updated_at,
      archivedAt: r.archived_at ?? null,
    }
  })
}

/**
 * A new drill's starting document in an ensemble: its reference pitch, tolerance and tuning system,
 * one part per section (with the section's instrument) and one C major chord to edit; null when the
 * ensemble does not exist.
 */
export async function drillDefaults (db: Knex, ensembleId: number): Promise<DrillDefaults | null> {
  const e = await db('ensembles').where({ id: ensembleId }).first('id', 'name', 'a4', 'tolerance', 'default_system')
  if (!e) return null
  let system: SystemOptions = { name: 'equal', seventh: 'harmonic', fraction: '1/4' }
  if (e.default_system) {
    try { system = parseSystem(JSON.parse(e.default_system)) } catch { /* an unreadable default falls back to equal temperament */ }
  }
  const sections = await db('sections').where({ ensemble_id: ensembleId }).orderBy(['position', 'id']).select('name', 'instrument')
  const parts = sections.length
    ? sections.slice(0, 16).map((s: { name: string, instrument: string | null }) => ({ name: s.name, ...(s.instrument ? { instrument: s.instrument } : {}) }))
    : [{ name: 'Part 1' }]
  const document = DrillDocument.parse({
    title: 'New drill',
    key: 'C major',
    tempo: 60,
    a4: e.a4,
    system,
    tolerance: e.tolerance,
    parts,
    chords: [{ beats: 4, notes: Object.fromEntries(parts.map(p => [p.name, null])) }],
  })
  return { ensembleId: e.id, ensembleName: e.name, document }
}

/**
 * Saves a new version of a drill when `expectedVersion` is still the stored one; otherwise returns
 * the conflict (who saved which version when) and changes nothing.
 */
export async function updateDrill (db: Knex, drill: StoredDrill, doc: DrillDocument, expectedVersion: number, userId: number): Promise<{ version: number } | { conflict: DrillConflict }> {
  return db.transaction(async (trx) => {
    const row = await trx('drills as d').leftJoin('users as u', 'u.id', 'd.updated_by')
      .where('d.id', drill.id).first('d.version', 'd.updated_at', 'u.name')
    if (!row || row.version !== expectedVersion) {
      return { conflict: { code: 'version_conflict' as const, currentVersion: row?.version ?? drill.version, updatedAt: row?.updated_at ?? '', updatedBy: row?.name ?? null } }
    }
    const saved = await saveDrill(trx, drill.ensembleId, doc, userId, { drillId: drill.id })
    return { version: saved.version }
  })
}

/** A copy of a drill in the same ensemble as a new drill at version 1, titled "… (copy)". */
export async function duplicateDrill (db: Knex, drill: StoredDrill, userId: number): Promise<{ id: number, version: number }> {
  const suffix = ' (copy)'
  const title = drill.document.title.slice(0, 120 - suffix.length) + suffix
  return db.transaction(async (trx) => {
    const saved = await saveDrill(trx, drill.ensembleId, { ...drill.document, title }, userId)
    await trx('drills').where({ id: saved.id }).update({ copied_from: drill.id })
    return saved
  })
}

/** Archives (hides from lists and new takes) or restores a drill; its takes are untouched. */
export async function setDrillArchived (db: Knex, drillId: number, archived: boolean, userId: number): Promise<DrillArchiveState> {
  const archivedAt = archived ? new Date().toISOString() : null
  await db('drills').where({ id: drillId }).update({ archived_at: archivedAt, updated_by: userId, updated_at: new Date().toISOString() })
  return { id: drillId, archivedAt }
}

/** A stored version of a drill's document (what a take of that version was recorded against), or null. */
export async function loadDrillVersion (db: Knex, drillId: number, version: number): Promise<DrillDocument | null> {
  const row = await db('drill_versions').where({ drill_id: drillId, version }).first('document')
  if (row) return DrillDocument.parse(JSON.parse(row.document))
  const current = await loadDrill(db, drillId)
  return current && current.version === version ? current.document : null
}

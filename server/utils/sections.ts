import type { Knex } from 'knex'
import type { SectionSummary } from '../../shared/types/ensemble'
import type { SectionCreate, SectionPatch } from '../../shared/schemas/ensemble'
import { writeAudit } from './audit'
import type { Actor } from './ensemble-settings'
import { listSections } from './ensemble-settings'

export type SectionResult = { ok: true, section: SectionSummary } | { ok: false, code: 'not_found' | 'section_name_taken' | 'same_section' | 'move_to_required' | 'bad_order' }

interface SectionRow { id: number, ensemble_id: number, name: string, position: number, instrument: string | null }

function findSection (db: Knex, ensembleId: number, sectionId: number): Promise<SectionRow | undefined> {
  return db('sections').where({ id: sectionId, ensemble_id: ensembleId }).first()
}

async function nameTaken (db: Knex, ensembleId: number, name: string, exceptId: number | null): Promise<boolean> {
  const q = db('sections').where({ ensemble_id: ensembleId }).whereRaw('lower(trim(name)) = ?', [name.trim().toLowerCase()])
  if (exceptId != null) q.whereNot({ id: exceptId })
  return Boolean(await q.first('id'))
}

async function summary (db: Knex, ensembleId: number, sectionId: number): Promise<SectionSummary> {
  return (await listSections(db, ensembleId)).find(s => s.id === sectionId)!
}

const audited = (s: SectionRow) => ({ name: s.name, position: s.position, instrument: s.instrument })

/** Adds a section at the end; names are unique in an ensemble without regard to case. */
export async function createSection (db: Knex, ensembleId: number, actor: Actor, body: SectionCreate): Promise<SectionResult> {
  return db.transaction(async (trx) => {
    if (await nameTaken(trx, ensembleId, body.name, null)) return { ok: false, code: 'section_name_taken' }
    const last = await trx('sections').where({ ensemble_id: ensembleId }).max({ p: 'position' }).first()
    const position = last?.p == null ? 0 : Number(last.p) + 1
    const [row] = await trx('sections').insert({ ensemble_id: ensembleId, name: body.name, instrument: body.instrument ?? null, position }).returning('id')
    await writeAudit(trx, { actorId: actor.id, ip: actor.ip, action: 'section.created', subjectType: 'section', subjectId: row.id, ensembleId, data: { before: null, after: { name: body.name, position, instrument: body.instrument ?? null } } })
    return { ok: true, section: await summary(trx, ensembleId, row.id) }
  })
}

/** Renames a section or changes its usual instrument. */
export async function updateSection (db: Knex, ensembleId: number, sectionId: number, actor: Actor, body: SectionPatch): Promise<SectionResult> {
  return db.transaction(async (trx) => {
    const row = await findSection(trx, ensembleId, sectionId)
    if (!row) return { ok: false, code: 'not_found' }
    if (body.name !== undefined && await nameTaken(trx, ensembleId, body.name, sectionId)) return { ok: false, code: 'section_name_taken' }
    const update: Record<string, unknown> = {}
    if (body.name !== undefined && body.name !== row.name) update.name = body.name
    if (body.instrument !== undefined && body.instrument !== row.instrument) update.instrument = body.instrument
    if (Object.keys(update).length) {
      await trx('sections').where({ id: sectionId }).update(update)
      await writeAudit(trx, { actorId: actor.id, ip: actor.ip, action: 'section.updated', subjectType: 'section', subjectId: sectionId, ensembleId, data: { before: audited(row), after: { ...audited(row), ...update } } })
    }
    return { ok: true, section: await summary(trx, ensembleId, sectionId) }
  })
}

/** Puts the sections in the given order; the list must hold every section of the ensemble once. */
export async function reorderSections (db: Knex, ensembleId: number, actor: Actor, ids: number[]): Promise<{ ok: true, sections: SectionSummary[] } | { ok: false, code: 'bad_order' }> {
  return db.transaction(async (trx) => {
    const before = await listSections(trx, ensembleId)
    const have = before.map(s => s.id).sort((a, b) => a - b)
    const given = [...ids].sort((a, b) => a - b)
    if (have.length !== given.length || have.some((v, i) => v !== given[i])) return { ok: false, code: 'bad_order' }
    for (const [position, id] of ids.entries()) await trx('sections').where({ id, ensemble_id: ensembleId }).update({ position })
    await writeAudit(trx, { actorId: actor.id, ip: actor.ip, action: 'section.reordered', subjectType: 'ensemble', subjectId: ensembleId, ensembleId, data: { before: before.map(s => s.name), after: ids.map(id => before.find(s => s.id === id)!.name) } })
    return { ok: true, sections: await listSections(trx, ensembleId) }
  })
}

/** Moves members, invitations and assignments of one section to another (inside a transaction). */
async function moveEverything (trx: Knex.Transaction, fromId: number, toId: number): Promise<number> {
  const moved = await trx('memberships').where({ section_id: fromId }).update({ section_id: toId, updated_at: new Date().toISOString() })
  await trx('invitations').where({ section_id: fromId }).update({ section_id: toId })
  await trx('assignments').where({ section_id: fromId }).update({ section_id: toId })
  await trx('assignment_targets').where({ section_id: fromId }).update({ section_id: toId })
  await trx('assignment_assignees').where({ section_id: fromId }).update({ section_id: toId })
  return moved
}

/** Merges a section into another (optionally renaming the one that stays); the first is removed. */
export async function mergeSections (db: Knex, ensembleId: number, sectionId: number, intoId: number, actor: Actor, name?: string): Promise<SectionResult> {
  if (sectionId === intoId) return { ok: false, code: 'same_section' }
  return db.transaction(async (trx) => {
    const from = await findSection(trx, ensembleId, sectionId)
    const into = await findSection(trx, ensembleId, intoId)
    if (!from || !into) return { ok: false, code: 'not_found' }
    if (name !== undefined && name.trim().toLowerCase() !== from.name.trim().toLowerCase() && await nameTaken(trx, ensembleId, name, intoId)) return { ok: false, code: 'section_name_taken' }
    const moved = await moveEverything(trx, sectionId, intoId)
    await trx('sections').where({ id: sectionId }).delete()
    if (name !== undefined && name !== into.name) await trx('sections').where({ id: intoId }).update({ name })
    await writeAudit(trx, { actorId: actor.id, ip: actor.ip, action: 'section.merged', subjectType: 'section', subjectId: intoId, ensembleId, data: { before: { merged: audited(from), into: audited(into) }, after: { name: name ?? into.name, membersMoved: moved } } })
    return { ok: true, section: await summary(trx, ensembleId, intoId) }
  })
}

/** Removes a section; its members (and assignments) first move to `moveTo`, which is required when it has any. */
export async function removeSection (db: Knex, ensembleId: number, sectionId: number, actor: Actor, moveTo: number | undefined): Promise<{ ok: true } | { ok: false, code: 'not_found' | 'move_to_required' | 'same_section' }> {
  if (moveTo === sectionId) return { ok: false, code: 'same_section' }
  return db.transaction(async (trx) => {
    const row = await findSection(trx, ensembleId, sectionId)
    if (!row) return { ok: false, code: 'not_found' }
    const members = Number((await trx('memberships').where({ section_id: sectionId }).count({ n: '*' }).first())?.n ?? 0)
    const assignments = Number((await trx('assignments').where({ section_id: sectionId }).count({ n: '*' }).first())?.n ?? 0)
      + Number((await trx('assignment_targets').where({ section_id: sectionId }).count({ n: '*' }).first())?.n ?? 0)
    let target: SectionRow | undefined
    if (moveTo !== undefined) {
      target = await findSection(trx, ensembleId, moveTo)
      if (!target) return { ok: false, code: 'not_found' }
    } else if (members > 0 || assignments > 0) {
      return { ok: false, code: 'move_to_required' }
    }
    const moved = target ? await moveEverything(trx, sectionId, target.id) : 0
    await trx('invitations').where({ section_id: sectionId }).update({ section_id: null })
    await trx('sections').where({ id: sectionId }).delete()
    const rest = await trx('sections').where({ ensemble_id: ensembleId }).orderBy([{ column: 'position' }, { column: 'id' }]).select('id')
    for (const [position, s] of rest.entries()) await trx('sections').where({ id: s.id }).update({ position })
    await writeAudit(trx, { actorId: actor.id, ip: actor.ip, action: 'section.removed', subjectType: 'section', subjectId: sectionId, ensembleId, data: { before: audited(row), after: target ? { membersMovedTo: target.name, membersMoved: moved } : null } })
    return { ok: true }
  })
}

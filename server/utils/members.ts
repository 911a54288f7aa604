import type { Knex } from 'knex'
import type { MemberItem, MemberPage, MemberRole, Reading } from '../../shared/types/ensemble'
import type { MemberPatch, MembersQuery } from '../../shared/schemas/ensemble'
import { writeAudit } from './audit'
import type { Actor } from './ensemble-settings'

const ROLE_ORDER = "case m.role when 'director' then 0 when 'section_leader' then 1 else 2 end"

/** What a caller may see of the member list. */
export interface MemberScope {
  /** Directors and site admins: addresses shown, and `q` matches them. */
  withEmail: boolean
  /** A section leader: their own section only (a leader without a section sees only themselves). */
  onlySection?: { sectionId: number | null, userId: number }
}

/** The pitch a member reads: the membership's own setting, else the account's default. */
const READS = "coalesce(m.reads, u.pitch_view, 'concert')"

function toItem (r: Record<string, any>, withEmail: boolean): MemberItem {
  const item: MemberItem = {
    userId: r.user_id, name: r.name, role: r.role as MemberRole, sectionId: r.section_id ?? null,
    section: r.section ?? null, instrument: r.instrument ?? null, reads: (r.reads === 'written' ? 'written' : 'concert') as Reading,
    readsFromAccount: r.own_reads == null,
  }
  if (withEmail) item.email = r.email
  return item
}

/**
 * One page of an ensemble's members. Only `scope.withEmail` adds addresses and lets `q` match
 * them; everyone else searches names only and never sees an address.
 */
export async function listMembers (db: Knex, ensembleId: number, query: MembersQuery, scope: MemberScope): Promise<MemberPage> {
  const { withEmail, onlySection } = scope
  const base = db('memberships as m')
    .join('users as u', 'u.id', 'm.user_id')
    .leftJoin('sections as s', 's.id', 'm.section_id')
    .where('m.ensemble_id', ensembleId)
  if (onlySection) {
    if (onlySection.sectionId == null) base.where('m.user_id', onlySection.userId)
    else base.where('m.section_id', onlySection.sectionId)
  }
  if (query.q) {
    const like = `%${query.q.toLowerCase().replace(/[\\%_]/g, c => `\\${c}`)}%`
    base.where((w) => {
      w.whereRaw("lower(u.name) like ? escape '\\'", [like])
      if (withEmail) w.orWhereRaw("u.email like ? escape '\\'", [like])
    })
  }
  if (query.role) base.where('m.role', query.role)
  if (query.sectionId === 'none') base.whereNull('m.section_id')
  else if (query.sectionId !== undefined) base.where('m.section_id', query.sectionId)

  const total = Number((await base.clone().count({ n: '*' }).first())?.n ?? 0)
  const dir = query.dir === 'desc' ? 'desc' : 'asc'
  const q = base.clone().select('m.user_id', 'u.name', 'u.email', 'm.role', 'm.section_id', 's.name as section', 'm.reads as own_reads',
    db.raw(`${READS} as reads`), db.raw('coalesce(m.instrument, s.instrument) as instrument'))
  switch (query.sort) {
    case 'role': q.orderByRaw(`${ROLE_ORDER} ${dir}`); break
    case 'section': q.orderByRaw(`s.position is null, s.position ${dir}`); break
    case 'instrument': q.orderByRaw(`coalesce(m.instrument, s.instrument) is null, coalesce(m.instrument, s.instrument) ${dir}`); break
    default: break
  }
  q.orderByRaw(`u.name collate nocase ${query.sort === 'name' ? dir : 'asc'}, m.user_id`)
  const rows = await q.limit(query.pageSize).offset((query.page - 1) * query.pageSize)
  const items = rows.map((r: Record<string, any>) => toItem(r, withEmail))
  let only: MemberPage['onlySection'] = null
  if (onlySection) {
    const section = onlySection.sectionId == null ? null : await db('sections').where({ id: onlySection.sectionId }).first('name')
    only = { sectionId: onlySection.sectionId, section: section?.name ?? null }
  }
  return { items, total, page: query.page, pageSize: query.pageSize, onlySection: only }
}

export type MemberChange = { ok: true, member: MemberItem } | { ok: false, code: 'not_found' | 'section_not_found' | 'last_director' }

interface MembershipRow { id: number, user_id: number, role: MemberRole, section_id: number | null, instrument: string | null, reads: Reading | null }

async function otherDirectors (trx: Knex, ensembleId: number, userId: number): Promise<number> {
  const r = await trx('memberships').where({ ensemble_id: ensembleId, role: 'director' }).whereNot({ user_id: userId }).count({ n: '*' }).first()
  return Number(r?.n ?? 0)
}

async function memberItem (db: Knex, ensembleId: number, userId: number): Promise<MemberItem> {
  const row = await db('memberships as m').join('users as u', 'u.id', 'm.user_id').leftJoin('sections as s', 's.id', 'm.section_id')
    .where({ 'm.ensemble_id': ensembleId, 'm.user_id': userId })
    .first('m.user_id', 'u.name', 'u.email', 'm.role', 'm.section_id', 's.name as section', 'm.reads as own_reads',
      db.raw(`${READS} as reads`), db.raw('coalesce(m.instrument, s.instrument) as instrument'))
  return toItem(row, true)
}

/** Changes a member's role, section, instrument or reading; the last director cannot step down. */
export async function updateMember (db: Knex, ensembleId: number, userId: number, actor: Actor, patch: MemberPatch): Promise<MemberChange> {
  return db.transaction(async (trx) => {
    const row = await trx('memberships').where({ ensemble_id: ensembleId, user_id: userId }).first<MembershipRow | undefined>()
    if (!row) return { ok: false, code: 'not_found' }
    if (patch.sectionId != null && !await trx('sections').where({ id: patch.sectionId, ensemble_id: ensembleId }).first('id')) return { ok: false, code: 'section_not_found' }
    if (row.role === 'director' && patch.role && patch.role !== 'director' && await otherDirectors(trx, ensembleId, userId) === 0) return { ok: false, code: 'last_director' }
    const fields = { role: 'role', sectionId: 'section_id', instrument: 'instrument', reads: 'reads' } as const
    const before: Record<string, unknown> = {}
    const after: Record<string, unknown> = {}
    const update: Record<string, unknown> = {}
    for (const [key, column] of Object.entries(fields) as [keyof typeof fields, (typeof fields)[keyof typeof fields]][]) {
      const value = patch[key]
      if (value !== undefined && value !== row[column]) {
        before[key] = row[column]
        after[key] = value
        update[column] = value
      }
    }
    if (Object.keys(update).length) {
      await trx('memberships').where({ id: row.id }).update({ ...update, updated_at: new Date().toISOString() })
      const action = update.role !== undefined ? 'member.role_changed' : 'member.updated'
      await writeAudit(trx, { actorId: actor.id, ip: actor.ip, action, subjectType: 'user', subjectId: userId, ensembleId, data: { before, after } })
    }
    return { ok: true, member: await memberItem(trx, ensembleId, userId) }
  })
}

/** Removes a member from the ensemble (their takes stay); the last director cannot be removed. */
export async function removeMember (db: Knex, ensembleId: number, userId: number, actor: Actor): Promise<{ ok: true } | { ok: false, code: 'not_found' | 'last_director' }> {
  return db.transaction(async (trx) => {
    const row = await trx('memberships').where({ ensemble_id: ensembleId, user_id: userId }).first<MembershipRow | undefined>()
    if (!row) return { ok: false, code: 'not_found' }
    if (row.role === 'director' && await otherDirectors(trx, ensembleId, userId) === 0) return { ok: false, code: 'last_director' }
    await trx('memberships').where({ id: row.id }).delete()
    await writeAudit(trx, { actorId: actor.id, ip: actor.ip, action: 'member.removed', subjectType: 'user', subjectId: userId, ensembleId, data: { before: { role: row.role, sectionId: row.section_id }, after: null } })
    return { ok: true }
  })
}

import type { Knex } from 'knex'
import type { AdminEnsembleBody, AdminEnsemblesQuery } from '../../shared/schemas/admin'
import type { AdminEnsemble } from '../../shared/types/admin'
import { writeAudit } from './audit'
import { insertInvitation } from './invitations'

function likeTerm (q: string): string {
  return `%${q.toLowerCase().replace(/[\\%_]/g, '\\$&')}%`
}

function ensemblesQuery (db: Knex, f: Pick<AdminEnsemblesQuery, 'q' | 'archived'>) {
  const q = db('ensembles as e')
  if (f.q) q.whereRaw("lower(e.name) like ? escape '\\'", [likeTerm(f.q)])
  if (f.archived === 'open') q.whereNull('e.archived_at')
  if (f.archived === 'archived') q.whereNotNull('e.archived_at')
  return q
}

async function decorate (db: Knex, rows: Record<string, any>[]): Promise<AdminEnsemble[]> {
  const ids = rows.map(r => r.id as number)
  const directors = ids.length
    ? await db('memberships as m').join('users as u', 'u.id', 'm.user_id').whereIn('m.ensemble_id', ids).where('m.role', 'director')
      .select('m.ensemble_id', 'u.name').orderByRaw('u.name collate nocase') as { ensemble_id: number, name: string }[]
    : []
  const pending = ids.length
    ? await db('invitations').whereIn('ensemble_id', ids).where('role', 'director')
      .whereNull('accepted_at').whereNull('revoked_at').where('expires_at', '>', new Date().toISOString())
      .select('ensemble_id', 'email').orderBy('id') as { ensemble_id: number, email: string }[]
    : []
  return rows.map(r => ({
    id: r.id,
    name: r.name,
    kind: r.kind,
    archived: r.archived_at != null,
    archivedAt: r.archived_at ?? null,
    createdAt: r.created_at,
    memberCount: Number(r.member_count ?? 0),
    directors: directors.filter(d => d.ensemble_id === r.id).map(d => d.name),
    pendingDirectorInvitations: [...new Set(pending.filter(p => p.ensemble_id === r.id).map(p => p.email))],
  }))
}

function withCounts (db: Knex, q: Knex.QueryBuilder) {
  return q.select('e.id', 'e.name', 'e.kind', 'e.archived_at', 'e.created_at',
    db.raw('(select count(*) from memberships m where m.ensemble_id = e.id) as member_count'))
}

/** Every ensemble matching a name search and an archive filter, open ones first, by name. */
export async function listAdminEnsembles (db: Knex, f: AdminEnsemblesQuery): Promise<{ items: AdminEnsemble[], total: number }> {
  const [counted] = await ensemblesQuery(db, f).count<{ n: number }[]>({ n: '*' })
  const rows = await withCounts(db, ensemblesQuery(db, f))
    .orderByRaw('e.archived_at is not null, e.name collate nocase, e.id')
    .limit(f.pageSize)
    .offset((f.page - 1) * f.pageSize)
  return { items: await decorate(db, rows), total: Number(counted?.n ?? 0) }
}

export async function findAdminEnsemble (db: Knex, id: number): Promise<AdminEnsemble | null> {
  const row = await withCounts(db, db('ensembles as e').where('e.id', id)).first()
  return row ? (await decorate(db, [row]))[0]! : null
}

/** Whether another ensemble already has this name (any case). */
export async function ensembleNameTaken (db: Knex, name: string): Promise<boolean> {
  return Boolean(await db('ensembles').whereRaw('lower(name) = lower(?)', [name]).first('id'))
}

/**
 * Creates an ensemble and invites its first director (valid for `ttlMs`), in one transaction with
 * both audit rows. Returns the ensemble, the invitation and the token to mail.
 */
export async function createEnsembleWithDirector (db: Knex, actorId: number, body: AdminEnsembleBody, ip: string | null, ttlMs: number) {
  return db.transaction(async (trx) => {
    const [row] = await trx('ensembles').insert({ name: body.name, kind: body.kind, created_by: actorId }).returning('id')
    const id = typeof row === 'object' ? (row as { id: number }).id : row as number
    await writeAudit(trx, { actorId, action: 'ensemble.created', subjectType: 'ensemble', subjectId: id, ensembleId: id, ip, after: { name: body.name, kind: body.kind } })
    const invitation = await insertInvitation(trx, id, { id: actorId, ip }, { email: body.directorEmail, role: 'director', sectionId: null }, ttlMs)
    return { ensemble: (await findAdminEnsemble(trx, id))!, invitation }
  })
}

/** Archives or restores an ensemble (an audit row when it changed); null when there is none. */
export async function setEnsembleArchived (db: Knex, actorId: number, id: number, archived: boolean, ip: string | null): Promise<AdminEnsemble | null> {
  return db.transaction(async (trx) => {
    const before = await findAdminEnsemble(trx, id)
    if (!before) return null
    if (before.archived === archived) return before
    const now = new Date().toISOString()
    await trx('ensembles').where({ id }).update({ archived_at: archived ? now : null, updated_at: now })
    await writeAudit(trx, {
      actorId, action: archived ? 'ensemble.archived' : 'ensemble.restored', subjectType: 'ensemble', subjectId: id, ensembleId: id, ip,
      before: { archived: before.archived }, after: { archived },
    })
    return findAdminEnsemble(trx, id)
  })
}

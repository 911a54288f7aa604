import type { Knex } from 'knex'
import type { AdminUsersQuery } from '../../shared/schemas/admin'
import type { AdminUser } from '../../shared/types/admin'
import { writeAudit } from './audit'

function likeTerm (q: string): string {
  return `%${q.toLowerCase().replace(/[\\%_]/g, '\\$&')}%`
}

function usersQuery (db: Knex, f: Pick<AdminUsersQuery, 'q' | 'status'>) {
  const q = db('users as u')
  if (f.q) {
    const term = likeTerm(f.q)
    q.where(w => w.whereRaw("lower(u.name) like ? escape '\\'", [term]).orWhereRaw("u.email like ? escape '\\'", [term]))
  }
  if (f.status === 'active') q.whereNull('u.disabled_at')
  if (f.status === 'disabled') q.whereNotNull('u.disabled_at')
  if (f.status === 'admin') q.where('u.site_role', 'admin')
  return q
}

const COLUMNS = ['u.id', 'u.name', 'u.email', 'u.site_role', 'u.disabled_at', 'u.last_login_at', 'u.created_at'] as const

function toAdminUser (r: Record<string, any>): AdminUser {
  return {
    id: r.id,
    name: r.name,
    email: r.email,
    siteAdmin: r.site_role === 'admin',
    disabled: r.disabled_at != null,
    disabledAt: r.disabled_at ?? null,
    lastLoginAt: r.last_login_at ?? null,
    createdAt: r.created_at,
    ensembleCount: Number(r.ensemble_count ?? 0),
  }
}

function withCounts (db: Knex, q: Knex.QueryBuilder) {
  return q.select(...COLUMNS, db.raw('(select count(*) from memberships m where m.user_id = u.id) as ensemble_count'))
}

/** Users matching a search (name or e-mail) and a status, by name, one page at a time. */
export async function listUsers (db: Knex, f: AdminUsersQuery): Promise<{ items: AdminUser[], total: number }> {
  const [counted] = await usersQuery(db, f).count<{ n: number }[]>({ n: '*' })
  const rows = await withCounts(db, usersQuery(db, f))
    .orderByRaw('u.name collate nocase, u.id')
    .limit(f.pageSize)
    .offset((f.page - 1) * f.pageSize)
  return { items: rows.map(toAdminUser), total: Number(counted?.n ?? 0) }
}

export async function findAdminUser (db: Knex, id: number): Promise<AdminUser | null> {
  const row = await withCounts(db, db('users as u').where('u.id', id)).first()
  return row ? toAdminUser(row) : null
}

export type UserChange = { disabled: boolean } | { siteAdmin: boolean }
export type UserChangeResult = { ok: true, user: AdminUser } | { ok: false, code: 'own_account' }

/**
 * Disables/restores an account or grants/removes site admin, with an audit row when something
 * changed. A site admin cannot do either to their own account (they would lock themselves out).
 * Null when there is no such user. Disabling ends every session of the account for good: a
 * restored account signs in again.
 */
export async function changeUser (db: Knex, actorId: number, userId: number, change: UserChange, ip: string | null): Promise<UserChangeResult | null> {
  return db.transaction(async (trx) => {
    const before = await findAdminUser(trx, userId)
    if (!before) return null
    if (userId === actorId) return { ok: false, code: 'own_account' } as const
    const now = new Date().toISOString()
    if ('disabled' in change && change.disabled !== before.disabled) {
      await trx('users').where({ id: userId }).update(change.disabled
        ? { disabled_at: now, sessions_revoked_at: now, updated_at: now }
        : { disabled_at: null, updated_at: now })
      await writeAudit(trx, {
        actorId, action: change.disabled ? 'user.disabled' : 'user.restored', subjectType: 'user', subjectId: userId, ip,
        before: { disabled: before.disabled }, after: { disabled: change.disabled },
      })
    }
    if ('siteAdmin' in change && change.siteAdmin !== before.siteAdmin) {
      await trx('users').where({ id: userId }).update({ site_role: change.siteAdmin ? 'admin' : null, updated_at: now })
      await writeAudit(trx, {
        actorId, action: change.siteAdmin ? 'user.site_admin_granted' : 'user.site_admin_removed', subjectType: 'user', subjectId: userId, ip,
        before: { siteAdmin: before.siteAdmin }, after: { siteAdmin: change.siteAdmin },
      })
    }
    return { ok: true, user: (await findAdminUser(trx, userId))! } as const
  })
}

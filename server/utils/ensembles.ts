import type { Knex } from 'knex'
import type { EnsembleRole, SessionUser } from '../../shared/types/user'
import type { EnsembleKind } from '../../shared/types/ensemble'

export interface EnsembleListItem {
  id: number
  name: string
  kind: EnsembleKind
  /** The caller's role; 'admin' for a site admin who is not a member. */
  role: EnsembleRole | 'admin'
  sectionCount: number
  memberCount: number
  archived: boolean
}

/** The caller's ensembles with their role in each (every ensemble for a site admin), open ones first. */
export async function listEnsemblesForUser (db: Knex, user: SessionUser): Promise<EnsembleListItem[]> {
  const q = db('ensembles as e')
    .leftJoin('memberships as m', function () {
      this.on('m.ensemble_id', '=', 'e.id').andOn('m.user_id', '=', db.raw('?', [user.id]))
    })
    .select(
      'e.id', 'e.name', 'e.kind', 'e.archived_at', 'm.role',
      db.raw('(select count(*) from sections s where s.ensemble_id = e.id) as section_count'),
      db.raw('(select count(*) from memberships mm where mm.ensemble_id = e.id) as member_count'),
    )
    .orderByRaw('e.archived_at is not null, e.name collate nocase, e.id')
  if (user.siteRole !== 'admin') q.whereNotNull('m.id')
  const rows = await q
  return rows.map((r: Record<string, any>) => ({
    id: r.id,
    name: r.name,
    kind: r.kind,
    role: r.role ?? 'admin',
    sectionCount: Number(r.section_count),
    memberCount: Number(r.member_count),
    archived: r.archived_at != null,
  }))
}

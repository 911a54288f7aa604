// Who may see what: the one membership rule and the take and drill look-ups built on it.
// These return null when the caller may not see the object; routes turn that into 404 and make
// the role decisions (403) themselves.
import type { Knex } from 'knex'
import type { SessionUser } from '../../shared/types/user'
import { findMembership, type Membership } from './auth'
import { loadDrill, type StoredDrill } from './drills'
import { toTake, type TakeRecord } from './takes'

/**
 * The caller's membership of an existing ensemble, or null. A site admin without a membership
 * acts as the ensemble's director (the only place this rule is written).
 */
export async function membershipFor (db: Knex, user: SessionUser, ensembleId: number): Promise<Membership | null> {
  const m = await findMembership(db, user.id, ensembleId)
  if (m) return m
  if (user.siteRole !== 'admin') return null
  const exists = await db('ensembles').where({ id: ensembleId }).first('id')
  return exists ? { ensembleId, userId: user.id, role: 'director', sectionId: null, viaSiteAdmin: true } : null
}

export interface DrillAccess {
  drill: StoredDrill
  membership: Membership
  ensembleName: string
  ensembleArchived: boolean
}

/** A drill the caller may see (a member of its ensemble, or a site admin), or null. */
export async function findDrillForUser (db: Knex, user: SessionUser, drillId: number): Promise<DrillAccess | null> {
  const row = await db('drills as d').join('ensembles as e', 'e.id', 'd.ensemble_id')
    .where('d.id', drillId).first('d.ensemble_id', 'e.name', 'e.archived_at')
  if (!row) return null
  const membership = await membershipFor(db, user, row.ensemble_id)
  if (!membership) return null
  const drill = await loadDrill(db, drillId)
  if (!drill) return null
  return { drill, membership, ensembleName: row.name, ensembleArchived: row.archived_at != null }
}

export interface TakeAccess {
  take: TakeRecord
  membership: Membership | null
  /** The caller played the take. */
  isOwner: boolean
  /** The caller directs the take's ensemble (or is a site admin acting as its director). */
  isDirector: boolean
}

/**
 * A take the caller may open (report and audio), or null. The player sees their own takes,
 * directors every take of their ensemble, section leaders the takes of their section that are
 * not withdrawn.
 */
export async function findTakeForUser (db: Knex, user: SessionUser, takeId: number): Promise<TakeAccess | null> {
  const row = await db('takes').where({ id: takeId }).first()
  if (!row) return null
  const take = toTake(row)
  const membership = await membershipFor(db, user, take.ensembleId)
  const isOwner = take.userId === user.id
  const isDirector = membership?.role === 'director'
  let canView = isOwner || isDirector
  if (!canView && membership?.role === 'section_leader' && membership.sectionId != null && !take.withdrawnAt) {
    const pm = await db('memberships').where({ ensemble_id: take.ensembleId, user_id: take.userId }).first('section_id')
    canView = pm?.section_id === membership.sectionId
  }
  return canView ? { take, membership, isOwner, isDirector } : null
}

/**
 * The same rule as findTakeForUser, as a query over `takes as t` for lists: the caller's own
 * takes, every take of ensembles they direct, and the takes of their section that are not
 * withdrawn when they lead it.
 */
export function visibleTakes (db: Knex, user: SessionUser): Knex.QueryBuilder {
  return db('takes as t')
    .leftJoin('memberships as me', function () {
      this.on('me.ensemble_id', '=', 't.ensemble_id').andOn('me.user_id', '=', db.raw('?', [user.id]))
    })
    .leftJoin('memberships as pm', function () {
      this.on('pm.ensemble_id', '=', 't.ensemble_id').andOn('pm.user_id', '=', 't.user_id')
    })
    .where(w => w.where('t.user_id', user.id).orWhere('me.role', 'director')
      .orWhere(s => s.where('me.role', 'section_leader').whereNotNull('me.section_id').whereRaw('pm.section_id = me.section_id').whereNull('t.withdrawn_at'))
      // A site admin acts as director where they hold no membership (as in membershipFor).
      .orWhere(a => a.whereRaw('? = 1', [user.siteRole === 'admin' ? 1 : 0]).whereNull('me.user_id')))
}

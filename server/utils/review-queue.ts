// The review queue: analysed (or failed) takes nobody has reviewed yet, oldest first, limited to
// what the caller reviews: every section of the ensembles they direct (a site admin: every
// ensemble where they hold no membership, as in membershipFor), their own section where they lead.
import type { Knex } from 'knex'
import type { SessionUser } from '../../shared/types/user'
import type { ReviewQueueQuery } from '../../shared/schemas/review'
import type { ReviewQueueFacets, ReviewQueueItem, ReviewQueuePage } from '../../shared/types/review'

export type QueueRefusal = { refused: 'not_a_reviewer' | 'section_not_found' | 'other_section' }

const num = (v: unknown): number | null => (v == null || !Number.isFinite(Number(v)) ? null : Number(v))

/** Takes the user reviews and that wait for a first review (the caller's own takes never do). */
function queueScope (db: Knex, user: SessionUser): Knex.QueryBuilder {
  const admin = user.siteRole === 'admin' ? 1 : 0
  return db('takes as t')
    .join('ensembles as e', 'e.id', 't.ensemble_id')
    .leftJoin('memberships as me', function () {
      this.on('me.ensemble_id', '=', 't.ensemble_id').andOn('me.user_id', '=', db.raw('?', [user.id]))
    })
    .leftJoin('memberships as pm', function () {
      this.on('pm.ensemble_id', '=', 't.ensemble_id').andOn('pm.user_id', '=', 't.user_id')
    })
    .whereNull('e.archived_at').whereNull('t.withdrawn_at')
    .whereIn('t.status', ['analysed', 'failed'])
    .whereNot('t.user_id', user.id)
    .where(w => w.where('me.role', 'director')
      .orWhere(s => s.where('me.role', 'section_leader').whereNotNull('me.section_id').whereRaw('pm.section_id = me.section_id'))
      .orWhere(a => a.whereRaw('? = 1', [admin]).whereNull('me.user_id')))
    .whereNotExists(db('reviews as r').whereRaw('r.take_id = t.id').select(db.raw('1')))
}

/** Whether the user reviews anywhere, and what a section filter means for them. */
async function checkQueueAccess (db: Knex, user: SessionUser, sectionId: number | undefined): Promise<QueueRefusal | null> {
  const roles = await db('memberships as m').join('ensembles as e', 'e.id', 'm.ensemble_id')
    .where('m.user_id', user.id).whereNull('e.archived_at').select('m.ensemble_id', 'm.role', 'm.section_id')
  const admin = user.siteRole === 'admin'
  if (!admin && !roles.some(r => r.role === 'director' || r.role === 'section_leader')) return { refused: 'not_a_reviewer' }
  if (sectionId == null) return null
  const section = await db('sections').where({ id: sectionId }).first('ensemble_id')
  const mine = section ? roles.find(r => r.ensemble_id === section.ensemble_id) : undefined
  if (!section || (!mine && !admin)) return { refused: 'section_not_found' }
  if (!mine || mine.role === 'director') return null
  if (mine.role === 'section_leader' && mine.section_id === sectionId) return null
  return { refused: 'other_section' }
}

/** One page of the caller's queue with the values its filters can take, or a refusal. */
export async function reviewQueue (db: Knex, user: SessionUser, q: ReviewQueueQuery): Promise<ReviewQueuePage | QueueRefusal> {
  const refusal = await checkQueueAccess(db, user, q.sectionId)
  if (refusal) return refusal
  const base = () => queueScope(db, user)
  const filtered = base()
  if (q.ensembleId) filtered.where('t.ensemble_id', q.ensembleId)
  if (q.sectionId) filtered.where('pm.section_id', q.sectionId)
  if (q.drillId) filtered.where('t.drill_id', q.drillId)
  if (q.assignmentId) filtered.where('t.assignment_id', q.assignmentId)
  if (q.playerId) filtered.where('t.user_id', q.playerId)

  const [{ n }] = await filtered.clone().count({ n: 't.id' }) as [{ n: number }]
  const rows = await filtered
    .join('users as u', 'u.id', 't.user_id')
    .join('drills as d', 'd.id', 't.drill_id')
    .leftJoin('sections as s', 's.id', 'pm.section_id')
    .leftJoin('assignments as a', 'a.id', 't.assignment_id')
    .leftJoin('analyses as an', function () {
      this.on('an.take_id', '=', 't.id').andOn('an.is_current', '=', db.raw('1'))
    })
    // Oldest first: the take that has waited longest is reviewed first.
    .orderBy([{ column: 't.created_at', order: 'asc' }, { column: 't.id', order: 'asc' }])
    .limit(q.pageSize).offset((q.page - 1) * q.pageSize)
    .select('t.id', 't.ensemble_id', 'e.name as ensemble_name', 't.user_id', 'u.name as player_name', 's.id as section_id', 's.name as section_name',
      't.drill_id', 'd.title as drill_title', 't.assignment_id', 'a.title as assignment_title', 't.part', 't.status', 't.created_at',
      'an.mean_abs_cents', db.raw('coalesce(an.tolerance, d.tolerance) as tolerance'))

  return {
    items: rows.map((r: Record<string, any>): ReviewQueueItem => ({
      takeId: r.id,
      ensemble: { id: r.ensemble_id, name: r.ensemble_name },
      player: { id: r.user_id, name: r.player_name },
      section: r.section_id == null ? null : { id: r.section_id, name: r.section_name },
      drill: { id: r.drill_id, title: r.drill_title },
      assignment: r.assignment_id == null ? null : { id: r.assignment_id, title: r.assignment_title ?? null },
      part: r.part,
      status: r.status,
      submittedAt: r.created_at,
      meanAbsCents: num(r.mean_abs_cents),
      tolerance: Number(r.tolerance),
    })),
    total: Number(n),
    page: q.page,
    pageSize: q.pageSize,
    facets: await queueFacets(db, base),
  }
}

/** Every section, drill, assignment and player that occurs in the whole queue (for the filter lists). */
async function queueFacets (db: Knex, base: () => Knex.QueryBuilder): Promise<ReviewQueueFacets> {
  const [sections, drills, assignments, players] = await Promise.all([
    base().join('sections as s', 's.id', 'pm.section_id').distinct('s.id', 's.name', 'e.name as ensemble_name', 's.position').orderBy([{ column: 'e.name' }, { column: 's.position' }]),
    base().join('drills as d', 'd.id', 't.drill_id').distinct('d.id', 'd.title').orderBy('d.title'),
    base().join('assignments as a', 'a.id', 't.assignment_id').distinct('a.id', 'a.title', 'd2.title as drill_title').join('drills as d2', 'd2.id', 'a.drill_id').orderBy('a.id'),
    base().join('users as u', 'u.id', 't.user_id').distinct('u.id', 'u.name').orderByRaw('u.name collate nocase'),
  ])
  return {
    sections: sections.map((s: any) => ({ id: s.id, name: s.name, ensembleName: s.ensemble_name })),
    drills: drills.map((d: any) => ({ id: d.id, title: d.title })),
    assignments: assignments.map((a: any) => ({ id: a.id, title: a.title ?? a.drill_title })),
    players: players.map((p: any) => ({ id: p.id, name: p.name })),
  }
}

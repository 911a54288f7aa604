import type { Knex } from 'knex'
import type { SessionUser } from '../../shared/types/user'
import type { HomeData, HomeDue } from '../../shared/types/home'
import { assignmentStatus } from '../../shared/assignments/status'
import { reviewMarks, reviewMarksSql } from './reviews'

/** Window of the director's per-ensemble summary, in days. */
export const SUMMARY_DAYS = 28
/** Submitted assignments stay on the home page this long after their due date. */
const DUE_KEEP_DAYS = 7
const LIST_LIMIT = 50

const num = (x: unknown): number | null => (x == null ? null : Number(x))

/** The drill part a member records: the assignment's, else the part named like their section, else the only part. */
export function partForSection (parts: string[], assignmentPart: string | null, sectionName: string | null): string | null {
  if (assignmentPart) return assignmentPart
  if (sectionName) {
    const match = parts.find(p => p.toLowerCase() === sectionName.toLowerCase())
    if (match) return match
  }
  return parts.length === 1 ? parts[0]! : null
}

/** Everything the home page shows for this user, limited to open ensembles. */
export async function loadHome (db: Knex, user: SessionUser, now = new Date()): Promise<HomeData> {
  const uid = user.id
  const memberships = await db('memberships as m')
    .join('ensembles as e', 'e.id', 'm.ensemble_id')
    .leftJoin('sections as s', 's.id', 'm.section_id')
    .where('m.user_id', uid).whereNull('e.archived_at')
    .select('m.ensemble_id', 'e.name as ensemble_name', 'm.role', 'm.section_id', 's.name as section_name')
    .orderByRaw('e.name collate nocase')

  const keepSince = new Date(now.getTime() - DUE_KEEP_DAYS * 86400_000).toISOString()
  // The caller's own assignments (as an assignee, still a member), open ensembles only.
  const dueRows = await db('assignment_assignees as aa')
    .join('assignments as a', 'a.id', 'aa.assignment_id')
    .join('memberships as m', function () {
      this.on('m.ensemble_id', '=', 'a.ensemble_id').andOn('m.user_id', '=', 'aa.user_id')
    })
    .join('ensembles as e', 'e.id', 'a.ensemble_id')
    .join('drills as d', 'd.id', 'a.drill_id')
    .where('aa.user_id', uid)
    .whereNull('a.archived_at').whereNull('e.archived_at')
    .select('a.id', 'a.ensemble_id', 'e.name as ensemble_name', 'a.drill_id', 'd.title as drill_title', 'd.tolerance', 'a.title', 'aa.part', 'a.due_at',
      db.raw('exists (select 1 from takes t where t.assignment_id = a.id and t.user_id = aa.user_id and t.withdrawn_at is null) as submitted'))
    .orderByRaw('a.due_at is null, a.due_at, a.id')
  const due = dueRows
    .filter((r: any) => !r.submitted || !r.due_at || r.due_at >= keepSince)
    .slice(0, LIST_LIMIT)
    .map((r: any): HomeDue => ({
      assignmentId: r.id,
      ensembleId: r.ensemble_id,
      ensembleName: r.ensemble_name,
      drillId: r.drill_id,
      drillTitle: r.drill_title,
      title: r.title,
      part: r.part ?? null,
      dueAt: r.due_at,
      submitted: Boolean(r.submitted),
      overdue: assignmentStatus({ dueAt: r.due_at ?? null, submitted: Boolean(r.submitted) }, now) === 'overdue',
      tolerance: Number(r.tolerance),
    }))

  const toReview = await db('takes as t')
    .join('memberships as me', function () {
      this.on('me.ensemble_id', '=', 't.ensemble_id').andOn('me.user_id', '=', db.raw('?', [uid]))
    })
    .join('ensembles as e', 'e.id', 't.ensemble_id')
    .join('users as u', 'u.id', 't.user_id')
    .join('drills as d', 'd.id', 't.drill_id')
    .leftJoin('memberships as pm', function () {
      this.on('pm.ensemble_id', '=', 't.ensemble_id').andOn('pm.user_id', '=', 't.user_id')
    })
    .leftJoin('sections as ps', 'ps.id', 'pm.section_id')
    .leftJoin('analyses as an', function () {
      this.on('an.take_id', '=', 't.id').andOn('an.is_current', '=', db.raw('1'))
    })
    .whereIn('me.role', ['director', 'section_leader'])
    .whereNull('t.withdrawn_at').whereNull('e.archived_at')
    .whereNot('t.user_id', uid)
    .where(q => q.where('me.role', 'director').orWhere(q2 => q2.whereNotNull('me.section_id').whereRaw('pm.section_id = me.section_id')))
    .whereNotExists(db('reviews as r').whereRaw('r.take_id = t.id').select(db.raw('1')))
    .select('t.id', 'e.name as ensemble_name', 'u.name as player_name', 'ps.name as section_name', 'd.title as drill_title', 't.part', 't.status', 't.created_at', 'an.mean_abs_cents', db.raw('coalesce(an.tolerance, d.tolerance) as tolerance'))
    // Oldest first: the take that has waited longest is reviewed first.
    .orderBy([{ column: 't.created_at', order: 'asc' }, { column: 't.id', order: 'asc' }])
    .limit(LIST_LIMIT)

  const recent = await db('takes as t')
    .join('drills as d', 'd.id', 't.drill_id')
    .leftJoin('analyses as an', function () {
      this.on('an.take_id', '=', 't.id').andOn('an.is_current', '=', db.raw('1'))
    })
    .where('t.user_id', uid).whereNull('t.withdrawn_at')
    .select('t.id', 'd.title as drill_title', 't.part', 't.status', 't.created_at', 'an.mean_abs_cents', 'an.within_tolerance_share', 'an.drift_cents_per_min', db.raw('coalesce(an.tolerance, d.tolerance) as tolerance'), reviewMarksSql(db))
    .orderBy([{ column: 't.created_at', order: 'desc' }, { column: 't.id', order: 'desc' }])
    .limit(10)

  const since = new Date(now.getTime() - SUMMARY_DAYS * 86400_000).toISOString()
  const summary = await db('memberships as m')
    .join('ensembles as e', 'e.id', 'm.ensemble_id')
    .leftJoin('takes as t', function () {
      this.on('t.ensemble_id', '=', 'e.id').andOnNull('t.withdrawn_at').andOn('t.created_at', '>=', db.raw('?', [since]))
    })
    .leftJoin('analyses as an', function () {
      this.on('an.take_id', '=', 't.id').andOn('an.is_current', '=', db.raw('1'))
    })
    .where('m.user_id', uid).where('m.role', 'director').whereNull('e.archived_at')
    .groupBy('e.id', 'e.name')
    .select('e.id', 'e.name', db.raw('count(an.id) as analysed'), db.raw('avg(an.mean_abs_cents) as mean_abs'), db.raw('avg(an.within_tolerance_share) as within'), db.raw('avg(an.tolerance) as tolerance'))
    .orderByRaw('e.name collate nocase')

  return {
    user,
    memberships: memberships.map((r: any) => ({ ensembleId: r.ensemble_id, ensembleName: r.ensemble_name, role: r.role, sectionId: r.section_id, sectionName: r.section_name })),
    due,
    toReview: toReview.map((r: any) => ({
      takeId: r.id, ensembleName: r.ensemble_name, playerName: r.player_name, sectionName: r.section_name, drillTitle: r.drill_title,
      part: r.part, status: r.status, submittedAt: r.created_at, meanAbsCents: num(r.mean_abs_cents), tolerance: Number(r.tolerance),
    })),
    recent: recent.map((r: any) => ({
      takeId: r.id, drillTitle: r.drill_title, part: r.part, status: r.status, createdAt: r.created_at,
      meanAbsCents: num(r.mean_abs_cents), withinToleranceShare: num(r.within_tolerance_share), driftCentsPerMin: num(r.drift_cents_per_min), tolerance: Number(r.tolerance),
      review: reviewMarks(r.review_marks)[0] ?? null,
    })),
    ensembleSummary: summary.map((r: any) => ({
      ensembleId: r.id, ensembleName: r.name, takesAnalysed: Number(r.analysed), meanAbsCents: num(r.mean_abs), withinToleranceShare: num(r.within), periodDays: SUMMARY_DAYS, tolerance: num(r.tolerance),
    })),
  }
}

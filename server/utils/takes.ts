// Takes as data: the stored row, what the take pages read, and the changes a route has already
// authorised (creating a take is in take-submit.ts). These return data or null and never throw
// HTTP errors; who may do what is decided in access.ts and the routes.
import type { Knex } from 'knex'
import type { SessionUser } from '../../shared/types/user'
import type { EarlierTake, TakeDetail, TakeListItem, TakeListPage, TakeLiveState, TakeReport, TakeStatusName } from '../../shared/types/take'
import type { TakeListQuery } from '../../shared/schemas/take'
import type { SystemOptions } from '../../shared/drill/schema'
import { computeTargets } from '../../shared/tuning/index'
import { scoreMeasurement } from '../analysis/score'
import { ANALYSE_TAKE_JOB, enqueueJob, latestJobForTake } from './jobs'
import { writeAudit } from './audit'
import { analysisErrorMessage } from './take-analysis'
import { visibleTakes, type TakeAccess } from './access'
import type { StoredDrill } from './drills'
import { reviewMarks, reviewMarksSql, takeReviews } from './reviews'

export interface TakeRecord {
  id: number
  ensembleId: number
  drillId: number
  drillVersion: number
  userId: number
  assignmentId: number | null
  part: string
  objectKey: string
  originalName: string | null
  mime: string | null
  bytes: number | null
  status: TakeStatusName
  errorCode: string | null
  errorMessage: string | null
  withdrawnAt: string | null
  createdAt: string
}

/** A `takes` row in camelCase. */
export function toTake (r: Record<string, any>): TakeRecord {
  return {
    id: r.id,
    ensembleId: r.ensemble_id,
    drillId: r.drill_id,
    drillVersion: r.drill_version,
    userId: r.user_id,
    assignmentId: r.assignment_id ?? null,
    part: r.part,
    objectKey: r.object_key,
    originalName: r.original_name ?? null,
    mime: r.mime ?? null,
    bytes: r.bytes == null ? null : Number(r.bytes),
    status: r.status,
    errorCode: r.error_code ?? null,
    errorMessage: r.error_message ?? null,
    withdrawnAt: r.withdrawn_at ?? null,
    createdAt: r.created_at,
  }
}

const num = (v: unknown): number | null => (v == null || !Number.isFinite(Number(v)) ? null : Number(v))

// ---- reading ------------------------------------------------------------------------------------

/** The take's status with progress and error, as the poll and the event stream send it. */
export async function takeLiveState (db: Knex, takeId: number): Promise<TakeLiveState | null> {
  const t = await db('takes').where({ id: takeId }).first('status', 'error_code', 'error_message')
  if (!t) return null
  let progress = t.status === 'analysed' ? 1 : 0
  if (t.status === 'analysing') progress = (await latestJobForTake(db, takeId))?.progress ?? 0
  return {
    status: t.status,
    progress,
    error: t.status === 'failed' ? { code: t.error_code ?? 'analysis_error', message: t.error_message ?? analysisErrorMessage('analysis_error') } : null,
  }
}

/** Everything GET /api/takes/:id answers. */
export async function takeDetail (db: Knex, a: TakeAccess, viewerId: number): Promise<TakeDetail | null> {
  const t = a.take
  const [live, drill, player, analysis] = await Promise.all([
    takeLiveState(db, t.id),
    db('drills').where({ id: t.drillId }).first('id', 'title'),
    db('users').where({ id: t.userId }).first('id', 'name'),
    db('analyses').where({ take_id: t.id, is_current: true }).first('report'),
  ])
  if (!live || !drill || !player) return null
  const earlier = await db('takes as t')
    .leftJoin('analyses as an', function () {
      this.on('an.take_id', '=', 't.id').andOn('an.is_current', '=', db.raw('1'))
    })
    .where({ 't.user_id': t.userId, 't.drill_id': t.drillId, 't.part': t.part })
    // Earlier by the time it was sent (ids need not follow it: imports and the demo seed backdate takes).
    .where(q => q.where('t.created_at', '<', t.createdAt).orWhere(q2 => q2.where('t.created_at', '=', t.createdAt).andWhere('t.id', '<', t.id)))
    .modify((q) => { if (!a.isOwner && !a.isDirector) q.whereNull('t.withdrawn_at') })
    .orderBy([{ column: 't.created_at', order: 'desc' }, { column: 't.id', order: 'desc' }]).limit(20)
    .select('t.id', 't.created_at', 't.status', 'an.mean_abs_cents', 'an.within_tolerance_share', 'an.drift_cents_per_min')
  const report = analysis?.report ? JSON.parse(analysis.report) as TakeReport : null
  const reviews = await takeReviews(db, t.id, viewerId, report?.holds ?? null)
  return {
    id: t.id,
    ...live,
    report,
    drill: { id: drill.id, title: drill.title },
    part: t.part,
    player: { id: player.id, name: player.name },
    viewerIsPlayer: a.isOwner,
    assignmentId: t.assignmentId,
    createdAt: t.createdAt,
    withdrawnAt: t.withdrawnAt,
    canWithdraw: a.isOwner && !t.withdrawnAt,
    canRestore: a.isDirector && Boolean(t.withdrawnAt),
    canRescore: Boolean(report),
    canReanalyse: (a.isOwner || a.isDirector) && (live.status === 'analysed' || live.status === 'failed'),
    audioUrl: `/takes/${t.id}/audio`,
    mime: t.mime ?? 'application/octet-stream',
    bytes: t.bytes,
    originalName: t.originalName,
    reviews,
    // Anyone but the player who may open it reviews it: its section's leader or a director.
    canReview: !a.isOwner && (a.isDirector || a.membership?.role === 'section_leader') && !t.withdrawnAt,
    earlier: earlier.map((r: Record<string, any>): EarlierTake => ({ id: r.id, createdAt: r.created_at, status: r.status, meanAbsCents: num(r.mean_abs_cents), withinToleranceShare: num(r.within_tolerance_share), driftCentsPerMin: num(r.drift_cents_per_min) })),
  }
}

/** One page of the takes the caller may see, newest first; `withdrawn: 'only'` lists the withdrawn ones. */
export async function listTakes (db: Knex, user: SessionUser, f: TakeListQuery): Promise<TakeListPage> {
  const q = visibleTakes(db, user)
  if (f.player === 'me') q.where('t.user_id', user.id)
  else if (typeof f.player === 'number') q.where('t.user_id', f.player)
  if (f.drillId) q.where('t.drill_id', f.drillId)
  if (f.assignmentId) q.where('t.assignment_id', f.assignmentId)
  if (f.withdrawn === 'only') q.whereNotNull('t.withdrawn_at')

  const [{ n }] = await q.clone().count({ n: 't.id' }) as [{ n: number }]
  const rows = await q
    .join('drills as d', 'd.id', 't.drill_id')
    .join('users as u', 'u.id', 't.user_id')
    .leftJoin('analyses as an', function () {
      this.on('an.take_id', '=', 't.id').andOn('an.is_current', '=', db.raw('1'))
    })
    .orderBy(f.withdrawn === 'only'
      ? [{ column: 't.withdrawn_at', order: 'desc' }, { column: 't.id', order: 'desc' }]
      : [{ column: 't.created_at', order: 'desc' }, { column: 't.id', order: 'desc' }])
    .limit(f.pageSize).offset((f.page - 1) * f.pageSize)
    .select('t.id', 't.drill_id', 'd.title as drill_title', 't.part', 'u.name as player_name', 't.status', 't.created_at',
      'an.mean_abs_cents', 'an.within_tolerance_share', 't.withdrawn_at', 't.assignment_id', 'me.role as my_role', reviewMarksSql(db))
  // The caller directs the ensemble: a director's membership, or a site admin holding none (as in membershipFor).
  const directs = (role: string | null) => role === 'director' || (role == null && user.siteRole === 'admin')
  return {
    items: rows.map((r: Record<string, any>): TakeListItem => ({
      id: r.id,
      drillId: r.drill_id,
      drillTitle: r.drill_title,
      part: r.part,
      playerName: r.player_name,
      status: r.status as TakeStatusName,
      createdAt: r.created_at,
      meanAbsCents: num(r.mean_abs_cents),
      withinToleranceShare: num(r.within_tolerance_share),
      withdrawn: r.withdrawn_at != null,
      withdrawnAt: r.withdrawn_at ?? null,
      assignmentId: r.assignment_id ?? null,
      canRestore: r.withdrawn_at != null && directs(r.my_role ?? null),
      reviewedBy: reviewMarks(r.review_marks),
    })),
    total: Number(n),
    page: f.page,
    pageSize: f.pageSize,
  }
}

// ---- changing a take (the route has checked who may) --------------------------------------------

/** Withdraws a take (kept for the director). */
export async function withdrawTake (db: Knex, actorId: number, take: TakeRecord): Promise<{ id: number, withdrawnAt: string }> {
  const now = new Date().toISOString()
  await db.transaction(async (trx) => {
    await trx('takes').where({ id: take.id }).update({ withdrawn_at: now, withdrawn_by: actorId, updated_at: now })
    await writeAudit(trx, { actorId, action: 'take.withdraw', subjectType: 'take', subjectId: take.id, ensembleId: take.ensembleId })
  })
  return { id: take.id, withdrawnAt: now }
}

/** Restores a withdrawn take. */
export async function restoreTake (db: Knex, actorId: number, take: TakeRecord): Promise<{ id: number, withdrawnAt: null }> {
  const now = new Date().toISOString()
  await db.transaction(async (trx) => {
    await trx('takes').where({ id: take.id }).update({ withdrawn_at: null, withdrawn_by: null, updated_at: now })
    await writeAudit(trx, { actorId, action: 'take.restore', subjectType: 'take', subjectId: take.id, ensembleId: take.ensembleId })
  })
  return { id: take.id, withdrawnAt: null }
}

/** Queues a fresh analysis against the drill as it is now; null while one is queued or running. */
export async function reanalyseTake (db: Knex, actorId: number, take: TakeRecord, drill: StoredDrill): Promise<{ id: number, status: 'queued' } | null> {
  return db.transaction(async (trx) => {
    const now = new Date().toISOString()
    const n = await trx('takes').where({ id: take.id }).whereIn('status', ['analysed', 'failed'])
      .update({ status: 'queued', error_code: null, error_message: null, drill_version: drill.version, updated_at: now })
    if (n !== 1) return null
    await enqueueJob(trx, ANALYSE_TAKE_JOB, { takeId: take.id }, { takeId: take.id })
    await writeAudit(trx, { actorId, action: 'take.reanalyse', subjectType: 'take', subjectId: take.id, ensembleId: take.ensembleId })
    return { id: take.id, status: 'queued' as const }
  })
}

export type RescoreOutcome =
  | { report: TakeReport }
  | { refused: 'not_analysed' }
  | { refused: 'drill_changed', takeDrillVersion: number, drillVersion: number }
  | { refused: 'invalid_system', code: string, message: string, path: unknown }

/**
 * Scores the take's stored measurement against another system, reference pitch or tolerance
 * (no decode, no pitch tracking). The stored analysis stays as it is: this is a view.
 */
export async function rescoreTake (db: Knex, take: TakeRecord, drill: StoredDrill, opts: { system: SystemOptions, a4?: number | undefined, tolerance?: number | undefined }): Promise<RescoreOutcome> {
  const row = await db('analyses').where({ take_id: take.id, is_current: true }).first('measurement')
  if (!row?.measurement) return { refused: 'not_analysed' }
  // The measurement belongs to the chords of the drill as it was when the take was analysed.
  if (drill.version !== take.drillVersion) return { refused: 'drill_changed', takeDrillVersion: take.drillVersion, drillVersion: drill.version }
  let targets
  try {
    targets = computeTargets(drill.document, opts.system, opts.a4 ?? drill.document.a4)
  } catch (err) {
    const e = err as { name?: string, code?: string, path?: unknown, message?: string }
    if (e?.name === 'TuningError') return { refused: 'invalid_system', code: e.code ?? 'invalid_system', message: e.message ?? 'Invalid tuning system', path: e.path ?? null }
    throw err
  }
  const report: TakeReport = scoreMeasurement(JSON.parse(row.measurement), targets, take.part, opts.tolerance ?? drill.document.tolerance)
  return { report }
}

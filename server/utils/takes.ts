// Takes: who may see, hear and change them, how they are stored with their analysis job, and
// what the take pages read. Data functions take the Knex handle first and return camelCase.
import type { Knex } from 'knex'
import { z } from 'zod'
import type { SessionUser, Membership } from './auth'
import { findMembership } from './auth'
import { apiError } from './errors'
import { formatIssues } from './validate'
import { ANALYSE_TAKE_JOB, enqueueJob, latestJobForTake } from './jobs'
import { loadDrill, type StoredDrill } from './drills'
import { writeAudit } from './audit'
import { partForSection } from './home'
import type { StoredUpload } from './uploads'
import { computeTargets } from '../../shared/tuning/index'
import { scoreMeasurement } from '../analysis/score'
import { ANALYSIS_ERROR_MESSAGE, type AnalysisErrorCode } from '../analysis/errors'
import { parseDrill, type SystemOptions } from '../../shared/drill/schema'
import { midiToDrill } from '../../shared/drill/midi'

export type TakeStatus = 'queued' | 'analysing' | 'analysed' | 'failed'

/** Messages for failures that are not the engine's own codes. */
export const TAKE_ERROR_MESSAGE: Record<string, string> = {
  ...ANALYSIS_ERROR_MESSAGE,
  audio_missing: 'The stored audio of this take could not be found',
  analysis_error: 'The analysis stopped with an internal error; try re-running it',
  analysis_interrupted: 'The analysis was interrupted too often; try re-running it',
}

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
  status: TakeStatus
  errorCode: string | null
  errorMessage: string | null
  withdrawnAt: string | null
  createdAt: string
}

function toTake (r: Record<string, any>): TakeRecord {
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

/** The caller's membership of an ensemble; a site admin without one acts as its director. */
export async function membershipFor (db: Knex, user: SessionUser, ensembleId: number): Promise<Membership | null> {
  const m = await findMembership(db, user.id, ensembleId)
  if (m) return m
  if (user.siteRole === 'admin') return { ensembleId, userId: user.id, role: 'director', sectionId: null, viaSiteAdmin: true }
  return null
}

export interface DrillAccess {
  drill: StoredDrill
  membership: Membership
  ensembleName: string
  ensembleArchived: boolean
}

/** A drill the caller may see (a member of its ensemble, or a site admin), or null (not yours = not found). */
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

/** The part to preselect for the caller: the assignment's, else the one named like their section. */
export async function preselectedPart (db: Knex, access: DrillAccess, assignmentId?: number | null): Promise<string | null> {
  const parts = access.drill.document.parts.map(p => p.name)
  let assignmentPart: string | null = null
  if (assignmentId) {
    const a = await db('assignments').where({ id: assignmentId, drill_id: access.drill.id }).first('part')
    assignmentPart = a?.part ?? null
  }
  let sectionName: string | null = null
  if (access.membership.sectionId) {
    const s = await db('sections').where({ id: access.membership.sectionId }).first('name')
    sectionName = s?.name ?? null
  }
  const pick = partForSection(parts, assignmentPart, sectionName)
  return pick && parts.includes(pick) ? pick : null
}

// ---- creating a take ---------------------------------------------------------------------------

export interface NewTake {
  access: DrillAccess
  userId: number
  part: string
  assignmentId: number | null
  idempotencyKey: string | null
  upload: StoredUpload
}

/** A take earlier sent with the same idempotency key by this user, or null. */
export async function findTakeByIdempotencyKey (db: Knex, userId: number, key: string): Promise<{ id: number, status: TakeStatus } | null> {
  const r = await db('takes').where({ user_id: userId, idempotency_key: key }).first('id', 'status')
  return r ? { id: r.id, status: r.status } : null
}

/** Checks the assignment belongs to the drill (404 when it is not the caller's to use). */
export async function checkAssignment (db: Knex, access: DrillAccess, assignmentId: number): Promise<void> {
  const a = await db('assignments').where({ id: assignmentId }).first('ensemble_id', 'drill_id', 'archived_at')
  if (!a || a.ensemble_id !== access.drill.ensembleId) throw apiError(404, 'assignment_not_found', 'Assignment not found')
  if (a.drill_id !== access.drill.id) throw apiError(400, 'assignment_mismatch', 'The assignment is for another drill', { assignmentId })
}

/**
 * Writes the take row and its analysis job in one transaction. A repeated idempotency key
 * returns the first take instead (`created: false`).
 */
export async function createTake (db: Knex, t: NewTake): Promise<{ id: number, status: TakeStatus, created: boolean }> {
  try {
    return await db.transaction(async (trx) => {
      const now = new Date().toISOString()
      const [row] = await trx('takes').insert({
        ensemble_id: t.access.drill.ensembleId,
        drill_id: t.access.drill.id,
        drill_version: t.access.drill.version,
        user_id: t.userId,
        assignment_id: t.assignmentId,
        part: t.part,
        object_key: t.upload.key,
        original_name: t.upload.originalName,
        mime: t.upload.mime,
        bytes: t.upload.bytes,
        status: 'queued',
        idempotency_key: t.idempotencyKey,
        created_at: now,
        updated_at: now,
      }).returning('id')
      const id = typeof row === 'object' ? row.id : row
      await enqueueJob(trx, ANALYSE_TAKE_JOB, { takeId: id }, { takeId: id })
      await writeAudit(trx, { actorId: t.userId, action: 'take.create', subjectType: 'take', subjectId: id, ensembleId: t.access.drill.ensembleId, data: { drillId: t.access.drill.id, part: t.part, bytes: t.upload.bytes, format: t.upload.format } })
      return { id, status: 'queued' as const, created: true }
    })
  } catch (err) {
    // Two submits with one key racing: the unique index lets one through; answer the other with it.
    if (t.idempotencyKey && /UNIQUE constraint failed: takes\.user_id, takes\.idempotency_key/.test(String((err as Error).message))) {
      const first = await findTakeByIdempotencyKey(db, t.userId, t.idempotencyKey)
      if (first) return { ...first, created: false }
    }
    throw err
  }
}

// ---- who may see a take ------------------------------------------------------------------------

export interface TakeAccess {
  take: TakeRecord
  membership: Membership | null
  isOwner: boolean
  isDirector: boolean
  /** May open the take (report and audio). */
  canView: boolean
}

/**
 * A take and what the caller may do with it, or null when the caller may not see it (404).
 * The player sees their own takes, directors (and site admins) every take of their ensemble,
 * section leaders the takes of their section that are not withdrawn.
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
  if (!canView) return null
  return { take, membership, isOwner, isDirector, canView }
}

/** The take as the caller may see it; 404 when it is missing or not theirs. */
export async function requireTakeForUser (db: Knex, user: SessionUser, takeId: number): Promise<TakeAccess> {
  const access = await findTakeForUser(db, user, takeId)
  if (!access) throw apiError(404, 'not_found', 'Take not found')
  return access
}

// ---- reading ------------------------------------------------------------------------------------

const num = (v: unknown): number | null => (v == null || !Number.isFinite(Number(v)) ? null : Number(v))

/** The take's status with progress and error, as the poll and the event stream send it. */
export async function takeLiveState (db: Knex, takeId: number): Promise<{ status: TakeStatus, progress: number, error: { code: string, message: string } | null } | null> {
  const t = await db('takes').where({ id: takeId }).first('status', 'error_code', 'error_message')
  if (!t) return null
  let progress = t.status === 'analysed' ? 1 : 0
  if (t.status === 'analysing') progress = (await latestJobForTake(db, takeId))?.progress ?? 0
  return {
    status: t.status,
    progress,
    error: t.status === 'failed' ? { code: t.error_code ?? 'analysis_error', message: t.error_message ?? TAKE_ERROR_MESSAGE.analysis_error! } : null,
  }
}

/** Everything GET /api/takes/:id answers. */
export async function takeDetail (db: Knex, a: TakeAccess) {
  const t = a.take
  const [live, drill, player, analysis] = await Promise.all([
    takeLiveState(db, t.id),
    db('drills').where({ id: t.drillId }).first('id', 'title'),
    db('users').where({ id: t.userId }).first('id', 'name'),
    db('analyses').where({ take_id: t.id, is_current: true }).first('report'),
  ])
  const earlier = await db('takes as t')
    .leftJoin('analyses as an', function () {
      this.on('an.take_id', '=', 't.id').andOn('an.is_current', '=', db.raw('1'))
    })
    .where({ 't.user_id': t.userId, 't.drill_id': t.drillId, 't.part': t.part })
    // Earlier by the time it was sent (ids need not follow it: imports and the demo seed backdate takes).
    .where(q => q.where('t.created_at', '<', t.createdAt).orWhere(q2 => q2.where('t.created_at', '=', t.createdAt).andWhere('t.id', '<', t.id)))
    .modify((q) => { if (!a.isOwner && !a.isDirector) q.whereNull('t.withdrawn_at') })
    .orderBy([{ column: 't.created_at', order: 'desc' }, { column: 't.id', order: 'desc' }]).limit(20)
    .select('t.id', 't.created_at', 'an.mean_abs_cents', 'an.within_tolerance_share')
  const report = analysis?.report ? JSON.parse(analysis.report) : null
  return {
    id: t.id,
    status: live!.status,
    progress: live!.progress,
    error: live!.error,
    report,
    drill: { id: drill.id, title: drill.title },
    part: t.part,
    player: { id: player.id, name: player.name },
    assignmentId: t.assignmentId,
    createdAt: t.createdAt,
    withdrawnAt: t.withdrawnAt,
    canWithdraw: a.isOwner && !t.withdrawnAt,
    canRestore: a.isDirector && Boolean(t.withdrawnAt),
    canRescore: Boolean(report),
    canReanalyse: (a.isOwner || a.isDirector) && (live!.status === 'analysed' || live!.status === 'failed'),
    audioUrl: `/takes/${t.id}/audio`,
    mime: t.mime ?? 'application/octet-stream',
    bytes: t.bytes,
    originalName: t.originalName,
    earlier: earlier.map((r: Record<string, any>) => ({ id: r.id, createdAt: r.created_at, meanAbsCents: num(r.mean_abs_cents), withinToleranceShare: num(r.within_tolerance_share) })),
  }
}

export interface TakeListFilters {
  player?: 'me' | number
  drillId?: number
  assignmentId?: number
  page: number
  pageSize: number
}

/** One page of the takes the caller may see, newest first. */
export async function listTakes (db: Knex, user: SessionUser, f: TakeListFilters) {
  const admin = user.siteRole === 'admin'
  const q = db('takes as t')
    .leftJoin('memberships as me', function () {
      this.on('me.ensemble_id', '=', 't.ensemble_id').andOn('me.user_id', '=', db.raw('?', [user.id]))
    })
    .leftJoin('memberships as pm', function () {
      this.on('pm.ensemble_id', '=', 't.ensemble_id').andOn('pm.user_id', '=', 't.user_id')
    })
    .where((w) => {
      w.where('t.user_id', user.id).orWhere('me.role', 'director')
        .orWhere(s => s.where('me.role', 'section_leader').whereNotNull('me.section_id').whereRaw('pm.section_id = me.section_id').whereNull('t.withdrawn_at'))
      if (admin) w.orWhereRaw('1 = 1')
    })
  if (f.player === 'me') q.where('t.user_id', user.id)
  else if (typeof f.player === 'number') q.where('t.user_id', f.player)
  if (f.drillId) q.where('t.drill_id', f.drillId)
  if (f.assignmentId) q.where('t.assignment_id', f.assignmentId)

  const [{ n }] = await q.clone().count({ n: 't.id' }) as [{ n: number }]
  const rows = await q
    .join('drills as d', 'd.id', 't.drill_id')
    .join('users as u', 'u.id', 't.user_id')
    .leftJoin('analyses as an', function () {
      this.on('an.take_id', '=', 't.id').andOn('an.is_current', '=', db.raw('1'))
    })
    .orderBy([{ column: 't.created_at', order: 'desc' }, { column: 't.id', order: 'desc' }])
    .limit(f.pageSize).offset((f.page - 1) * f.pageSize)
    .select('t.id', 't.drill_id', 'd.title as drill_title', 't.part', 'u.name as player_name', 't.status', 't.created_at',
      'an.mean_abs_cents', 'an.within_tolerance_share', 't.withdrawn_at', 't.assignment_id')
  return {
    items: rows.map((r: Record<string, any>) => ({
      id: r.id,
      drillId: r.drill_id,
      drillTitle: r.drill_title,
      part: r.part,
      playerName: r.player_name,
      status: r.status as TakeStatus,
      createdAt: r.created_at,
      meanAbsCents: num(r.mean_abs_cents),
      withinToleranceShare: num(r.within_tolerance_share),
      withdrawn: r.withdrawn_at != null,
      assignmentId: r.assignment_id ?? null,
    })),
    total: Number(n),
    page: f.page,
    pageSize: f.pageSize,
  }
}

// ---- changing a take ----------------------------------------------------------------------------

/** The player withdraws their own take (kept for the director). 403 for anyone else, 409 when already withdrawn. */
export async function withdrawTake (db: Knex, user: SessionUser, a: TakeAccess) {
  if (!a.isOwner) throw apiError(403, 'forbidden', 'Only the player can withdraw a take')
  if (a.take.withdrawnAt) throw apiError(409, 'already_withdrawn', 'Take already withdrawn')
  const now = new Date().toISOString()
  await db.transaction(async (trx) => {
    await trx('takes').where({ id: a.take.id }).update({ withdrawn_at: now, withdrawn_by: user.id, updated_at: now })
    await writeAudit(trx, { actorId: user.id, action: 'take.withdraw', subjectType: 'take', subjectId: a.take.id, ensembleId: a.take.ensembleId })
  })
  return { id: a.take.id, withdrawnAt: now }
}

/** A director restores a withdrawn take. 403 for anyone else, 409 when it is not withdrawn. */
export async function restoreTake (db: Knex, user: SessionUser, a: TakeAccess) {
  if (!a.isDirector) throw apiError(403, 'forbidden', 'Only a director can restore a take')
  if (!a.take.withdrawnAt) throw apiError(409, 'not_withdrawn', 'Take is not withdrawn')
  const now = new Date().toISOString()
  await db.transaction(async (trx) => {
    await trx('takes').where({ id: a.take.id }).update({ withdrawn_at: null, withdrawn_by: null, updated_at: now })
    await writeAudit(trx, { actorId: user.id, action: 'take.restore', subjectType: 'take', subjectId: a.take.id, ensembleId: a.take.ensembleId })
  })
  return { id: a.take.id, withdrawnAt: null }
}

/** Queues a fresh analysis (the player or a director); 409 while one is queued or running. */
export async function reanalyseTake (db: Knex, user: SessionUser, a: TakeAccess) {
  if (!a.isOwner && !a.isDirector) throw apiError(403, 'forbidden', 'Not allowed')
  const drill = await loadDrill(db, a.take.drillId)
  if (!drill) throw apiError(404, 'not_found', 'Drill not found')
  await db.transaction(async (trx) => {
    const now = new Date().toISOString()
    const n = await trx('takes').where({ id: a.take.id }).whereIn('status', ['analysed', 'failed'])
      .update({ status: 'queued', error_code: null, error_message: null, drill_version: drill.version, updated_at: now })
    if (n !== 1) throw apiError(409, 'analysis_in_progress', 'Analysis already queued or running')
    await enqueueJob(trx, ANALYSE_TAKE_JOB, { takeId: a.take.id }, { takeId: a.take.id })
    await writeAudit(trx, { actorId: user.id, action: 'take.reanalyse', subjectType: 'take', subjectId: a.take.id, ensembleId: a.take.ensembleId })
  })
  return { id: a.take.id, status: 'queued' as const }
}

/**
 * Scores the take's stored measurement against another system, reference pitch or tolerance
 * (no decode, no pitch tracking). The stored analysis stays as it is: this is a view.
 */
export async function rescoreTake (db: Knex, a: TakeAccess, opts: { system: SystemOptions, a4?: number, tolerance?: number }) {
  const row = await db('analyses').where({ take_id: a.take.id, is_current: true }).first('measurement', 'a4', 'tolerance')
  if (!row?.measurement) throw apiError(409, 'not_analysed', 'Take has no measurement yet')
  const drill = await loadDrill(db, a.take.drillId)
  if (!drill) throw apiError(404, 'not_found', 'Drill not found')
  // The measurement belongs to the chords of the drill as it was when the take was analysed.
  if (drill.version !== a.take.drillVersion) {
    throw apiError(409, 'drill_changed', 'The drill changed since this take was analysed; re-run the analysis', { takeDrillVersion: a.take.drillVersion, drillVersion: drill.version })
  }
  const a4 = opts.a4 ?? drill.document.a4
  const tolerance = opts.tolerance ?? drill.document.tolerance
  let targets
  try {
    targets = computeTargets(drill.document, opts.system, a4)
  } catch (err) {
    const e = err as { name?: string, code?: string, path?: unknown, message?: string }
    if (e?.name === 'TuningError') throw apiError(400, e.code ?? 'invalid_system', 'Invalid tuning system', { message: e.message, path: e.path ?? null })
    throw err
  }
  const report = scoreMeasurement(JSON.parse(row.measurement), targets, a.take.part, tolerance)
  return { report }
}

// ---- the analysis pool writes through these --------------------------------------------------

/** What the pool needs to run an analysis job. */
export async function loadTakeForAnalysis (db: Knex, takeId: number) {
  const row = await db('takes').where({ id: takeId }).first()
  if (!row) return null
  const take = toTake(row)
  const drill = await loadDrill(db, take.drillId)
  return { take, drill }
}

/** Marks a take as being analysed (after its job was claimed). */
export async function markTakeAnalysing (db: Knex, takeId: number, drillVersion: number): Promise<void> {
  await db('takes').where({ id: takeId }).update({ status: 'analysing', drill_version: drillVersion, error_code: null, error_message: null, updated_at: new Date().toISOString() })
}

/** Puts a take back to queued (its job will run again after a backoff). */
export async function markTakeQueued (db: Knex, takeId: number): Promise<void> {
  await db('takes').where({ id: takeId }).update({ status: 'queued', updated_at: new Date().toISOString() })
}

/** Marks a take failed with a stable code and a short message; the upload stays. */
export async function markTakeFailed (db: Knex, takeId: number, code: string, message?: string): Promise<void> {
  await db('takes').where({ id: takeId }).update({
    status: 'failed',
    error_code: code,
    error_message: message ?? TAKE_ERROR_MESSAGE[code] ?? TAKE_ERROR_MESSAGE.analysis_error,
    updated_at: new Date().toISOString(),
  })
}

interface ReportHold {
  index: number
  chordIndex?: number
  note?: string | null
  writtenNote?: string | null
  member?: string | null
  startS?: number | null
  endS?: number | null
  targetHz?: number | null
  equalHz?: number | null
  detectedHz?: number | null
  centsFromTarget?: number | null
  centsFromEqual?: number | null
  spreadCents?: number | null
  slopeCentsPerS?: number | null
  confidence?: number | null
  withinTolerance?: boolean | null
  reason?: string | null
}

interface ReportLike {
  system: unknown
  a4: number
  tolerance?: number
  holds: ReportHold[]
  summary: { meanAbsCents: number | null, withinToleranceShare: number | null, driftCentsPerMin: number | null, holdsFound: number, holdsExpected: number }
  take?: { durationS?: number, sampleRate?: number, channels?: number }
}

const finite = (v: unknown): number | null => (typeof v === 'number' && Number.isFinite(v) ? v : null)

/**
 * Stores an analysis as the take's current one (with a row per hold) and marks the take
 * analysed, in the caller's transaction.
 */
export async function saveAnalysis (trx: Knex.Transaction, input: {
  takeId: number
  drillVersion: number
  system: SystemOptions
  tolerance: number
  measurement: unknown
  report: ReportLike
  durationMs: number
  engineVersion: string | null
}): Promise<number> {
  const r = input.report
  const now = new Date().toISOString()
  await trx('analyses').where({ take_id: input.takeId, is_current: true }).update({ is_current: false })
  const [row] = await trx('analyses').insert({
    take_id: input.takeId,
    system: JSON.stringify(input.system),
    system_name: input.system.name,
    a4: r.a4,
    tolerance: r.tolerance ?? input.tolerance,
    measurement: JSON.stringify(input.measurement),
    report: JSON.stringify(r),
    mean_abs_cents: finite(r.summary?.meanAbsCents),
    within_tolerance_share: finite(r.summary?.withinToleranceShare),
    drift_cents_per_min: finite(r.summary?.driftCentsPerMin),
    holds_total: r.summary?.holdsExpected ?? r.holds.length,
    holds_found: r.summary?.holdsFound ?? r.holds.filter(h => h.detectedHz != null).length,
    is_current: true,
    engine_version: input.engineVersion,
    duration_ms: Math.round(input.durationMs),
    created_at: now,
  }).returning('id')
  const analysisId = typeof row === 'object' ? row.id : row
  const holds = r.holds.map((h, i) => ({
    analysis_id: analysisId,
    hold_index: i,
    chord_index: h.chordIndex ?? h.index,
    note: h.note ?? null,
    written_note: h.writtenNote ?? null,
    member: h.member ?? null,
    start_s: finite(h.startS),
    end_s: finite(h.endS),
    target_hz: finite(h.targetHz),
    equal_hz: finite(h.equalHz),
    detected_hz: finite(h.detectedHz),
    cents_from_target: finite(h.centsFromTarget),
    cents_from_equal: finite(h.centsFromEqual),
    spread_cents: finite(h.spreadCents),
    slope_cents_per_s: finite(h.slopeCentsPerS),
    confidence: finite(h.confidence),
    within_tolerance: h.withinTolerance ?? null,
    reason: h.reason ? String(h.reason).slice(0, 200) : null,
  }))
  // SQLite caps the variables of one statement; 50 rows × 18 columns stays well under it.
  for (let i = 0; i < holds.length; i += 50) await trx('hold_results').insert(holds.slice(i, i + 50))
  await trx('takes').where({ id: input.takeId }).update({
    status: 'analysed',
    error_code: null,
    error_message: null,
    drill_version: input.drillVersion,
    duration_s: finite(r.take?.durationS),
    sample_rate: finite(r.take?.sampleRate),
    channels: finite(r.take?.channels),
    updated_at: now,
  })
  return analysisId
}

/** Stable message for an engine code (for codes from older engines: the generic one). */
export function messageForCode (code: string): string {
  return TAKE_ERROR_MESSAGE[code as AnalysisErrorCode] ?? TAKE_ERROR_MESSAGE.analysis_error!
}

/** Text fields of POST /api/takes (multipart). */
export const TakeFields = z.object({
  drillId: z.coerce.number().int().positive().max(Number.MAX_SAFE_INTEGER),
  part: z.string().trim().min(1).max(60),
  assignmentId: z.union([z.literal('').transform(() => undefined), z.coerce.number().int().positive().max(Number.MAX_SAFE_INTEGER)]).optional(),
  // A key the form makes once (a UUID); letters, digits and . _ : - are taken from scripts too.
  idempotencyKey: z.union([z.literal('').transform(() => undefined), z.string().trim().min(8).max(100).regex(/^[\w.:-]+$/, 'letters, digits and . _ : - only')]).optional(),
})

/**
 * Checks a received upload and stores it as a new take with its analysis job: 400 bad fields or
 * part, 404 a drill or assignment not in the caller's ensembles, 409 an archived drill. A repeated
 * idempotency key answers with the first take (`created: false`).
 */
export async function submitTake (db: Knex, user: SessionUser, fields: Record<string, string>, upload: StoredUpload | null) {
  const parsed = TakeFields.safeParse(fields)
  if (!parsed.success) throw apiError(400, 'invalid_input', 'Invalid input', { issues: formatIssues(parsed.error) })
  const f = parsed.data
  if (!upload) throw apiError(400, 'missing_file', 'No audio file', { field: 'audio' })
  const access = await findDrillForUser(db, user, f.drillId)
  if (!access) throw apiError(404, 'drill_not_found', 'Drill not found')
  if (f.idempotencyKey) {
    const first = await findTakeByIdempotencyKey(db, user.id, f.idempotencyKey)
    if (first) return { ...first, created: false }
  }
  if (access.drill.archivedAt || access.ensembleArchived) throw apiError(409, 'drill_archived', 'Drill is archived')
  const parts = access.drill.document.parts.map(p => p.name)
  if (!parts.includes(f.part)) throw apiError(400, 'unknown_part', 'That part is not in the drill', { part: f.part, parts })
  if (f.assignmentId) await checkAssignment(db, access, f.assignmentId)
  return createTake(db, {
    access, userId: user.id, part: f.part, assignmentId: f.assignmentId ?? null,
    idempotencyKey: f.idempotencyKey ?? null, upload,
  })
}

// ---- drills as the take pages and the import use them ------------------------------------------

/** The drills of an ensemble (archived ones left out), oldest first. */
export async function listEnsembleDrills (db: Knex, ensembleId: number) {
  const rows = await db('drills').where({ ensemble_id: ensembleId }).whereNull('archived_at')
    .orderBy([{ column: 'created_at', order: 'asc' }, { column: 'id', order: 'asc' }])
    .select('id', 'document', 'created_at')
  return rows.map((r: Record<string, any>) => {
    const d = JSON.parse(r.document) as import('../../shared/drill/schema').DrillDocument
    return {
      id: r.id as number,
      title: d.title,
      key: d.key,
      tempo: d.tempo,
      a4: d.a4,
      system: d.system,
      tolerance: d.tolerance,
      parts: d.parts.map(p => ({ name: p.name, instrument: p.instrument ?? null })),
      chords: d.chords.length,
      createdAt: r.created_at as string,
    }
  })
}

/** Largest drill file taken by the import. */
export const MAX_DRILL_FILE_BYTES = 2 * 1024 * 1024

/**
 * A drill document from an uploaded file: a Standard MIDI File (starts with "MThd") or a drill
 * JSON document; `title` replaces the document's own. Throws 400 with the importer's code and
 * issues, 415 for a file that is neither.
 */
export function drillFromFile (bytes: Uint8Array, title?: string): import('../../shared/drill/schema').DrillDocument {
  const isMidi = bytes.length >= 4 && bytes[0] === 0x4d && bytes[1] === 0x54 && bytes[2] === 0x68 && bytes[3] === 0x64
  try {
    if (isMidi) return midiToDrill(bytes, title ? { title } : {})
    const text = new TextDecoder('utf-8', { fatal: false }).decode(bytes).replace(/^\uFEFF/, '').trim()
    if (!text.startsWith('{')) throw apiError(415, 'not_a_drill', 'Not a drill file', { expected: 'drill JSON or Standard MIDI File' })
    let json: Record<string, unknown>
    try { json = JSON.parse(text) } catch (e) {
      throw apiError(400, 'invalid_json', 'Drill file is not valid JSON', { message: (e as Error).message })
    }
    if (title) json = { ...json, title }
    return parseDrill(json)
  } catch (err) {
    const e = err as { name?: string, code?: string, message?: string, path?: string | null, issues?: unknown[] }
    if (e?.name === 'TuningError') {
      throw apiError(400, e.code ?? 'invalid_drill', 'Invalid drill file', { message: e.message, path: e.path ?? null, issues: e.issues ?? [] })
    }
    throw err
  }
}

/**
 * An HTTP Range header (one range of bytes) as an explicit "bytes=a-b" within an object of
 * `size` bytes (RFC 9110 §14.1.2): suffix ranges are turned into absolute ones, since not every
 * store reads them. null = send the whole object; 'unsatisfiable' = answer 416.
 */
export function normaliseRange (header: string | undefined, size: number | null): string | 'unsatisfiable' | null {
  if (!header) return null
  const m = /^\s*bytes\s*=\s*(\d*)\s*-\s*(\d*)\s*$/i.exec(header)
  if (!m || (m[1] === '' && m[2] === '')) return null // several ranges or junk: the whole object
  if (size == null) return m[1] === '' ? null : `bytes=${m[1]}-${m[2]}`
  if (m[1] === '') {
    const n = Number(m[2])
    if (n === 0) return 'unsatisfiable'
    return `bytes=${Math.max(0, size - n)}-${size - 1}`
  }
  const start = Number(m[1])
  if (start >= size) return 'unsatisfiable'
  const end = m[2] === '' ? size - 1 : Math.min(Number(m[2]), size - 1)
  if (end < start) return null
  return `bytes=${start}-${end}`
}

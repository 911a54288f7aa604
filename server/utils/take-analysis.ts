// What the analysis pool reads and writes for a take: the job's inputs, the take's status as the
// job moves, and the finished analysis (report, measurement and a row per hold).
import type { Knex } from 'knex'
import type { TakeReport, TakeStatusName } from '../../shared/types/take'
import type { SystemOptions } from '../../shared/drill/schema'
import type { Measurement } from '../analysis/types'
import { ANALYSIS_ERROR_MESSAGE } from '../analysis/errors'
import { loadDrill } from './drills'
import { ANALYSE_TAKE_JOB, enqueueJob } from './jobs'
import { toTake } from './takes'

/** Messages for failures: the engine's codes plus the pool's own. */
const TAKE_ERROR_MESSAGE: Record<string, string> = {
  ...ANALYSIS_ERROR_MESSAGE,
  audio_missing: 'The stored audio of this take could not be found',
  analysis_error: 'The analysis stopped with an internal error; try re-running it',
  analysis_interrupted: 'The analysis was interrupted too often; try re-running it',
}

/** Stable message for a failure code (for codes from older engines: the generic one). */
export function analysisErrorMessage (code: string): string {
  return TAKE_ERROR_MESSAGE[code] ?? TAKE_ERROR_MESSAGE.analysis_error!
}

/** What the pool needs to run an analysis job: the take and its drill (null when the drill is gone). */
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
    error_message: message ?? analysisErrorMessage(code),
    updated_at: new Date().toISOString(),
  })
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
  measurement: Measurement
  report: TakeReport
  durationMs: number
}): Promise<number> {
  const r = input.report
  const now = new Date().toISOString()
  await trx('analyses').where({ take_id: input.takeId, is_current: true }).update({ is_current: false })
  const [row] = await trx('analyses').insert({
    take_id: input.takeId,
    system: JSON.stringify(input.system),
    system_name: input.system.name,
    a4: r.a4,
    tolerance: r.tolerance,
    measurement: JSON.stringify(input.measurement),
    report: JSON.stringify(r),
    mean_abs_cents: finite(r.summary.meanAbsCents),
    within_tolerance_share: finite(r.summary.withinToleranceShare),
    drift_cents_per_min: finite(r.summary.driftCentsPerMin),
    holds_total: r.summary.holdsExpected,
    holds_found: r.summary.holdsFound,
    is_current: true,
    engine_version: input.measurement.engine ?? null,
    duration_ms: Math.round(input.durationMs),
    created_at: now,
  }).returning('id')
  const analysisId = typeof row === 'object' ? row.id : row
  const holds = r.holds.map((h, i) => ({
    analysis_id: analysisId,
    hold_index: i,
    chord_index: h.index,
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
    duration_s: finite(r.take.durationS),
    sample_rate: finite(r.take.sampleRate),
    channels: finite(r.take.channels),
    updated_at: now,
  })
  return analysisId
}

/**
 * Brings take statuses in line with their jobs after a restart: a take whose job is queued is
 * queued, one whose job was given up is failed, and one left without any job gets one.
 */
export async function reconcileTakeStatuses (db: Knex): Promise<void> {
  const open = await db('takes as t')
    .whereIn('t.status', ['queued', 'analysing'])
    .select('t.id', 't.status',
      db.raw('(select j.status from jobs j where j.take_id = t.id order by j.id desc limit 1) as job_status'))
  for (const t of open as { id: number, status: TakeStatusName, job_status: string | null }[]) {
    if (t.job_status === 'queued' && t.status !== 'queued') await markTakeQueued(db, t.id)
    else if (t.job_status === 'failed') await markTakeFailed(db, t.id, 'analysis_interrupted')
    else if (t.job_status == null || t.job_status === 'done') {
      await db.transaction(async (trx) => {
        await enqueueJob(trx, ANALYSE_TAKE_JOB, { takeId: t.id }, { takeId: t.id })
        await markTakeQueued(trx, t.id)
      })
    }
  }
}

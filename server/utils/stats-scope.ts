// Who may see which figures, and the statistics with a short-lived cache. Players see their own
// figures, section leaders their section's, directors (and site admins) the whole ensemble.
import type { Knex } from 'knex'
import type { Membership } from './auth'
import type { StatsQuery } from '../../shared/schemas/stats'
import type { SessionUser } from '../../shared/types/user'
import type { EnsembleStats } from '../../shared/types/stats'
import { parseSystem, type SystemOptions } from '../../shared/drill/schema'
import { StatsBuilder } from '../../shared/stats'
import { forEachHoldBatch, statsFingerprint, type HoldFilters, type Scoring } from './stats'
import { membershipFor } from './access'

export type Decision<T> = { ok: true, value: T } | { ok: false, status: 400 | 403 | 404, code: string, message: string, details?: Record<string, unknown> }

const deny = (status: 400 | 403 | 404, code: string, message: string, details?: Record<string, unknown>) => ({ ok: false as const, status, code, message, details })

/** The filters the caller may use, narrowed to what their role allows. */
export async function statsScope (db: Knex, m: Membership, q: StatsQuery): Promise<Decision<HoldFilters>> {
  const f: HoldFilters = { ensembleId: m.ensembleId, sectionId: q.sectionId, userId: q.userId, drillId: q.drillId, assignmentId: q.assignmentId, from: q.from, to: q.to }
  if (q.sectionId && !(await db('sections').where({ id: q.sectionId, ensemble_id: m.ensembleId }).first('id'))) return deny(404, 'not_found', 'Section not found')
  if (q.drillId && !(await db('drills').where({ id: q.drillId, ensemble_id: m.ensembleId }).first('id'))) return deny(404, 'not_found', 'Drill not found')
  if (q.assignmentId && !(await db('assignments').where({ id: q.assignmentId, ensemble_id: m.ensembleId }).first('id'))) return deny(404, 'not_found', 'Assignment not found')
  let target: { section_id: number | null } | undefined
  if (q.userId) {
    target = await db('memberships').where({ user_id: q.userId, ensemble_id: m.ensembleId }).first('section_id')
    // A former member's takes still count for a director; anyone else outside the ensemble is not found.
    if (!target && !(await db('takes').where({ user_id: q.userId, ensemble_id: m.ensembleId }).first('id'))) return deny(404, 'not_found', 'Player not found')
  }
  if (m.role === 'director') return { ok: true, value: f }
  if (m.role === 'section_leader') {
    if (q.sectionId && q.sectionId !== m.sectionId) return deny(403, 'forbidden', 'Not allowed')
    if (q.userId && q.userId !== m.userId && target?.section_id !== m.sectionId) return deny(403, 'forbidden', 'Not allowed')
    if (m.sectionId == null) return q.userId === m.userId ? { ok: true, value: f } : deny(403, 'forbidden', 'Not allowed')
    return { ok: true, value: { ...f, sectionId: m.sectionId } }
  }
  if (q.userId && q.userId !== m.userId) return deny(403, 'forbidden', 'Not allowed')
  if (q.sectionId && q.sectionId !== m.sectionId) return deny(403, 'forbidden', 'Not allowed')
  return { ok: true, value: { ...f, userId: m.userId } }
}

/** The scoring the query asks for (400 when the system's options are not valid). */
export function statsScoring (q: StatsQuery): Decision<Scoring> {
  let system: SystemOptions | undefined
  if (q.system) {
    try {
      system = parseSystem({ name: q.system, seventh: q.seventh, tonic: q.tonic, start: q.start, wolf: q.wolf, fraction: q.fraction, scala: q.scala })
    } catch (e) {
      const err = e as { issues?: unknown, message?: string }
      return deny(400, 'invalid_system', 'Invalid tuning system', { issues: err.issues ?? [] })
    }
  }
  return { ok: true, value: { system, a4: q.a4, tolerance: q.tolerance } }
}

/**
 * The common start of the figure routes (/stats, /charts, holds.csv), after the caller is known:
 * the ensemble (404 when they are not in it), the filters narrowed to their role (403 beyond it)
 * and the scoring asked for (400 for a system with bad options). The route throws the refusal.
 */
export async function statsRequest (db: Knex, user: SessionUser, ensembleId: number, query: StatsQuery): Promise<Decision<{ filters: HoldFilters, scoring: Scoring }>> {
  const membership = await membershipFor(db, user, ensembleId)
  if (!membership) return deny(404, 'not_found', 'Ensemble not found')
  const scope = await statsScope(db, membership, query)
  if (!scope.ok) return scope
  const scoring = statsScoring(query)
  if (!scoring.ok) return scoring
  return { ok: true, value: { filters: scope.value, scoring: scoring.value } }
}

interface CacheEntry { fingerprint: string, at: number, value: Promise<unknown> }
const CACHE_MAX = 200
const CACHE_MS = 10 * 60_000
const cache = new Map<string, CacheEntry>()

/**
 * A figure (`kind`: statistics, chart series) for the filters and scoring, computed once. A result
 * is kept while nothing in the database has changed (checked on every call) and for ten minutes at
 * most; a second caller asking the same while it is computed shares the work.
 */
export async function cachedFigures<T> (kind: string, db: Knex, f: HoldFilters, s: Scoring, compute: () => Promise<T>): Promise<T> {
  const key = JSON.stringify([kind, f, s.system ?? null, s.a4 ?? null, s.tolerance ?? null])
  const fingerprint = await statsFingerprint(db)
  const hit = cache.get(key)
  if (hit && hit.fingerprint === fingerprint && Date.now() - hit.at < CACHE_MS) return hit.value as Promise<T>
  const value = compute()
  cache.set(key, { fingerprint, at: Date.now(), value })
  value.catch(() => cache.delete(key))
  while (cache.size > CACHE_MAX) cache.delete(cache.keys().next().value!)
  return value
}

/** The ensemble statistics for the filters and scoring (cached, see cachedFigures). */
export function ensembleStats (db: Knex, f: HoldFilters, s: Scoring): Promise<EnsembleStats & { notRescored: number }> {
  return cachedFigures('stats', db, f, s, () => computeStats(db, f, s))
}

async function computeStats (db: Knex, f: HoldFilters, s: Scoring) {
  const b = new StatsBuilder()
  const { notRescored } = await forEachHoldBatch(db, f, s, (takes, rows) => {
    for (const t of takes) b.addTake(t)
    for (const r of rows) b.add(r)
  }, { batchTakes: 2000 })
  return { ...b.result(), notRescored }
}

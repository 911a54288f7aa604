// Hold rows for the ensemble statistics and the holds CSV: from the stored per-hold results of
// each take's current analysis, or re-scored from the stored measurements when another tuning
// system, reference pitch or tolerance is asked for (never analysed again).
import type { Knex } from 'knex'
import type { StatHoldRow, StatTakeRow } from '../../shared/types/stats'
import { rangeEnd, rangeStart } from '../../shared/schemas/stats'
import type { SystemOptions } from '../../shared/drill/schema'
import { computeTargets } from '../../shared/tuning/index'
import type { TargetsResult } from '../../shared/tuning/index'
import { scoreMeasurement } from '../analysis/score'
import type { Measurement } from '../analysis/types'
import { loadDrillVersion } from './drill-edits'

/** What the rows are limited to (already authorised by the route). */
export interface HoldFilters {
  ensembleId: number
  sectionId?: number
  userId?: number
  drillId?: number
  assignmentId?: number
  from?: string
  to?: string
}

/** How the holds are scored: as stored, or against another system / A4 / tolerance. */
export interface Scoring {
  system?: SystemOptions
  a4?: number
  tolerance?: number
}

/** A hold as the CSV shows it: the stats row plus the note, frequencies and cents from equal. */
export interface CsvHoldRow extends StatHoldRow {
  drill: string
  holdIndex: number
  note: string | null
  targetHz: number | null
  detectedHz: number | null
  centsFromEqual: number | null
}

// A hold whose pitch is this far from its equal-tempered note was a wrong note in any tuning
// system we score; older analyses stored some of them with a deviation, so they are left out here.
const WRONG_NOTE_CENTS = 100

function takeQuery (db: Knex, f: HoldFilters) {
  const q = db('takes as t')
    .join('analyses as a', function () { this.on('a.take_id', 't.id').andOn('a.is_current', db.raw('1')) })
    .join('users as u', 'u.id', 't.user_id')
    .join('drills as d', 'd.id', 't.drill_id')
    .leftJoin('memberships as m', function () { this.on('m.user_id', 't.user_id').andOn('m.ensemble_id', 't.ensemble_id') })
    .leftJoin('sections as s', 's.id', 'm.section_id')
    .where('t.ensemble_id', f.ensembleId)
    .andWhere('t.status', 'analysed')
    .whereNull('t.withdrawn_at')
  if (f.sectionId) q.andWhere('m.section_id', f.sectionId)
  if (f.userId) q.andWhere('t.user_id', f.userId)
  if (f.drillId) q.andWhere('t.drill_id', f.drillId)
  if (f.assignmentId) q.andWhere('t.assignment_id', f.assignmentId)
  if (f.from) q.andWhere('t.created_at', '>=', rangeStart(f.from))
  if (f.to) q.andWhere('t.created_at', '<', rangeEnd(f.to))
  return q
}

const TAKE_COLUMNS = ['t.id as takeId', 't.created_at as submittedAt', 't.user_id as userId', 'u.name as player', 's.name as section', 't.drill_id as drillId', 't.part as part', 'd.title as drill']

/** The takes the filters match (analysed, not withdrawn), oldest first. */
export async function listStatTakes (db: Knex, f: HoldFilters): Promise<Array<StatTakeRow & { drill: string }>> {
  return takeQuery(db, f).select(TAKE_COLUMNS).orderBy('t.created_at').orderBy('t.id')
}

/** True when the stored results cannot be used as they are. */
export function needsRescore (s: Scoring): boolean {
  return Boolean(s.system) || s.a4 !== undefined
}

/**
 * Calls `onBatch` with each batch of takes and their scored holds (found, not wrong notes) in take order, keyset-paged
 * so a large export never holds the whole result nor blocks other requests for long. Without
 * `csv`, holds from the stored results carry only what the statistics use (no note, frequencies
 * or cents from equal).
 * Re-scoring uses the drill as it was when each take was recorded. Returns the number of takes
 * that could not be re-scored (that version of the drill is no longer stored or its targets fail).
 */
export async function forEachHoldBatch (db: Knex, f: HoldFilters, scoring: Scoring, onBatch: (takes: StatTakeRow[], rows: CsvHoldRow[]) => void | Promise<void>, options: { batchTakes?: number, csv?: boolean } = {}): Promise<{ notRescored: number }> {
  const batchTakes = options.batchTakes ?? 1000
  let afterId = 0
  let notRescored = 0
  const targetsCache = new Map<string, TargetsResult | null>()
  for (;;) {
    const base = takeQuery(db, f).andWhere('t.id', '>', afterId).orderBy('t.id').limit(batchTakes)
    if (needsRescore(scoring)) {
      const takes = await base.select([...TAKE_COLUMNS, 't.drill_version as drillVersion', 'a.measurement as measurement', 'a.tolerance as storedTolerance'])
      if (!takes.length) break
      afterId = takes[takes.length - 1].takeId
      const rows: CsvHoldRow[] = []
      const scored: StatTakeRow[] = []
      for (const t of takes) {
        const targets = await targetsFor(db, targetsCache, t.drillId, t.drillVersion, scoring)
        if (!targets || !t.measurement) { notRescored++; continue }
        const measurement = JSON.parse(t.measurement) as Measurement
        let report
        try { report = scoreMeasurement(measurement, targets, t.part, scoring.tolerance ?? t.storedTolerance) } catch { notRescored++; continue }
        // The drift is re-fitted too: the same holds' slope against the new targets (a system
        // whose targets move from chord to chord changes it).
        scored.push({ takeId: t.takeId, submittedAt: t.submittedAt, userId: t.userId, player: t.player, section: t.section ?? null, drillId: t.drillId, part: t.part, driftCentsPerMin: report.summary.driftCentsPerMin })
        report.holds.forEach((h, i) => {
          if (h.centsFromTarget == null || h.centsFromEqual == null || Math.abs(h.centsFromEqual) > WRONG_NOTE_CENTS) return
          rows.push({
            takeId: t.takeId, submittedAt: t.submittedAt, userId: t.userId, player: t.player, section: t.section ?? null,
            drillId: t.drillId, drill: t.drill, part: t.part, chordIndex: h.index, holdIndex: i, member: h.member, note: h.note,
            targetHz: h.targetHz, detectedHz: h.detectedHz, centsFromTarget: h.centsFromTarget, centsFromEqual: h.centsFromEqual,
            withinTolerance: Boolean(h.withinTolerance),
          })
        })
      }
      await onBatch(scored, rows)
      continue
    }
    // The stored results: per batch of takes, one query for the takes and one for their holds,
    // run on the raw connection (positional rows, no per-row mapping by the query builder). The
    // take's names and dates come once per take, not once per hold: the whole ensemble's year is
    // ~300,000 holds, and turning repeated text into strings was most of the cost.
    const takeRows = await rawRows(db, base.clone().select(['t.id', 't.created_at', 't.user_id', 'u.name', 's.name', 't.drill_id', 't.part', 'd.title']))
    if (!takeRows.length) break
    const first = takeRows[0]![0] as number
    afterId = takeRows[takeRows.length - 1]![0] as number
    const holdRows = await rawRows(db, takeQuery(db, f)
      .andWhere('t.id', '>=', first).andWhere('t.id', '<=', afterId)
      .join('hold_results as h', function () {
        this.on('h.analysis_id', 'a.id').andOnNotNull('h.cents_from_target')
          .andOn(db.raw('abs(coalesce(h.cents_from_equal, 0)) <= ?', [WRONG_NOTE_CENTS]))
      })
      .select(options.csv
        ? ['t.id', 'h.hold_index', 'h.chord_index', 'h.member', 'h.cents_from_target', 'h.within_tolerance', 'h.note', 'h.target_hz', 'h.detected_hz', 'h.cents_from_equal']
        : ['t.id', 'h.hold_index', 'h.chord_index', 'h.member', 'h.cents_from_target', 'h.within_tolerance'])
      .orderBy('t.id').orderBy('h.hold_index'))
    const tol = scoring.tolerance
    const takes: Array<StatTakeRow & { drill: string }> = takeRows.map(r => ({
      takeId: r[0] as number, submittedAt: r[1] as string, userId: r[2] as number, player: r[3] as string,
      section: (r[4] as string | null) ?? null, drillId: r[5] as number, part: r[6] as string, drill: r[7] as string,
    }))
    const byId = new Map(takes.map(t => [t.takeId, t]))
    const holds: CsvHoldRow[] = []
    for (const r of holdRows) {
      const t = byId.get(r[0] as number)
      if (!t) continue
      const cents = r[4] as number
      holds.push({
        takeId: t.takeId, submittedAt: t.submittedAt, userId: t.userId, player: t.player, section: t.section,
        drillId: t.drillId, part: t.part, drill: t.drill, holdIndex: r[1] as number, chordIndex: r[2] as number,
        member: (r[3] as string | null) ?? null, centsFromTarget: cents,
        withinTolerance: tol === undefined ? Boolean(r[5]) : Math.abs(cents) <= tol,
        note: (r[6] as string | null) ?? null, targetHz: (r[7] as number | null) ?? null,
        detectedHz: (r[8] as number | null) ?? null, centsFromEqual: (r[9] as number | null) ?? null,
      })
    }
    await onBatch(takes, holds)
  }
  return { notRescored }
}

/** Runs a built query on the raw better-sqlite3 connection and returns positional rows. */
async function rawRows (db: Knex, qb: Knex.QueryBuilder): Promise<unknown[][]> {
  const { sql, bindings } = qb.toSQL().toNative()
  const client = db.client as { acquireConnection: () => Promise<RawConnection>, releaseConnection: (c: RawConnection) => Promise<void> }
  const conn = await client.acquireConnection()
  try {
    return conn.prepare(sql).raw(true).all(...bindings) as unknown[][]
  } finally {
    await client.releaseConnection(conn)
  }
}
interface RawConnection { prepare: (sql: string) => { raw: (on: boolean) => { all: (...b: unknown[]) => unknown } } }

/** Targets of the drill as it was at `version` (the one the take was recorded against) under the scoring. */
async function targetsFor (db: Knex, cache: Map<string, TargetsResult | null>, drillId: number, version: number, s: Scoring) {
  const key = `${drillId}:${version}`
  if (cache.has(key)) return cache.get(key)!
  const doc = await loadDrillVersion(db, drillId, version).catch(() => null)
  let targets: TargetsResult | null = null
  if (doc) {
    try {
      targets = computeTargets(doc, s.system ?? doc.system, s.a4 ?? doc.a4)
    } catch { targets = null }
  }
  cache.set(key, targets)
  return targets
}

const generations = new WeakMap<Knex, { n: number }>()
// Writes to the tables the figures are made from. The job queue, sessions and the audit log are
// written all the time (the analysis pool polls every second) and change no figure.
const FIGURE_WRITE = /^\s*(insert\s+into|update|delete\s+from|replace\s+into|alter\s+table|drop\s+table|create\s+table)\s+[`"]?(takes|analyses|hold_results|memberships|users|sections|drills|drill_[a-z_]+|assignments|assignment_[a-z_]+)\b/i

/**
 * A fingerprint of the database's contents for cached figures, cheap enough to check on every
 * request: a count of this process's writes to the tables the figures come from, and SQLite's
 * `data_version`, which moves when another connection or process commits.
 */
export async function statsFingerprint (db: Knex): Promise<string> {
  let gen = generations.get(db)
  if (!gen) {
    const g = { n: 0 }
    db.on('query', (q: { sql?: string }) => { if (FIGURE_WRITE.test(q.sql ?? '')) g.n++ })
    generations.set(db, gen = g)
  }
  const rows = await db.raw('pragma data_version') as Array<{ data_version: number }>
  return `${gen.n}:${rows[0]?.data_version ?? 0}`
}

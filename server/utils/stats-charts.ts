// The chart series beside the ensemble statistics: per-take figures (one player), drift within
// takes by week, the hold × player grid (a section, a player or a drill), sections side by side,
// participation per assignment, and the filter choices the caller may use. Reads the same hold
// rows as the statistics (forEachHoldBatch), so a re-scored system, A4 or tolerance applies here too.
import type { Knex } from 'knex'
import type { Membership } from './auth'
import type { ChartChoices, ChartSeries, ChartTake, GridCell, Participation, SectionFigures } from '../../shared/types/charts'
import { isoWeekStart, r2 } from '../../shared/stats'
import { forEachHoldBatch, needsRescore, type HoldFilters, type Scoring } from './stats'

interface Acc { n: number, sum: number, abs: number, within: number }
const acc = (): Acc => ({ n: 0, sum: 0, abs: 0, within: 0 })
const meanOf = (a: Acc) => (a.n ? r2(a.sum / a.n) : null)
const absOf = (a: Acc) => (a.n ? r2(a.abs / a.n) : null)
const withinOf = (a: Acc) => (a.n ? r2(a.within / a.n) : null)

/** What the caller may choose from on the charts screen (already scoped by role). */
export async function chartChoices (db: Knex, m: Membership): Promise<ChartChoices> {
  const ensemble = await db('ensembles').where({ id: m.ensembleId }).first('tolerance')
  const assignees = await hasAssignees(db)
  const drills = await db('drills').where({ ensemble_id: m.ensembleId }).orderBy('title').orderBy('id').select('id', 'title')
  const assignments = await db('assignments as a').join('drills as d', 'd.id', 'a.drill_id')
    .where('a.ensemble_id', m.ensembleId).whereNull('a.archived_at')
    .modify((q) => {
      if (m.role === 'director') return
      if (!assignees) q.andWhere(w => w.whereNull('a.section_id').orWhere('a.section_id', m.sectionId ?? -1))
      else if (m.role === 'section_leader') q.whereIn('a.id', db('assignment_assignees as aa').join('memberships as mb', 'mb.user_id', 'aa.user_id').where('mb.ensemble_id', m.ensembleId).andWhere('mb.section_id', m.sectionId ?? -1).select('aa.assignment_id'))
      else q.whereIn('a.id', db('assignment_assignees').where('user_id', m.userId).select('assignment_id'))
    })
    .orderBy('a.created_at', 'desc').orderBy('a.id', 'desc')
    .select('a.id', db.raw('coalesce(a.title, d.title) as title'), 'a.drill_id as drillId')
  const sections = await db('sections').where({ ensemble_id: m.ensembleId })
    .modify((q) => { if (m.role !== 'director') q.andWhere('id', m.sectionId ?? -1) })
    .orderBy('position').orderBy('id').select('id', 'name')
  const players = await db('memberships as mb').join('users as u', 'u.id', 'mb.user_id')
    .where('mb.ensemble_id', m.ensembleId).whereIn('mb.role', ['player', 'section_leader'])
    .modify((q) => {
      if (m.role === 'section_leader') q.andWhere('mb.section_id', m.sectionId ?? -1)
      else if (m.role === 'player') q.andWhere('mb.user_id', m.userId)
    })
    .orderBy('u.name').orderBy('u.id').select('u.id as userId', 'u.name', 'mb.section_id as sectionId')
  return { role: m.role, userId: m.userId, sectionId: m.sectionId ?? null, tolerance: Number(ensemble?.tolerance ?? 10), drills, assignments, sections, players }
}

/** Who each assignment in scope asks for, and who has sent at least one take for it. */
export async function participation (db: Knex, f: HoldFilters): Promise<Participation[]> {
  const assignees = await hasAssignees(db)
  const assignments = await db('assignments as a').join('drills as d', 'd.id', 'a.drill_id')
    .where('a.ensemble_id', f.ensembleId).whereNull('a.archived_at')
    .modify((q) => {
      if (f.assignmentId) q.andWhere('a.id', f.assignmentId)
      if (f.drillId) q.andWhere('a.drill_id', f.drillId)
      if (f.sectionId && !assignees) q.andWhere(w => w.whereNull('a.section_id').orWhere('a.section_id', f.sectionId!))
    })
    .orderBy('a.created_at', 'desc').orderBy('a.id', 'desc')
    .select('a.id', db.raw('coalesce(a.title, d.title) as title'), 'a.drill_id as drillId', 'a.section_id as sectionId', 'a.due_at as dueAt') as Array<{ id: number, title: string, drillId: number, sectionId: number | null, dueAt: string | null }>
  if (!assignments.length) return []
  const people = await db('memberships as mb').join('users as u', 'u.id', 'mb.user_id').leftJoin('sections as s', 's.id', 'mb.section_id')
    .where('mb.ensemble_id', f.ensembleId).whereIn('mb.role', ['player', 'section_leader'])
    .modify((q) => {
      if (f.sectionId) q.andWhere('mb.section_id', f.sectionId)
      if (f.userId) q.andWhere('mb.user_id', f.userId)
    })
    .orderBy('u.name').orderBy('u.id').select('u.id as userId', 'u.name', 'mb.section_id as sectionId', 's.name as section') as Array<{ userId: number, name: string, sectionId: number | null, section: string | null }>
  const sent = await db('takes').where('ensemble_id', f.ensembleId).whereNull('withdrawn_at')
    .whereIn('assignment_id', assignments.map(a => a.id)).distinct('assignment_id', 'user_id')
  const done = new Set(sent.map(r => `${r.assignment_id}:${r.user_id}`))
  const listed = new Set(assignees
    ? (await db('assignment_assignees').whereIn('assignment_id', assignments.map(a => a.id)).select('assignment_id', 'user_id')).map(r => `${r.assignment_id}:${r.user_id}`)
    : [])
  const out: Participation[] = []
  for (const a of assignments) {
    // Who was asked: the assignment's assignees where they are recorded, else its section (or everyone).
    const asked = people.filter(p => (assignees ? listed.has(`${a.id}:${p.userId}`) : a.sectionId == null || p.sectionId === a.sectionId))
    // An assignment that asks nobody in view (another section's, another player's) is not shown.
    if (!asked.length && (f.userId || f.sectionId)) continue
    const missing = asked.filter(p => !done.has(`${a.id}:${p.userId}`))
    out.push({
      assignmentId: a.id, title: a.title, drillId: a.drillId, sectionId: a.sectionId ?? null, dueAt: a.dueAt ?? null,
      expected: asked.length, submitted: asked.length - missing.length,
      missing: missing.map(p => ({ userId: p.userId, name: p.name, section: p.section ?? null })),
    })
  }
  return out
}

/**
 * The chart series for the (already authorised) filters. Per-take figures only when the filters
 * are one player's, the grid only when they are limited to a section, a player or a drill:
 * a whole ensemble's year would otherwise be tens of thousands of points nobody can read.
 */
export async function chartSeries (db: Knex, f: HoldFilters, s: Scoring): Promise<ChartSeries> {
  const wantTakes = f.userId !== undefined
  const wantGrid = f.userId !== undefined || f.sectionId !== undefined || f.drillId !== undefined
  const takes = new Map<number, ChartTake & { a: Acc, m: Map<string, Acc> }>()
  const grid = new Map<string, { cell: Omit<GridCell, 'n' | 'meanCents'>, a: Acc }>()
  const sections = new Map<string, { section: string | null, players: Set<number>, takes: Set<number>, a: Acc }>()
  const weeks = new Map<string, { n: number, sum: number }>()
  const sectionOf = (name: string | null) => {
    const key = name ?? ''
    let v = sections.get(key)
    if (!v) sections.set(key, v = { section: name, players: new Set(), takes: new Set(), a: acc() })
    return v
  }
  const { notRescored } = await forEachHoldBatch(db, f, s, async (batch, rows) => {
    for (const t of batch) {
      const sec = sectionOf(t.section)
      sec.players.add(t.userId)
      sec.takes.add(t.takeId)
      if (wantTakes) takes.set(t.takeId, { ...t, holds: 0, meanCents: null, meanAbsCents: null, withinShare: null, driftCentsPerMin: null, members: {}, a: acc(), m: new Map() })
    }
    for (const r of rows) {
      if (!Number.isFinite(r.centsFromTarget)) continue
      add(sectionOf(r.section).a, r.centsFromTarget, r.withinTolerance)
      if (wantTakes) {
        const t = takes.get(r.takeId)
        if (t) {
          add(t.a, r.centsFromTarget, r.withinTolerance)
          if (r.member) {
            let ma = t.m.get(r.member)
            if (!ma) t.m.set(r.member, ma = acc())
            add(ma, r.centsFromTarget, r.withinTolerance)
          }
        }
      }
      if (wantGrid) {
        const key = `${r.drillId}\u0000${r.chordIndex}\u0000${r.part}\u0000${r.userId}`
        let g = grid.get(key)
        if (!g) grid.set(key, g = { cell: { drillId: r.drillId, chordIndex: r.chordIndex, part: r.part, member: r.member, userId: r.userId }, a: acc() })
        add(g.a, r.centsFromTarget, r.withinTolerance)
      }
    }
    // Each take's drift: re-fitted on re-scored rows, else as analysed.
    const drifts = new Map<number, number>()
    if (needsRescore(s)) {
      for (const bt of batch) if (bt.driftCentsPerMin != null && Number.isFinite(bt.driftCentsPerMin)) drifts.set(bt.takeId, bt.driftCentsPerMin)
    } else if (batch.length) {
      const rows = await db('analyses').where('is_current', 1).whereIn('take_id', batch.map(t => t.takeId)).select('take_id', 'drift_cents_per_min')
      for (const d of rows) if (d.drift_cents_per_min != null && Number.isFinite(d.drift_cents_per_min)) drifts.set(d.take_id, d.drift_cents_per_min)
    }
    for (const bt of batch) {
      const drift = drifts.get(bt.takeId)
      if (drift === undefined) continue
      const t = takes.get(bt.takeId)
      if (t) t.driftCentsPerMin = r2(drift)
      const wk = isoWeekStart(bt.submittedAt)
      let w = weeks.get(wk)
      if (!w) weeks.set(wk, w = { n: 0, sum: 0 })
      w.n++
      w.sum += drift
    }
  })
  const sectionIds = new Map((await db('sections').where({ ensemble_id: f.ensembleId }).select('id', 'name', 'position')).map(r => [r.name as string, { id: r.id as number, position: r.position as number }]))
  const sectionList: SectionFigures[] = [...sections.values()]
    .map(v => ({ sectionId: v.section ? sectionIds.get(v.section)?.id ?? null : null, section: v.section, players: v.players.size, takes: v.takes.size, holds: v.a.n, meanCents: meanOf(v.a), meanAbsCents: absOf(v.a), withinShare: withinOf(v.a) }))
    .sort((a, b) => (sectionIds.get(a.section ?? '')?.position ?? 1e9) - (sectionIds.get(b.section ?? '')?.position ?? 1e9) || (a.section ?? '').localeCompare(b.section ?? ''))
  const takeList: ChartTake[] = [...takes.values()]
    .sort((a, b) => a.submittedAt.localeCompare(b.submittedAt) || a.takeId - b.takeId)
    .map(({ a, m: members, ...t }) => ({
      ...t, holds: a.n, meanCents: meanOf(a), meanAbsCents: absOf(a), withinShare: withinOf(a),
      members: Object.fromEntries([...members.entries()].map(([k, v]) => [k, meanOf(v)!])),
    }))
  const gridList: GridCell[] = [...grid.values()]
    .map(g => ({ ...g.cell, n: g.a.n, meanCents: meanOf(g.a)! }))
    .sort((a, b) => a.drillId - b.drillId || a.chordIndex - b.chordIndex || a.part.localeCompare(b.part) || a.userId - b.userId)
  return {
    takes: takeList,
    weeks: [...weeks.entries()].sort(([a], [b]) => a.localeCompare(b)).map(([weekStart, w]) => ({ weekStart, takes: w.n, driftCentsPerMin: r2(w.sum / w.n) })),
    grid: gridList,
    sections: sectionList,
    participation: await participation(db, f),
    notRescored,
  }
}

/** Assignments record their assignees one by one once that table exists (a later migration). */
async function hasAssignees (db: Knex): Promise<boolean> {
  return db.schema.hasTable('assignment_assignees')
}

function add (a: Acc, cents: number, within: boolean) {
  a.n++
  a.sum += cents
  a.abs += Math.abs(cents)
  if (within) a.within++
}

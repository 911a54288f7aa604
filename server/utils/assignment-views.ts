// The reading side of assignments: a player's own list, the director's list, and the completion
// view per player. Plain Knex; data functions return data or null.
import type { Knex } from 'knex'
import type { AssignmentListQuery } from '../../shared/schemas/assignment'
import type { AssignmentList, AssignmentProgress, AssignmentSummary, AssignmentTarget, MyAssignment } from '../../shared/types/assignment'
import { assignmentStatus } from '../../shared/assignments/status'

const num = (x: unknown): number | null => (x == null ? null : Number(x))

/** `(select …)` of the assignee's newest take (not withdrawn) for the assignment, by `aa` alias. */
const LATEST_TAKE = `(select t.id from takes t where t.assignment_id = aa.assignment_id and t.user_id = aa.user_id and t.withdrawn_at is null
  order by t.created_at desc, t.id desc limit 1)`
const TAKES_SENT = '(select count(*) from takes t where t.assignment_id = aa.assignment_id and t.user_id = aa.user_id)'

/** The caller's open assignments (not archived, in open ensembles they still belong to), soonest due first. */
export async function listMyAssignments (db: Knex, userId: number, now = new Date()): Promise<MyAssignment[]> {
  const rows = await db('assignment_assignees as aa')
    .join('assignments as a', 'a.id', 'aa.assignment_id')
    .join('memberships as m', function () { this.on('m.ensemble_id', '=', 'a.ensemble_id').andOn('m.user_id', '=', 'aa.user_id') })
    .join('ensembles as e', 'e.id', 'a.ensemble_id')
    .join('drills as d', 'd.id', 'a.drill_id')
    .where('aa.user_id', userId).whereNull('a.archived_at').whereNull('e.archived_at')
    .select('a.id', 'a.drill_id', 'd.title as drill', 'aa.part', 'a.due_at', 'a.ensemble_id', 'e.name as ensemble_name', 'a.title', 'a.instructions', 'a.attempts',
      db.raw(`${LATEST_TAKE} as latest_take_id`), db.raw(`${TAKES_SENT} as takes_sent`))
    .orderByRaw('a.due_at is null, a.due_at, a.id')
  return rows.map((r: any): MyAssignment => ({
    id: r.id,
    drillId: r.drill_id,
    drill: r.drill,
    part: r.part ?? null,
    dueAt: r.due_at ?? null,
    status: assignmentStatus({ dueAt: r.due_at ?? null, submitted: r.latest_take_id != null }, now),
    latestTakeId: num(r.latest_take_id),
    ensembleId: r.ensemble_id,
    ensembleName: r.ensemble_name,
    title: r.title ?? null,
    instructions: r.instructions ?? '',
    attempts: num(r.attempts),
    attemptsUsed: Number(r.takes_sent),
  }))
}

async function targetsOf (db: Knex, ids: number[]): Promise<Map<number, AssignmentTarget[]>> {
  const rows = ids.length
    ? await db('assignment_targets as at').leftJoin('sections as s', 's.id', 'at.section_id').leftJoin('users as u', 'u.id', 'at.user_id')
      .whereIn('at.assignment_id', ids).orderBy(['at.assignment_id', 's.position', 'u.name', 'at.id'])
      .select('at.assignment_id', 'at.section_id', 's.name as section_name', 'at.user_id', 'u.name as user_name', 'at.part')
    : []
  const out = new Map<number, AssignmentTarget[]>()
  for (const r of rows) {
    out.set(r.assignment_id, [...(out.get(r.assignment_id) ?? []), {
      sectionId: r.section_id ?? null, sectionName: r.section_name ?? null, userId: r.user_id ?? null, userName: r.user_name ?? null, part: r.part ?? null,
    }])
  }
  return out
}

function summaryQuery (db: Knex, ensembleId: number) {
  return db('assignments as a').join('drills as d', 'd.id', 'a.drill_id').where('a.ensemble_id', ensembleId)
}
const SUMMARY_COLUMNS = (db: Knex) => ['a.id', 'a.drill_id', 'd.title as drill', 'a.title', 'a.instructions', 'a.due_at', 'a.attempts', 'a.archived_at', 'a.created_at',
  db.raw('(select count(*) from assignment_assignees aa where aa.assignment_id = a.id) as assignees'),
  db.raw(`(select count(*) from assignment_assignees aa where aa.assignment_id = a.id and ${LATEST_TAKE} is not null) as submitted`)]

function toSummary (r: any, targets: AssignmentTarget[]): AssignmentSummary {
  return {
    id: r.id, drillId: r.drill_id, drill: r.drill, title: r.title ?? null, instructions: r.instructions ?? '', dueAt: r.due_at ?? null,
    attempts: num(r.attempts), archived: r.archived_at != null, createdAt: r.created_at, targets, assignees: Number(r.assignees), submitted: Number(r.submitted),
  }
}

/** The ensemble's assignments, newest due date first, a page at a time. */
export async function listAssignments (db: Knex, ensembleId: number, q: AssignmentListQuery): Promise<AssignmentList> {
  const base = summaryQuery(db, ensembleId)
    .modify((b) => {
      if (q.archived === 'only') b.whereNotNull('a.archived_at')
      else if (q.archived !== 'include') b.whereNull('a.archived_at')
      if (q.drillId) b.where('a.drill_id', q.drillId)
    })
  const total = Number((await base.clone().count({ n: '*' }).first())?.n ?? 0)
  const rows = await base.clone().select(SUMMARY_COLUMNS(db))
    .orderByRaw('a.due_at is null, a.due_at desc, a.id desc').limit(q.pageSize).offset((q.page - 1) * q.pageSize)
  const targets = await targetsOf(db, rows.map((r: any) => r.id))
  return { items: rows.map((r: any) => toSummary(r, targets.get(r.id) ?? [])), total, page: q.page, pageSize: q.pageSize }
}

/** One assignment of the ensemble, or null. */
export async function findAssignment (db: Knex, ensembleId: number, assignmentId: number): Promise<AssignmentSummary | null> {
  const r = await summaryQuery(db, ensembleId).where('a.id', assignmentId).first(SUMMARY_COLUMNS(db))
  if (!r) return null
  return toSummary(r, (await targetsOf(db, [r.id])).get(r.id) ?? [])
}

/**
 * Who has sent a take for the assignment: every assignee still in the ensemble, or only those
 * now in `sectionId` (a section leader's view); by section order, then name.
 */
export async function assignmentProgress (db: Knex, ensembleId: number, assignmentId: number, onlySection: number | null | undefined, now = new Date()): Promise<AssignmentProgress | null> {
  const assignment = await findAssignment(db, ensembleId, assignmentId)
  if (!assignment) return null
  const rows = await db('assignment_assignees as aa')
    .join('users as u', 'u.id', 'aa.user_id')
    .join('memberships as m', function () { this.on('m.user_id', '=', 'aa.user_id').andOn('m.ensemble_id', '=', db.raw('?', [ensembleId])) })
    .leftJoin('sections as s', 's.id', 'm.section_id')
    .where('aa.assignment_id', assignmentId)
    .modify((q) => { if (onlySection !== undefined) q.where('m.section_id', onlySection ?? -1) })
    .select('aa.user_id', 'u.name', 's.name as section', 'aa.part', db.raw(`${LATEST_TAKE} as latest_take_id`), db.raw(`${TAKES_SENT} as takes_sent`))
    .orderByRaw('s.position is null, s.position, u.name collate nocase, u.id')
  const latest = rows.map((r: any) => r.latest_take_id).filter((x: unknown) => x != null)
  const means = new Map<number, number | null>()
  if (latest.length) {
    for (const a of await db('analyses').whereIn('take_id', latest).where({ is_current: true }).select('take_id', 'mean_abs_cents')) means.set(a.take_id, num(a.mean_abs_cents))
  }
  const tolerance = Number((await db('drills').where({ id: assignment.drillId }).first('tolerance'))?.tolerance ?? 10)
  return {
    assignment,
    tolerance,
    players: rows.map((r: any) => ({
      userId: r.user_id,
      name: r.name,
      section: r.section ?? null,
      part: r.part ?? null,
      submitted: r.latest_take_id != null,
      latestTakeId: num(r.latest_take_id),
      meanAbsCents: r.latest_take_id != null ? means.get(r.latest_take_id) ?? null : null,
      takes: Number(r.takes_sent),
      status: assignmentStatus({ dueAt: assignment.dueAt, submitted: r.latest_take_id != null }, now),
    })),
  }
}

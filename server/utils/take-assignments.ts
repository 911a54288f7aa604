// The assignments a take can answer: a player's open assignments of one drill and part.
import type { Knex } from 'knex'
import { attemptsLeft } from '../../shared/assignments/status'

/** An open assignment as the take form offers it. */
export interface OpenAssignment {
  id: number
  title: string | null
  part: string | null
  dueAt: string | null
  /** Whether the player already sent a take (not withdrawn) for it. */
  submitted: boolean
  /** Takes the player may still send for it (null = no limit). */
  attemptsLeft: number | null
}

/**
 * The user's open (not archived) assignments of a drill, where they are an assignee and still a
 * member, whose part is `part`; soonest due first, undated last. Without `part`, every open one
 * with its part.
 */
export async function openAssignmentsFor (db: Knex, userId: number, drillId: number, part?: string): Promise<OpenAssignment[]> {
  const rows = await db('assignment_assignees as aa')
    .join('assignments as a', 'a.id', 'aa.assignment_id')
    .join('memberships as m', function () {
      this.on('m.ensemble_id', '=', 'a.ensemble_id').andOn('m.user_id', '=', 'aa.user_id')
    })
    .where('aa.user_id', userId).where('a.drill_id', drillId).whereNull('a.archived_at')
    .select('a.id', 'a.title', 'aa.part', 'a.due_at', 'a.attempts',
      db.raw('exists (select 1 from takes t where t.assignment_id = a.id and t.user_id = aa.user_id and t.withdrawn_at is null) as submitted'),
      db.raw('(select count(*) from takes t where t.assignment_id = a.id and t.user_id = aa.user_id) as used'))
    .orderByRaw('a.due_at is null, a.due_at, a.id')
  return rows
    .map((r: Record<string, any>) => ({
      id: r.id as number,
      title: (r.title as string | null) ?? null,
      part: (r.part as string | null) ?? null,
      dueAt: (r.due_at as string | null) ?? null,
      submitted: Boolean(r.submitted),
      attemptsLeft: attemptsLeft(r.attempts ?? null, Number(r.used)),
    }))
    .filter(a => part === undefined || a.part === part)
}

/** The caller's assignee row of an assignment of this drill's ensemble, with the takes they sent, or null. */
export async function assigneeOf (db: Knex, userId: number, assignmentId: number): Promise<{ ensembleId: number, drillId: number, part: string | null, archived: boolean, attempts: number | null, used: number } | null> {
  const r = await db('assignment_assignees as aa').join('assignments as a', 'a.id', 'aa.assignment_id')
    .where({ 'aa.assignment_id': assignmentId, 'aa.user_id': userId })
    .first('a.ensemble_id', 'a.drill_id', 'aa.part', 'a.archived_at', 'a.attempts',
      db.raw('(select count(*) from takes t where t.assignment_id = a.id and t.user_id = aa.user_id) as used'))
  if (!r) return null
  return { ensembleId: r.ensemble_id, drillId: r.drill_id, part: r.part ?? null, archived: r.archived_at != null, attempts: r.attempts ?? null, used: Number(r.used) }
}

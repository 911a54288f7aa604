// The assignments a take can answer: a player's open assignments of one drill and part.
import type { Knex } from 'knex'
import { partForSection } from './home'

/** An open assignment as the take form offers it. */
export interface OpenAssignment {
  id: number
  title: string | null
  part: string | null
  dueAt: string | null
  /** Whether the player already sent a take (not withdrawn) for it. */
  submitted: boolean
}

/**
 * The user's open (not archived) assignments of a drill, for the whole ensemble or their section,
 * whose part is `part` (an assignment without a part asks for the part named like their
 * section); soonest due first, undated last. Without `part`, every open one with its part.
 */
export async function openAssignmentsFor (db: Knex, userId: number, drillId: number, part?: string): Promise<OpenAssignment[]> {
  const rows = await db('assignments as a')
    .join('memberships as m', function () {
      this.on('m.ensemble_id', '=', 'a.ensemble_id').andOn('m.user_id', '=', db.raw('?', [userId]))
    })
    .leftJoin('sections as s', 's.id', 'm.section_id')
    .where('a.drill_id', drillId).whereNull('a.archived_at')
    .where(q => q.whereNull('a.section_id').orWhereRaw('a.section_id = m.section_id'))
    .select('a.id', 'a.title', 'a.part', 'a.due_at', 's.name as section_name',
      db.raw('exists (select 1 from takes t where t.assignment_id = a.id and t.user_id = ? and t.withdrawn_at is null) as submitted', [userId]))
    .orderByRaw('a.due_at is null, a.due_at, a.id')
  if (!rows.length) return []
  const parts = (await db('drill_parts').where({ drill_id: drillId }).orderBy('position').select('name')).map((p: { name: string }) => p.name)
  return rows
    .map((r: Record<string, any>) => ({
      id: r.id as number,
      title: (r.title as string | null) ?? null,
      part: partForSection(parts, r.part ?? null, r.section_name ?? null),
      dueAt: (r.due_at as string | null) ?? null,
      submitted: Boolean(r.submitted),
    }))
    .filter(a => part === undefined || a.part === part)
}

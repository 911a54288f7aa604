// Assignments: who they reach (sections and/or players, each with the part they record), and
// their writes. Plain Knex (the demo seed uses it too); data functions answer a refusal code,
// never an HTTP error. Mailing lives in assignment-mail.ts, the reading side in assignment-views.ts.
import type { Knex } from 'knex'
import type { AssignmentCreate, AssignmentPatch } from '../../shared/schemas/assignment'
import { enqueueJob } from './jobs'
import { writeAudit } from './audit'

/** Job kind that mails the assignment notice to every assignee not yet notified (payload `{ assignmentId }`). */
export const ASSIGNMENT_NOTICE_JOB = 'assignment_notice'

export type AssignmentRefusal =
  | { ok: false, code: 'not_found' }
  | { ok: false, code: 'assignment_archived' }
  | { ok: false, code: 'drill_not_found', field: 'drillId' }
  | { ok: false, code: 'drill_archived', field: 'drillId' }
  | { ok: false, code: 'section_not_found', field: 'sectionIds', sectionId: number }
  | { ok: false, code: 'user_not_found', field: 'userIds', userId: number }
  | { ok: false, code: 'no_assignees', field: 'sectionIds' | 'userIds', reason: 'none_chosen' | 'sections_empty' }
  | { ok: false, code: 'due_in_past', field: 'dueAt', dueAt: string }
  | { ok: false, code: 'unknown_target', field: 'sectionParts' | 'userParts', id: number }
  | { ok: false, code: 'unknown_part', field: 'sectionParts' | 'userParts', part: string, parts: string[] }
  | { ok: false, code: 'part_required', field: 'sectionParts' | 'userParts', sectionId?: number, userId?: number, name: string, parts: string[] }

interface Targets {
  sectionIds: number[]
  userIds: number[]
  sectionParts: Record<string, string>
  userParts: Record<string, string>
}
interface Assignee { userId: number, sectionId: number | null, part: string }
interface TargetRow { section_id: number | null, user_id: number | null, part: string | null }

const partNamed = (parts: string[], name: string) => parts.find(p => p.toLowerCase() === name.trim().toLowerCase())

/** The part for a section or player: the chosen one (which must be in the drill), else the one named like the section, else the only part. */
function pickPart (parts: string[], chosen: string | undefined, sectionName: string | null): string | null | { unknown: string } {
  if (chosen !== undefined) return partNamed(parts, chosen) ?? { unknown: chosen }
  if (sectionName) {
    const match = partNamed(parts, sectionName)
    if (match) return match
  }
  return parts.length === 1 ? parts[0]! : null
}

/**
 * Expands the chosen sections and players into assignees with their parts, checking that every
 * one belongs to the ensemble. A player chosen by name keeps their own part choice over their section's.
 */
async function resolveAssignees (db: Knex, ensembleId: number, parts: string[], t: Targets): Promise<{ ok: true, assignees: Assignee[], targets: TargetRow[] } | AssignmentRefusal> {
  const sectionIds = [...new Set(t.sectionIds)]
  const userIds = [...new Set(t.userIds)]
  if (!sectionIds.length && !userIds.length) return { ok: false, code: 'no_assignees', field: 'sectionIds', reason: 'none_chosen' }
  for (const key of Object.keys(t.sectionParts)) if (!sectionIds.includes(Number(key))) return { ok: false, code: 'unknown_target', field: 'sectionParts', id: Number(key) }
  for (const key of Object.keys(t.userParts)) if (!userIds.includes(Number(key))) return { ok: false, code: 'unknown_target', field: 'userParts', id: Number(key) }

  const sections = sectionIds.length ? await db('sections').where({ ensemble_id: ensembleId }).whereIn('id', sectionIds).select('id', 'name') : []
  for (const id of sectionIds) if (!sections.some((s: { id: number }) => s.id === id)) return { ok: false, code: 'section_not_found', field: 'sectionIds', sectionId: id }
  const members = await db('memberships as m').join('users as u', 'u.id', 'm.user_id').leftJoin('sections as s', 's.id', 'm.section_id')
    .where('m.ensemble_id', ensembleId)
    .where(q => q.whereIn('m.user_id', userIds.length ? userIds : [0])
      .orWhere(q2 => q2.whereIn('m.section_id', sectionIds.length ? sectionIds : [0]).whereIn('m.role', ['player', 'section_leader'])))
    .select('m.user_id', 'm.section_id', 's.name as section_name', 'u.name')
  for (const id of userIds) if (!members.some((m: { user_id: number }) => m.user_id === id)) return { ok: false, code: 'user_not_found', field: 'userIds', userId: id }

  const targets: TargetRow[] = []
  const bySection = new Map<number, string>()
  for (const s of sections) {
    const p = pickPart(parts, t.sectionParts[String(s.id)], s.name)
    if (p && typeof p === 'object') return { ok: false, code: 'unknown_part', field: 'sectionParts', part: p.unknown, parts }
    if (p == null) return { ok: false, code: 'part_required', field: 'sectionParts', sectionId: s.id, name: s.name, parts }
    bySection.set(s.id, p)
    targets.push({ section_id: s.id, user_id: null, part: t.sectionParts[String(s.id)] !== undefined ? p : null })
  }
  const assignees = new Map<number, Assignee>()
  for (const m of members) {
    if (m.section_id != null && bySection.has(m.section_id) && !userIds.includes(m.user_id)) {
      assignees.set(m.user_id, { userId: m.user_id, sectionId: m.section_id, part: bySection.get(m.section_id)! })
    }
  }
  for (const id of userIds) {
    const m = members.find((r: { user_id: number }) => r.user_id === id)!
    const chosen = t.userParts[String(id)]
    const p = pickPart(parts, chosen, m.section_name ?? null)
    if (p && typeof p === 'object') return { ok: false, code: 'unknown_part', field: 'userParts', part: p.unknown, parts }
    if (p == null) return { ok: false, code: 'part_required', field: 'userParts', userId: id, name: m.name, parts }
    assignees.set(id, { userId: id, sectionId: m.section_id ?? null, part: p })
    targets.push({ section_id: null, user_id: id, part: chosen !== undefined ? p : null })
  }
  if (!assignees.size) return { ok: false, code: 'no_assignees', field: 'sectionIds', reason: 'sections_empty' }
  return { ok: true, assignees: [...assignees.values()], targets }
}

/** The drill of the ensemble with its part names, or a refusal. */
async function drillOf (db: Knex, ensembleId: number, drillId: number): Promise<{ parts: string[], title: string } | AssignmentRefusal> {
  const d = await db('drills').where({ id: drillId, ensemble_id: ensembleId }).first('id', 'title', 'archived_at')
  if (!d) return { ok: false, code: 'drill_not_found', field: 'drillId' }
  if (d.archived_at) return { ok: false, code: 'drill_archived', field: 'drillId' }
  const parts = (await db('drill_parts').where({ drill_id: drillId }).orderBy('position').select('name')).map((p: { name: string }) => p.name)
  return { parts, title: d.title }
}

const pastDue = (dueAt: string, now: Date) => Date.parse(dueAt) <= now.getTime()

/** Creates the assignment, its targets and assignees, and the notice job, in one transaction. */
export async function createAssignment (db: Knex, ensembleId: number, actorId: number, body: AssignmentCreate, now = new Date(), opts: { notify?: boolean } = {}): Promise<{ ok: true, id: number, assignees: number } | AssignmentRefusal> {
  if (pastDue(body.dueAt, now)) return { ok: false, code: 'due_in_past', field: 'dueAt', dueAt: body.dueAt }
  return db.transaction(async (trx) => {
    const drill = await drillOf(trx, ensembleId, body.drillId)
    if ('ok' in drill) return drill
    const r = await resolveAssignees(trx, ensembleId, drill.parts, body)
    if (!r.ok) return r
    const at = now.toISOString()
    const [row] = await trx('assignments').insert({
      ensemble_id: ensembleId, drill_id: body.drillId, section_id: null, part: null,
      title: body.title ?? null, instructions: body.instructions, due_at: body.dueAt, attempts: body.attempts ?? null,
      created_by: actorId, created_at: at, updated_at: at,
    }).returning('id')
    const id = typeof row === 'object' ? row.id : row
    await trx('assignment_targets').insert(r.targets.map(t => ({ ...t, assignment_id: id })))
    const notified = opts.notify === false ? at : null
    for (const a of r.assignees) {
      await trx('assignment_assignees').insert({ assignment_id: id, user_id: a.userId, section_id: a.sectionId, part: a.part, notified_at: notified, created_at: at })
    }
    if (opts.notify !== false) await enqueueJob(trx, ASSIGNMENT_NOTICE_JOB, { assignmentId: id }, { maxAttempts: 5 })
    await writeAudit(trx, { actorId, action: 'assignment.created', subjectType: 'assignment', subjectId: id, ensembleId, data: { drillId: body.drillId, assignees: r.assignees.length, dueAt: body.dueAt } })
    return { ok: true as const, id, assignees: r.assignees.length }
  })
}

/** The stored targets of an assignment in the shape the form sends. */
async function storedTargets (db: Knex, assignmentId: number): Promise<Targets> {
  const rows = await db('assignment_targets').where({ assignment_id: assignmentId }).select('section_id', 'user_id', 'part')
  const t: Targets = { sectionIds: [], userIds: [], sectionParts: {}, userParts: {} }
  for (const r of rows) {
    if (r.section_id != null) {
      t.sectionIds.push(r.section_id)
      if (r.part) t.sectionParts[String(r.section_id)] = r.part
    } else if (r.user_id != null) {
      t.userIds.push(r.user_id)
      if (r.part) t.userParts[String(r.user_id)] = r.part
    }
  }
  return t
}

/**
 * Edits an assignment. New targets replace the old: people newly reached get the notice, people
 * no longer reached drop out (their takes stay), and those already told get one message when
 * what they were told changes (due date, instructions, takes allowed, title, their part). A due
 * date moved later clears the reminders, so the new date gets its own.
 */
export async function updateAssignment (db: Knex, ensembleId: number, assignmentId: number, actorId: number, patch: AssignmentPatch, now = new Date()): Promise<{ ok: true, assignees: number } | AssignmentRefusal> {
  if (patch.dueAt !== undefined && pastDue(patch.dueAt, now)) return { ok: false, code: 'due_in_past', field: 'dueAt', dueAt: patch.dueAt }
  return db.transaction(async (trx) => {
    const a = await trx('assignments').where({ id: assignmentId, ensemble_id: ensembleId }).first()
    if (!a) return { ok: false as const, code: 'not_found' as const }
    const at = now.toISOString()
    const { archived, ...fields } = patch
    const editsFields = Object.values(fields).some(v => v !== undefined)
    if (a.archived_at && editsFields && archived !== false) return { ok: false as const, code: 'assignment_archived' as const }
    const changes: Record<string, unknown> = {}
    if (patch.title !== undefined) changes.title = patch.title
    if (patch.instructions !== undefined) changes.instructions = patch.instructions
    if (patch.attempts !== undefined) changes.attempts = patch.attempts
    if (patch.dueAt !== undefined) changes.due_at = patch.dueAt
    if (archived !== undefined) changes.archived_at = archived ? (a.archived_at ?? at) : null
    let newcomers = 0
    const partChanged: number[] = []
    if (patch.sectionIds || patch.userIds || patch.sectionParts || patch.userParts) {
      const old = await storedTargets(trx, assignmentId)
      const sectionIds = patch.sectionIds ?? old.sectionIds
      const userIds = patch.userIds ?? old.userIds
      const next: Targets = {
        sectionIds, userIds,
        sectionParts: patch.sectionParts ?? Object.fromEntries(Object.entries(old.sectionParts).filter(([k]) => sectionIds.includes(Number(k)))),
        userParts: patch.userParts ?? Object.fromEntries(Object.entries(old.userParts).filter(([k]) => userIds.includes(Number(k)))),
      }
      const parts = (await trx('drill_parts').where({ drill_id: a.drill_id }).orderBy('position').select('name')).map((p: { name: string }) => p.name)
      const r = await resolveAssignees(trx, ensembleId, parts, next)
      if (!r.ok) return r
      await trx('assignment_targets').where({ assignment_id: assignmentId }).delete()
      await trx('assignment_targets').insert(r.targets.map(t => ({ ...t, assignment_id: assignmentId })))
      const keep = r.assignees.map(x => x.userId)
      await trx('assignment_assignees').where({ assignment_id: assignmentId }).whereNotIn('user_id', keep).delete()
      for (const x of r.assignees) {
        const was = await trx('assignment_assignees').where({ assignment_id: assignmentId, user_id: x.userId }).first('id', 'part', 'notified_at')
        if (was) {
          await trx('assignment_assignees').where({ id: was.id }).update({ section_id: x.sectionId, part: x.part })
          if (was.part !== x.part && was.notified_at) partChanged.push(was.id)
        } else {
          await trx('assignment_assignees').insert({ assignment_id: assignmentId, user_id: x.userId, section_id: x.sectionId, part: x.part, created_at: at })
          newcomers++
        }
      }
    }
    // Those already told about the assignment hear of a change to what they were told, once.
    const told = (changes.due_at !== undefined && changes.due_at !== a.due_at)
      || (changes.instructions !== undefined && changes.instructions !== a.instructions)
      || (changes.attempts !== undefined && changes.attempts !== a.attempts)
      || (changes.title !== undefined && changes.title !== a.title)
    const changedFor = told
      ? (await trx('assignment_assignees').where({ assignment_id: assignmentId }).whereNotNull('notified_at').select('id')).map((r: { id: number }) => r.id)
      : partChanged
    if (changedFor.length && !a.archived_at && archived !== true) {
      await trx('assignment_assignees').whereIn('id', changedFor).update({ changed_at: at })
    }
    if (patch.dueAt !== undefined && a.due_at && patch.dueAt > a.due_at) {
      await trx('assignment_assignees').where({ assignment_id: assignmentId }).update({ reminded_at: null })
    }
    if (Object.keys(changes).length) await trx('assignments').where({ id: assignmentId }).update({ ...changes, updated_at: at })
    if (newcomers || changedFor.length) await enqueueJob(trx, ASSIGNMENT_NOTICE_JOB, { assignmentId }, { maxAttempts: 5 })
    const camel = (k: string) => k.replace(/_([a-z])/g, (_, c: string) => c.toUpperCase())
    const before = Object.fromEntries(Object.keys(changes).map(k => [camel(k), a[k] ?? null]))
    const after = Object.fromEntries(Object.entries(changes).map(([k, v]) => [camel(k), v]))
    await writeAudit(trx, { actorId, action: archived === true ? 'assignment.archived' : archived === false ? 'assignment.restored' : 'assignment.updated', subjectType: 'assignment', subjectId: assignmentId, ensembleId, before, after: { ...after, ...(newcomers ? { newAssignees: newcomers } : {}) } })
    const count = Number((await trx('assignment_assignees').where({ assignment_id: assignmentId }).count({ n: '*' }).first())?.n ?? 0)
    return { ok: true as const, assignees: count }
  })
}

/** The form's view of an assignment's targets, for the edit form and lists. */
export { storedTargets }

/**
 * Targets and assignees for an assignment row written directly (the demo seed): its section, or
 * every section of the ensemble, with the part named like each section (null when none fits).
 * They count as notified at `notifiedAt`.
 */
export async function addSectionAssignees (db: Knex, assignmentId: number, notifiedAt: string): Promise<number> {
  const a = await db('assignments').where({ id: assignmentId }).first('ensemble_id', 'drill_id', 'section_id', 'part')
  const parts = (await db('drill_parts').where({ drill_id: a.drill_id }).orderBy('position').select('name')).map((p: { name: string }) => p.name)
  const sections = await db('sections').where({ ensemble_id: a.ensemble_id }).modify((q) => { if (a.section_id != null) q.where('id', a.section_id) }).orderBy('position').select('id', 'name')
  let n = 0
  for (const s of sections) {
    await db('assignment_targets').insert({ assignment_id: assignmentId, section_id: s.id, user_id: null, part: a.part ?? null })
    const found = pickPart(parts, a.part ?? undefined, s.name)
    const part = typeof found === 'string' ? found : null
    const members = await db('memberships').where({ ensemble_id: a.ensemble_id, section_id: s.id }).whereIn('role', ['player', 'section_leader']).select('user_id')
    for (const m of members) {
      await db('assignment_assignees').insert({ assignment_id: assignmentId, user_id: m.user_id, section_id: s.id, part, notified_at: notifiedAt, created_at: notifiedAt })
      n++
    }
  }
  return n
}

/**
 * Adds a member to the open assignments of their section (not archived, not yet due) that do
 * not reach them yet: someone who joins or moves into a section after the drill was assigned to
 * it gets it too, with the section's part, and the notice is queued for them. Returns how many.
 */
export async function joinSectionAssignments (trx: Knex, ensembleId: number, userId: number, now = new Date()): Promise<number> {
  const m = await trx('memberships as m').leftJoin('sections as s', 's.id', 'm.section_id')
    .where({ 'm.ensemble_id': ensembleId, 'm.user_id': userId }).first('m.role', 'm.section_id', 's.name as section_name')
  if (!m || m.section_id == null || !['player', 'section_leader'].includes(m.role)) return 0
  const open = await trx('assignments as a').join('assignment_targets as t', 't.assignment_id', 'a.id')
    .where({ 'a.ensemble_id': ensembleId, 't.section_id': m.section_id }).whereNull('a.archived_at').where('a.due_at', '>', now.toISOString())
    .whereNotExists(q => q.select(trx.raw('1')).from('assignment_assignees as x').whereRaw('x.assignment_id = a.id').where('x.user_id', userId))
    .select('a.id', 'a.drill_id', 't.part')
  const at = now.toISOString()
  let n = 0
  for (const a of open) {
    const parts = (await trx('drill_parts').where({ drill_id: a.drill_id }).orderBy('position').select('name')).map((p: { name: string }) => p.name)
    const part = pickPart(parts, a.part ?? undefined, m.section_name ?? null)
    if (typeof part !== 'string') continue
    await trx('assignment_assignees').insert({ assignment_id: a.id, user_id: userId, section_id: m.section_id, part, notified_at: null, created_at: at })
    await enqueueJob(trx, ASSIGNMENT_NOTICE_JOB, { assignmentId: a.id }, { maxAttempts: 5 })
    n++
  }
  return n
}

import type { Knex } from 'knex'

export interface AuditEntry {
  actorId?: number | null
  action: string
  subjectType?: string | null
  subjectId?: number | null
  ensembleId?: number | null
  ip?: string | null
  data?: Record<string, unknown> | null
}

/** Appends one row to the audit log (inside the caller's transaction when given one). */
export async function writeAudit (db: Knex, entry: AuditEntry): Promise<void> {
  await db('audit_log').insert({
    at: new Date().toISOString(),
    actor_id: entry.actorId ?? null,
    action: entry.action,
    subject_type: entry.subjectType ?? null,
    subject_id: entry.subjectId ?? null,
    ensemble_id: entry.ensembleId ?? null,
    ip: entry.ip ?? null,
    data: entry.data ? JSON.stringify(entry.data) : null,
  })
}

/** Newest audit rows first, `limit` per page, before an optional id (for paging). */
export async function listAudit (db: Knex, opts: { limit?: number, beforeId?: number, ensembleId?: number } = {}) {
  const q = db('audit_log as a')
    .leftJoin('users as u', 'u.id', 'a.actor_id')
    .select('a.*', 'u.email as actor_email', 'u.name as actor_name')
    .orderBy('a.id', 'desc')
    .limit(Math.min(Math.max(opts.limit ?? 50, 1), 500))
  if (opts.beforeId) q.where('a.id', '<', opts.beforeId)
  if (opts.ensembleId) q.where('a.ensemble_id', opts.ensembleId)
  const rows = await q
  return rows.map((r: Record<string, any>) => ({
    id: r.id as number,
    at: r.at as string,
    actorId: r.actor_id as number | null,
    actorEmail: r.actor_email as string | null,
    actorName: r.actor_name as string | null,
    action: r.action as string,
    subjectType: r.subject_type as string | null,
    subjectId: r.subject_id as number | null,
    ensembleId: r.ensemble_id as number | null,
    ip: r.ip as string | null,
    data: r.data ? JSON.parse(r.data) as Record<string, unknown> : null,
  }))
}

import type { Knex } from 'knex'
import type { AuditItem, AuditTarget } from '../../shared/types/admin'

export interface AuditEntry {
  actorId?: number | null
  action: string
  subjectType?: string | null
  subjectId?: number | null
  ensembleId?: number | null
  ip?: string | null
  /** The changed fields as they were, and as they are now (for changes). */
  before?: Record<string, unknown> | null
  after?: Record<string, unknown> | null
  /** Anything else worth keeping (for events that are not changes). */
  data?: Record<string, unknown> | null
}

/** Appends one row to the audit log (inside the caller's transaction when given one). */
export async function writeAudit (db: Knex, entry: AuditEntry): Promise<void> {
  const data = { ...(entry.data ?? {}), ...(entry.before ? { before: entry.before } : {}), ...(entry.after ? { after: entry.after } : {}) }
  await db('audit_log').insert({
    at: new Date().toISOString(),
    actor_id: entry.actorId ?? null,
    action: entry.action,
    subject_type: entry.subjectType ?? null,
    subject_id: entry.subjectId ?? null,
    ensemble_id: entry.ensembleId ?? null,
    ip: entry.ip ?? null,
    data: Object.keys(data).length ? JSON.stringify(data) : null,
  })
}

export interface AuditFilters {
  /** An action ("user.disabled") or its family ("user"). */
  action?: string
  actorId?: number
  ensembleId?: number
  page: number
  pageSize: number
}

function filtered (db: Knex, f: AuditFilters) {
  const q = db('audit_log as a')
  // A family is every action that starts with "family." ('/' is the character after '.').
  if (f.action) q.where(w => w.where('a.action', f.action!).orWhere(b => b.where('a.action', '>=', `${f.action}.`).andWhere('a.action', '<', `${f.action}/`)))
  if (f.actorId) q.where('a.actor_id', f.actorId)
  if (f.ensembleId) q.where('a.ensemble_id', f.ensembleId)
  return q
}

// Readable names of the objects audit rows point at, looked up per page (the rows keep only ids).
const LABELS: Record<string, { table: string, column: string }> = {
  user: { table: 'users', column: 'name' },
  ensemble: { table: 'ensembles', column: 'name' },
  section: { table: 'sections', column: 'name' },
  drill: { table: 'drills', column: 'title' },
  invitation: { table: 'invitations', column: 'email' },
  membership: { table: 'users', column: 'name' },
}

async function labels (db: Knex, rows: { subject_type: string | null, subject_id: number | null }[]): Promise<Map<string, string>> {
  const out = new Map<string, string>()
  const byType = new Map<string, Set<number>>()
  for (const r of rows) {
    if (r.subject_type && r.subject_id != null && LABELS[r.subject_type]) {
      byType.set(r.subject_type, (byType.get(r.subject_type) ?? new Set()).add(r.subject_id))
    }
  }
  for (const [type, ids] of byType) {
    const { table, column } = LABELS[type]!
    const found = await db(table).whereIn('id', [...ids]).select('id', `${column} as label`)
    for (const f of found as { id: number, label: string }[]) out.set(`${type}:${f.id}`, f.label)
  }
  return out
}

function parseData (text: string | null): Record<string, unknown> {
  if (!text) return {}
  try {
    const v = JSON.parse(text)
    return v && typeof v === 'object' && !Array.isArray(v) ? v as Record<string, unknown> : { value: v }
  } catch {
    return {}
  }
}

/** One page of the audit log, newest first, with the total matching the filters. */
export async function listAuditPage (db: Knex, f: AuditFilters): Promise<{ items: AuditItem[], total: number }> {
  const [counted] = await filtered(db, f).count<{ n: number }[]>({ n: '*' })
  const rows = await filtered(db, f)
    .leftJoin('users as u', 'u.id', 'a.actor_id')
    .select('a.id', 'a.at', 'a.actor_id', 'u.name as actor_name', 'a.action', 'a.ensemble_id', 'a.subject_type', 'a.subject_id', 'a.data')
    .orderBy('a.id', 'desc')
    .limit(f.pageSize)
    .offset((f.page - 1) * f.pageSize)
  const names = await labels(db, rows)
  const items = rows.map((r: Record<string, any>): AuditItem => {
    const { before, after, ...rest } = parseData(r.data)
    const target: AuditTarget | null = r.subject_type
      ? { type: r.subject_type, id: r.subject_id ?? null, label: names.get(`${r.subject_type}:${r.subject_id}`) ?? null }
      : null
    return {
      id: r.id,
      at: r.at,
      actorId: r.actor_id ?? null,
      actor: r.actor_name ?? null,
      action: r.action,
      ensembleId: r.ensemble_id ?? null,
      target,
      before: before ?? null,
      after: after ?? (Object.keys(rest).length ? rest : null),
    }
  })
  return { items, total: Number(counted?.n ?? 0) }
}

/** The values the audit log's filters can take: actions, actors and ensembles that appear in it. */
export async function auditFacets (db: Knex) {
  const actions = (await db('audit_log').distinct('action').orderBy('action')).map((r: { action: string }) => r.action)
  const actors = await db('audit_log as a').join('users as u', 'u.id', 'a.actor_id')
    .distinct('u.id', 'u.name', 'u.email').orderByRaw('u.name collate nocase') as { id: number, name: string, email: string }[]
  const ensembles = await db('ensembles').select('id', 'name').orderByRaw('name collate nocase') as { id: number, name: string }[]
  return { actions, actors, ensembles }
}

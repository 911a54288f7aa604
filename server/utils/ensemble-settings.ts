import type { Knex } from 'knex'
import { SystemOptions, type SystemName } from '../../shared/drill/schema'
import type { EnsembleDetail, EnsembleKind, MemberRole, SectionSummary } from '../../shared/types/ensemble'
import type { EnsemblePatch } from '../../shared/schemas/ensemble'
import { writeAudit } from './audit'

/** Who did a change and from where, for the audit log. */
export interface Actor { id: number, ip?: string | null }

const DEFAULT_SYSTEM = { name: 'equal' } as const

/** The stored default system, or equal temperament when none (or an unreadable one) is stored. */
export function storedSystem (text: string | null): SystemOptions {
  if (!text) return SystemOptions.parse(DEFAULT_SYSTEM)
  try {
    const parsed = SystemOptions.safeParse(JSON.parse(text))
    if (parsed.success) return parsed.data
  } catch { /* fall through: an unreadable value is treated as unset */ }
  return SystemOptions.parse(DEFAULT_SYSTEM)
}

/** The ensemble's sections in their order, with member counts. */
export async function listSections (db: Knex, ensembleId: number): Promise<SectionSummary[]> {
  const rows = await db('sections as s').where('s.ensemble_id', ensembleId)
    .select('s.id', 's.name', 's.position', 's.instrument', db.raw('(select count(*) from memberships m where m.section_id = s.id) as member_count'))
    .orderBy([{ column: 's.position' }, { column: 's.id' }])
  return rows.map((r: Record<string, any>) => ({ id: r.id, name: r.name, position: r.position, memberCount: Number(r.member_count), instrument: r.instrument ?? null }))
}

/** The ensemble with its settings and sections as the caller sees it, or null when it does not exist. */
export async function getEnsembleDetail (db: Knex, ensembleId: number, role: MemberRole | 'admin'): Promise<EnsembleDetail | null> {
  const row = await db('ensembles').where({ id: ensembleId }).first()
  if (!row) return null
  const { name: system, ...systemOptions } = storedSystem(row.default_system)
  return {
    id: row.id,
    name: row.name,
    kind: row.kind as EnsembleKind,
    a4: row.a4,
    system: system as SystemName,
    systemOptions,
    tolerance: row.tolerance,
    role,
    sections: await listSections(db, ensembleId),
  }
}

/**
 * The default system after a change of `system` and/or `systemOptions`, checked by the tuning
 * engine's own schema; options a new system does not read are dropped. Issues come back with
 * paths under `systemOptions`.
 */
export function mergeSystem (current: SystemOptions, patch: Pick<EnsemblePatch, 'system' | 'systemOptions'>):
  { ok: true, system: SystemOptions } | { ok: false, issues: { path: (string | number)[], message: string, code: string }[] } {
  const changed = patch.system !== undefined && patch.system !== current.name
  const base = changed ? {} : current
  const next = { ...base, ...(patch.systemOptions ?? {}), name: patch.system ?? current.name }
  const parsed = SystemOptions.safeParse(next)
  if (parsed.success) return { ok: true, system: parsed.data }
  return {
    ok: false,
    issues: parsed.error.issues.map(i => ({
      path: i.path[0] === 'name' ? ['system'] : ['systemOptions', ...i.path.map(p => (typeof p === 'symbol' ? String(p) : p))],
      message: i.message,
      code: i.code,
    })),
  }
}

const SETTINGS = ['name', 'kind', 'a4', 'tolerance'] as const

/** Applies a settings change and audits it with the values before and after; null when the ensemble is gone. */
export async function updateEnsembleSettings (db: Knex, ensembleId: number, actor: Actor, patch: Omit<EnsemblePatch, 'system' | 'systemOptions'>, system: SystemOptions | null): Promise<boolean> {
  return db.transaction(async (trx) => {
    const row = await trx('ensembles').where({ id: ensembleId }).first()
    if (!row) return false
    const before: Record<string, unknown> = {}
    const after: Record<string, unknown> = {}
    const update: Record<string, unknown> = {}
    for (const key of SETTINGS) {
      if (patch[key] !== undefined && patch[key] !== row[key]) {
        before[key] = row[key]
        after[key] = patch[key]
        update[key] = patch[key]
      }
    }
    if (system) {
      const old = storedSystem(row.default_system)
      if (JSON.stringify(old) !== JSON.stringify(system)) {
        before.system = old
        after.system = system
        update.default_system = JSON.stringify(system)
      }
    }
    if (!Object.keys(update).length) return true
    await trx('ensembles').where({ id: ensembleId }).update({ ...update, updated_at: new Date().toISOString() })
    await writeAudit(trx, { actorId: actor.id, ip: actor.ip, action: 'ensemble.settings_changed', subjectType: 'ensemble', subjectId: ensembleId, ensembleId, data: { before, after } })
    return true
  })
}

import type { Knex } from 'knex'
import type { PitchView, ProfileBody } from '../../shared/schemas/account'
import type { AccountProfile } from '../../shared/types/account'
import { writeAudit } from './audit'

function toProfile (r: Record<string, any>): AccountProfile {
  return {
    id: r.id,
    email: r.email,
    name: r.name,
    instrument: r.instrument ?? null,
    pitchView: (r.pitch_view === 'written' ? 'written' : 'concert') as PitchView,
    siteAdmin: r.site_role === 'admin',
  }
}

/** The person's own profile, or null when the account is gone. */
export async function findProfile (db: Knex, userId: number): Promise<AccountProfile | null> {
  const r = await db('users').where({ id: userId }).first('id', 'email', 'name', 'instrument', 'pitch_view', 'site_role')
  return r ? toProfile(r) : null
}

/** Saves the fields given, with one audit row naming what changed; null when the account is gone. */
export async function updateProfile (db: Knex, userId: number, body: ProfileBody, ip: string | null): Promise<AccountProfile | null> {
  return db.transaction(async (trx) => {
    const before = await findProfile(trx, userId)
    if (!before) return null
    const changed: Partial<Record<keyof ProfileBody, unknown>> = {}
    const was: Partial<Record<keyof ProfileBody, unknown>> = {}
    for (const key of ['name', 'instrument', 'pitchView'] as const) {
      if (body[key] !== undefined && body[key] !== before[key]) {
        changed[key] = body[key]
        was[key] = before[key]
      }
    }
    if (!Object.keys(changed).length) return before
    const update: Record<string, unknown> = { updated_at: new Date().toISOString() }
    if ('name' in changed) update.name = changed.name
    if ('instrument' in changed) update.instrument = changed.instrument
    if ('pitchView' in changed) update.pitch_view = changed.pitchView
    await trx('users').where({ id: userId }).update(update)
    await writeAudit(trx, { actorId: userId, action: 'account.updated', subjectType: 'user', subjectId: userId, ip, before: was, after: changed })
    return findProfile(trx, userId)
  })
}

/** The stored password hash, or null (no password yet, or no account). */
export async function passwordHashOf (db: Knex, userId: number): Promise<string | null> {
  const r = await db('users').where({ id: userId }).first('password_hash')
  return r?.password_hash ?? null
}

/**
 * Stores a new password hash. Every session that began before now is refused from here on (the
 * caller gives its own session a fresh sign-in time so it stays open). Returns the change time.
 */
export async function setPassword (db: Knex, userId: number, passwordHash: string, ip: string | null): Promise<string> {
  const at = new Date().toISOString()
  await db.transaction(async (trx) => {
    await trx('users').where({ id: userId }).update({ password_hash: passwordHash, password_changed_at: at, updated_at: at })
    await writeAudit(trx, { actorId: userId, action: 'account.password_changed', subjectType: 'user', subjectId: userId, ip })
  })
  return at
}

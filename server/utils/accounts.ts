import { createHash, randomBytes } from 'node:crypto'
import type { Knex } from 'knex'
import { writeAudit } from './audit'

export interface Account {
  id: number
  email: string
  name: string
  siteRole: 'admin' | null
  passwordHash: string | null
  disabledAt: string | null
}

/** How long a mailed password-reset link stays valid. */
export const PASSWORD_RESET_TTL_MS = 60 * 60 * 1000

/** Lower-cased, trimmed address (the form every table stores). */
export function normaliseEmail (email: string): string {
  return email.trim().toLowerCase()
}

/** SHA-256 hex of a mailed token: only the hash is stored. */
export function hashToken (token: string): string {
  return createHash('sha256').update(token).digest('hex')
}

/** A new unguessable token for a mailed link (256 bits, URL-safe). */
export function newToken (): string {
  return randomBytes(32).toString('base64url')
}

export async function findAccountByEmail (db: Knex, email: string): Promise<Account | null> {
  const r = await db('users').where({ email: normaliseEmail(email) }).first()
  if (!r) return null
  return { id: r.id, email: r.email, name: r.name, siteRole: r.site_role === 'admin' ? 'admin' : null, passwordHash: r.password_hash, disabledAt: r.disabled_at }
}

let dummy: Promise<string> | null = null
/** A hash of a random secret, verified when the account does not exist so both answers take as long. */
export function dummyPasswordHash (hash: (p: string) => Promise<string>): Promise<string> {
  dummy ??= hash(randomBytes(18).toString('base64url'))
  return dummy
}

/** Stamps a successful sign-in. */
export async function markSignedIn (db: Knex, userId: number, ip: string): Promise<void> {
  const at = new Date().toISOString()
  await db.transaction(async (trx) => {
    await trx('users').where({ id: userId }).update({ last_login_at: at })
    await writeAudit(trx, { actorId: userId, action: 'auth.login', subjectType: 'user', subjectId: userId, ip })
  })
}

/** Stores a reset request for the user and returns the token to mail (valid for an hour). */
export async function createPasswordReset (db: Knex, userId: number, ip: string): Promise<string> {
  const token = newToken()
  await db.transaction(async (trx) => {
    await trx('password_resets').insert({
      user_id: userId,
      token_hash: hashToken(token),
      expires_at: new Date(Date.now() + PASSWORD_RESET_TTL_MS).toISOString(),
      requested_ip: ip,
    })
    await writeAudit(trx, { actorId: null, action: 'auth.password_reset_requested', subjectType: 'user', subjectId: userId, ip })
  })
  return token
}

/**
 * Sets a new password when the token is valid, unused and unexpired; every other open link of
 * that user is spent too. Returns the user id, or null for a bad token.
 */
export async function resetPasswordWithToken (db: Knex, token: string, passwordHash: string, ip: string): Promise<number | null> {
  const now = new Date().toISOString()
  return db.transaction(async (trx) => {
    const row = await trx('password_resets').where({ token_hash: hashToken(token) }).whereNull('used_at').where('expires_at', '>', now).first()
    if (!row) return null
    const user = await trx('users').where({ id: row.user_id }).whereNull('disabled_at').first('id')
    if (!user) return null
    await trx('password_resets').where({ user_id: row.user_id }).whereNull('used_at').update({ used_at: now })
    await trx('users').where({ id: row.user_id }).update({ password_hash: passwordHash, password_changed_at: now, updated_at: now })
    await writeAudit(trx, { actorId: row.user_id, action: 'auth.password_reset', subjectType: 'user', subjectId: row.user_id, ip })
    return row.user_id as number
  })
}

/** Marks a signed-out session id as dead until it would have expired; drops rows past expiry. */
export async function revokeSession (db: Knex, sessionId: string, userId: number, expiresAtMs: number): Promise<void> {
  const now = new Date().toISOString()
  await db.transaction(async (trx) => {
    await trx('revoked_sessions').where('expires_at', '<', now).delete()
    await trx('revoked_sessions').insert({ session_id: sessionId, user_id: userId, revoked_at: now, expires_at: new Date(expiresAtMs).toISOString() }).onConflict('session_id').ignore()
  })
}

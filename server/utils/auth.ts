import { randomUUID } from 'node:crypto'
import type { H3Event } from 'h3'
import type { Knex } from 'knex'
import type { EnsembleRole, SessionUser } from '../../shared/types/user'
import { apiError } from './errors'
import { membershipFor } from './access'

export const ENSEMBLE_ROLES: readonly EnsembleRole[] = ['director', 'section_leader', 'player']

/** A director may do what a section leader may, who may do what a player may. */
const ROLE_RANK: Record<EnsembleRole, number> = { player: 1, section_leader: 2, director: 3 }

export interface Membership {
  ensembleId: number
  userId: number
  role: EnsembleRole
  sectionId: number | null
  /** True when a site admin without a membership acts as the ensemble's director. */
  viaSiteAdmin: boolean
}

interface UserRow { id: number, email: string, name: string, site_role: string | null, disabled_at: string | null, password_changed_at: string | null, sessions_revoked_at: string | null }

export function toSessionUser (row: Pick<UserRow, 'id' | 'email' | 'name' | 'site_role'>): SessionUser {
  return { id: row.id, email: row.email, name: row.name, siteRole: row.site_role === 'admin' ? 'admin' : null }
}

/**
 * The signed-in user, re-read from the database (401 without a valid session). Call it first in
 * a route, before reading any input. Disabled accounts, and sessions older than the last password
 * change or than the account's last disabling, are refused and their cookie cleared.
 */
export async function requireUser (event: H3Event): Promise<SessionUser> {
  if (event.context.user) return event.context.user as SessionUser
  const session = await getUserSession(event)
  const id = Number(session.user?.id)
  if (!session.user || !Number.isInteger(id)) throw apiError(401, 'unauthenticated', 'Sign-in required')
  const db = useDb()
  const row = await db('users').where({ id }).first<UserRow | undefined>('id', 'email', 'name', 'site_role', 'disabled_at', 'password_changed_at', 'sessions_revoked_at')
  const loggedInAt = Number(session.loggedInAt ?? 0)
  const maxAgeMs = sessionMaxAgeS() * 1000
  const after = (at: string | null | undefined) => Boolean(at && Date.parse(at) > loggedInAt)
  const stale = after(row?.password_changed_at) || after(row?.sessions_revoked_at) || loggedInAt + maxAgeMs < Date.now()
  const revoked = row && !stale && session.id ? await db('revoked_sessions').where({ session_id: session.id }).first('session_id') : null
  if (!row || row.disabled_at || stale || revoked) {
    await clearUserSession(event)
    throw apiError(401, 'unauthenticated', 'Sign-in required')
  }
  const user = toSessionUser(row)
  event.context.user = user
  return user
}

/** How long a sign-in lasts, in seconds (runtimeConfig.session.maxAge, 14 days by default). */
export function sessionMaxAgeS (): number {
  const s = Number((useRuntimeConfig().session as { maxAge?: number } | undefined)?.maxAge)
  return Number.isFinite(s) && s > 0 ? s : 14 * 86400
}

/** The signed-in site admin (401 without a session, 403 for anyone else). */
export async function requireSiteAdmin (event: H3Event): Promise<SessionUser> {
  const user = await requireUser(event)
  if (user.siteRole !== 'admin') throw apiError(403, 'forbidden', 'Not allowed')
  return user
}

/** The user's membership of the ensemble, or null. */
export async function findMembership (db: Knex, userId: number, ensembleId: number): Promise<Membership | null> {
  const row = await db('memberships').where({ user_id: userId, ensemble_id: ensembleId })
    .first<{ ensemble_id: number, user_id: number, role: EnsembleRole, section_id: number | null } | undefined>('ensemble_id', 'user_id', 'role', 'section_id')
  if (!row) return null
  return { ensembleId: row.ensemble_id, userId: row.user_id, role: row.role, sectionId: row.section_id, viaSiteAdmin: false }
}

/**
 * The caller's membership of an existing ensemble; a site admin without one acts as its director.
 * 404 when the ensemble is missing or the caller is not a member (not yours = not found).
 */
export async function requireMembership (db: Knex, user: SessionUser, ensembleId: number): Promise<Membership> {
  const m = await membershipFor(db, user, ensembleId)
  if (!m) throw apiError(404, 'not_found', 'Ensemble not found')
  return m
}

/** Whether the membership holds one of the roles, or a higher one. */
export function hasRole (membership: Membership | null | undefined, ...roles: EnsembleRole[]): boolean {
  if (!membership) return false
  const need = Math.min(...roles.map(r => ROLE_RANK[r]))
  return ROLE_RANK[membership.role] >= need
}

/** Throws 404 without a membership and 403 when its role is below every role named. */
export function requireRole (membership: Membership | null | undefined, ...roles: EnsembleRole[]): Membership {
  if (!membership) throw apiError(404, 'not_found', 'Not found')
  if (!hasRole(membership, ...roles)) throw apiError(403, 'forbidden', 'Not allowed')
  return membership
}

/** Directors review every section; a section leader only their own. */
export function canReviewSection (membership: Membership | null | undefined, sectionId: number | null): boolean {
  if (!membership) return false
  if (membership.role === 'director') return true
  return membership.role === 'section_leader' && sectionId != null && membership.sectionId === sectionId
}

/** Name of the session cookie (nuxt-auth-utils' default unless runtimeConfig.session.name is set). */
function sessionCookieName (): string {
  return String((useRuntimeConfig().session as { name?: string } | undefined)?.name || 'nuxt-session')
}

/** Refuses the session's id from now on (until it would have expired anyway). */
export async function revokeCurrentSession (event: H3Event): Promise<void> {
  const session = await getUserSession(event)
  const userId = Number(session.user?.id)
  if (!session.id || !Number.isInteger(userId)) return
  const expiresAtMs = Number(session.loggedInAt ?? Date.now()) + sessionMaxAgeS() * 1000
  await revokeSession(useDb(), session.id, userId, expiresAtMs).catch((err) => {
    // A session of an account that no longer exists cannot be used anyway.
    console.warn(`[auth] session not recorded as revoked: ${(err as Error).message}`)
  })
}

/**
 * Signs the user in under a new session id: an id the browser already carried (possibly planted
 * by someone else) is never kept, and a previous signed-in session in that cookie is revoked.
 */
export async function startSession (event: H3Event, user: SessionUser): Promise<void> {
  await revokeCurrentSession(event)
  const sessions = (event.context.sessions ??= Object.create(null)) as Record<string, unknown>
  sessions[sessionCookieName()] = { id: randomUUID(), createdAt: Date.now(), data: Object.create(null) }
  await setUserSession(event, { user, loggedInAt: Date.now() })
}

// Invitations to an ensemble: the data layer (issue, list, resend, revoke, open by token, accept).
// Only the SHA-256 of a token is stored. The message and its link live in invitation-mail.ts.
import type { Knex } from 'knex'
import type { InvitationCreated, InvitationItem, InvitationPreview, InvitationStatus, MemberRole, Page } from '../../shared/types/ensemble'
import { hashToken, newToken, normaliseEmail } from './accounts'
import { writeAudit } from './audit'
import type { Actor } from './ensemble-settings'

interface InvitationRow {
  id: number, ensemble_id: number, email: string, name: string | null, role: MemberRole, section_id: number | null
  token_hash: string, invited_by: number | null, expires_at: string, accepted_at: string | null
  accepted_user_id: number | null, revoked_at: string | null, created_at: string
}

export interface InvitationRequest { email: string, role: MemberRole, sectionId: number | null, name?: string | null }

/** A created or re-sent invitation and the token to mail (only its hash is stored). */
export interface IssuedInvitation extends InvitationCreated { token: string, name: string | null }

function statusOf (r: Pick<InvitationRow, 'accepted_at' | 'revoked_at' | 'expires_at'>, now = new Date().toISOString()): InvitationStatus {
  if (r.accepted_at) return 'accepted'
  if (r.revoked_at) return 'revoked'
  return r.expires_at <= now ? 'expired' : 'open'
}

/** Whether the address belongs to a member of the ensemble. */
export async function isMemberEmail (db: Knex, ensembleId: number, email: string): Promise<boolean> {
  return Boolean(await db('memberships as m').join('users as u', 'u.id', 'm.user_id')
    .where({ 'm.ensemble_id': ensembleId, 'u.email': normaliseEmail(email) }).first('m.id'))
}

/** Whether the section exists in the ensemble. */
export async function sectionInEnsemble (db: Knex, ensembleId: number, sectionId: number): Promise<boolean> {
  return Boolean(await db('sections').where({ id: sectionId, ensemble_id: ensembleId }).first('id'))
}

/**
 * Stores an invitation valid for `ttlMs` (inside the caller's transaction when given one). An open
 * invitation to the same address is revoked: one live link per address and ensemble.
 */
export async function insertInvitation (trx: Knex, ensembleId: number, actor: Actor, inv: InvitationRequest, ttlMs: number): Promise<IssuedInvitation> {
  const email = normaliseEmail(inv.email)
  const now = new Date()
  const nowIso = now.toISOString()
  const open = await trx('invitations').where({ ensemble_id: ensembleId, email }).whereNull('accepted_at').whereNull('revoked_at').where('expires_at', '>', nowIso).select('id')
  for (const o of open) {
    await trx('invitations').where({ id: o.id }).update({ revoked_at: nowIso })
    await writeAudit(trx, { actorId: actor.id, ip: actor.ip, action: 'invitation.revoked', subjectType: 'invitation', subjectId: o.id, ensembleId, data: { before: { status: 'open' }, after: { status: 'revoked', replacedByNew: true } } })
  }
  const token = newToken()
  const expiresAt = new Date(now.getTime() + ttlMs).toISOString()
  const name = inv.name?.trim() || null
  const [row] = await trx('invitations').insert({
    ensemble_id: ensembleId, email, name, role: inv.role, section_id: inv.sectionId, token_hash: hashToken(token),
    invited_by: actor.id, expires_at: expiresAt, sent_at: nowIso, created_at: nowIso,
  }).returning('id')
  await writeAudit(trx, { actorId: actor.id, ip: actor.ip, action: 'invitation.created', subjectType: 'invitation', subjectId: row.id, ensembleId, data: { before: null, after: { email, role: inv.role, sectionId: inv.sectionId, expiresAt } } })
  return { id: row.id, email, expiresAt, token, name }
}

/** Creates one invitation; `already_member` when the address is in the ensemble, `section_not_found` for another ensemble's section. */
export async function inviteToEnsemble (db: Knex, ensembleId: number, actor: Actor, inv: InvitationRequest, ttlMs: number):
  Promise<{ ok: true, invitation: IssuedInvitation } | { ok: false, code: 'already_member' | 'section_not_found' }> {
  return db.transaction(async (trx) => {
    if (inv.sectionId != null && !await sectionInEnsemble(trx, ensembleId, inv.sectionId)) return { ok: false, code: 'section_not_found' }
    if (await isMemberEmail(trx, ensembleId, inv.email)) return { ok: false, code: 'already_member' }
    return { ok: true, invitation: await insertInvitation(trx, ensembleId, actor, inv, ttlMs) }
  })
}

/** One page of the ensemble's invitations with the given status, newest first. */
export async function listInvitations (db: Knex, ensembleId: number, status: InvitationStatus | 'all', page: number, pageSize: number): Promise<Page<InvitationItem>> {
  const now = new Date().toISOString()
  const base = db('invitations as i').where('i.ensemble_id', ensembleId)
  if (status === 'accepted') base.whereNotNull('i.accepted_at')
  else if (status === 'revoked') base.whereNull('i.accepted_at').whereNotNull('i.revoked_at')
  else if (status === 'expired') base.whereNull('i.accepted_at').whereNull('i.revoked_at').where('i.expires_at', '<=', now)
  else if (status === 'open') base.whereNull('i.accepted_at').whereNull('i.revoked_at').where('i.expires_at', '>', now)
  const total = Number((await base.clone().count({ n: '*' }).first())?.n ?? 0)
  const rows = await base.clone().leftJoin('sections as s', 's.id', 'i.section_id').leftJoin('users as u', 'u.id', 'i.invited_by')
    .select('i.*', 's.name as section', 'u.name as invited_by_name')
    .orderBy([{ column: 'i.created_at', order: 'desc' }, { column: 'i.id', order: 'desc' }])
    .limit(pageSize).offset((page - 1) * pageSize)
  return {
    items: rows.map((r: InvitationRow & { section: string | null, invited_by_name: string | null }) => ({
      id: r.id, email: r.email, name: r.name, role: r.role, sectionId: r.section_id, section: r.section,
      status: statusOf(r, now), expiresAt: r.expires_at, createdAt: r.created_at, invitedBy: r.invited_by_name,
    })),
    total, page, pageSize,
  }
}

/** A new link for an open or expired invitation (the old link stops working); null when missing, `closed` when accepted or revoked. */
export async function resendInvitation (db: Knex, ensembleId: number, invitationId: number, actor: Actor, ttlMs: number):
  Promise<{ ok: true, invitation: IssuedInvitation } | { ok: false, code: 'not_found' | 'invitation_closed' | 'already_member' }> {
  return db.transaction(async (trx) => {
    const row = await trx('invitations').where({ id: invitationId, ensemble_id: ensembleId }).first<InvitationRow | undefined>()
    if (!row) return { ok: false, code: 'not_found' }
    const status = statusOf(row)
    if (status === 'accepted' || status === 'revoked') return { ok: false, code: 'invitation_closed' }
    if (await isMemberEmail(trx, ensembleId, row.email)) return { ok: false, code: 'already_member' }
    const token = newToken()
    const now = new Date()
    const expiresAt = new Date(now.getTime() + ttlMs).toISOString()
    await trx('invitations').where({ id: row.id }).update({ token_hash: hashToken(token), expires_at: expiresAt, sent_at: now.toISOString() })
    await writeAudit(trx, { actorId: actor.id, ip: actor.ip, action: 'invitation.resent', subjectType: 'invitation', subjectId: row.id, ensembleId, data: { before: { expiresAt: row.expires_at, status }, after: { expiresAt, status: 'open' } } })
    return { ok: true, invitation: { id: row.id, email: row.email, expiresAt, token, name: row.name } }
  })
}

/** Revokes an open or expired invitation; its link then answers 410. */
export async function revokeInvitation (db: Knex, ensembleId: number, invitationId: number, actor: Actor): Promise<{ ok: true } | { ok: false, code: 'not_found' | 'invitation_closed' }> {
  return db.transaction(async (trx) => {
    const row = await trx('invitations').where({ id: invitationId, ensemble_id: ensembleId }).first<InvitationRow | undefined>()
    if (!row) return { ok: false, code: 'not_found' }
    const status = statusOf(row)
    if (status === 'accepted' || status === 'revoked') return { ok: false, code: 'invitation_closed' }
    await trx('invitations').where({ id: row.id }).update({ revoked_at: new Date().toISOString() })
    await writeAudit(trx, { actorId: actor.id, ip: actor.ip, action: 'invitation.revoked', subjectType: 'invitation', subjectId: row.id, ensembleId, data: { before: { status }, after: { status: 'revoked' } } })
    return { ok: true }
  })
}

export interface TokenLookup { row: InvitationRow, status: InvitationStatus, preview: InvitationPreview, hasPassword: boolean, userId: number | null, disabled: boolean }

/** The invitation a mailed token opens, or null when no invitation has that token. */
export async function findInvitationByToken (db: Knex, token: string): Promise<TokenLookup | null> {
  const row = await db('invitations').where({ token_hash: hashToken(token) }).first<InvitationRow | undefined>()
  if (!row) return null
  const ensemble = await db('ensembles').where({ id: row.ensemble_id }).first('name', 'archived_at')
  const section = row.section_id ? await db('sections').where({ id: row.section_id }).first('name') : null
  const user = await db('users').where({ email: row.email }).first('id', 'password_hash', 'disabled_at')
  const status = ensemble?.archived_at && statusOf(row) === 'open' ? 'revoked' : statusOf(row)
  return {
    row, status, hasPassword: Boolean(user?.password_hash), userId: user?.id ?? null, disabled: Boolean(user?.disabled_at),
    preview: { ensemble: ensemble?.name ?? '', role: row.role, section: section?.name ?? null, email: row.email, hasAccount: Boolean(user?.password_hash) },
  }
}

/**
 * Accepts an open invitation for `userId` (an existing account) or for a new account made from
 * `account` (name and password hash). Returns the member's user id, or `gone` when the invitation
 * was spent in the meantime.
 */
export async function acceptInvitation (db: Knex, invitationId: number, who: { userId: number } | { name: string, passwordHash: string }, ip: string | null):
  Promise<{ ok: true, userId: number, ensembleId: number } | { ok: false, code: 'gone' }> {
  return db.transaction(async (trx) => {
    const row = await trx('invitations').where({ id: invitationId }).first<InvitationRow | undefined>()
    if (!row || statusOf(row) !== 'open') return { ok: false, code: 'gone' }
    const now = new Date().toISOString()
    let userId: number
    if ('userId' in who) {
      userId = who.userId
    } else {
      const existing = await trx('users').where({ email: row.email }).first('id', 'password_hash')
      if (existing?.password_hash) return { ok: false, code: 'gone' } // an account appeared: it must sign in instead
      if (existing) {
        userId = existing.id
        await trx('users').where({ id: userId }).update({ name: who.name, password_hash: who.passwordHash, password_changed_at: now, updated_at: now })
      } else {
        const [u] = await trx('users').insert({ email: row.email, name: who.name, password_hash: who.passwordHash, created_at: now, updated_at: now }).returning('id')
        userId = u.id
      }
      await writeAudit(trx, { actorId: userId, ip, action: 'user.created_by_invitation', subjectType: 'user', subjectId: userId, ensembleId: row.ensemble_id, data: { before: null, after: { email: row.email, name: who.name } } })
    }
    const member = await trx('memberships').where({ ensemble_id: row.ensemble_id, user_id: userId }).first('id')
    if (!member) {
      await trx('memberships').insert({ ensemble_id: row.ensemble_id, user_id: userId, role: row.role, section_id: row.section_id, created_at: now, updated_at: now })
    }
    await trx('invitations').where({ id: row.id }).update({ accepted_at: now, accepted_user_id: userId })
    await writeAudit(trx, { actorId: userId, ip, action: 'invitation.accepted', subjectType: 'invitation', subjectId: row.id, ensembleId: row.ensemble_id, data: { before: null, after: member ? { alreadyMember: true } : { userId, role: row.role, sectionId: row.section_id } } })
    return { ok: true, userId, ensembleId: row.ensemble_id }
  })
}

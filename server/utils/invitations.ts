import type { Knex } from 'knex'
import type { EnsembleRole } from '../../shared/types/user'
import { hashToken, newToken, normaliseEmail } from './accounts'
import type { OutgoingMail } from './mail'

/** How long a mailed invitation stays valid. */
export const INVITATION_TTL_MS = 7 * 24 * 60 * 60 * 1000

export interface NewInvitation {
  ensembleId: number
  email: string
  role: EnsembleRole
  sectionId?: number | null
  invitedBy: number | null
  ttlMs?: number
}

/**
 * Stores a single-use invitation (only the token's SHA-256 is kept) and returns it with the token
 * to mail. Call it inside the caller's transaction when the invitation is part of a larger change.
 */
export async function createInvitation (db: Knex, inv: NewInvitation): Promise<{ id: number, email: string, expiresAt: string, token: string }> {
  const token = newToken()
  const email = normaliseEmail(inv.email)
  const expiresAt = new Date(Date.now() + (inv.ttlMs ?? INVITATION_TTL_MS)).toISOString()
  const [row] = await db('invitations').insert({
    ensemble_id: inv.ensembleId,
    email,
    role: inv.role,
    section_id: inv.sectionId ?? null,
    token_hash: hashToken(token),
    invited_by: inv.invitedBy,
    expires_at: expiresAt,
  }).returning('id')
  const id = typeof row === 'object' ? (row as { id: number }).id : row as number
  return { id, email, expiresAt, token }
}

/** The link an invitation's message carries. */
export function invitationLink (baseUrl: string, token: string): string {
  return `${baseUrl.replace(/\/+$/, '')}/invitations/${encodeURIComponent(token)}`
}

const ROLE_WORDS: Record<EnsembleRole, string> = { director: 'director', section_leader: 'section leader', player: 'player' }

/** The invitation message: one link, the ensemble, the role and when it expires. */
export function invitationMail (to: string, ensembleName: string, role: EnsembleRole, link: string, inviter: string | null): OutgoingMail {
  const who = inviter ? `${inviter} invites you` : 'You are invited'
  const text = [
    'Hello,',
    '',
    `${who} to join ${ensembleName} on Driftline as ${ROLE_WORDS[role]}.`,
    `Open this link within 7 days to accept: ${link}`,
    '',
    'If you did not expect this message, ignore it: nothing happens until the link is opened.',
  ].join('\n')
  const entities: Record<string, string> = { '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;' }
  const esc = (s: string) => s.replace(/[&<>"]/g, c => entities[c]!)
  const html = `<p>Hello,</p><p>${esc(who)} to join <strong>${esc(ensembleName)}</strong> on Driftline as ${ROLE_WORDS[role]}.</p>`
    + `<p><a href="${esc(link)}">Accept the invitation</a> (the link works for 7 days).</p>`
    + '<p>If you did not expect this message, ignore it: nothing happens until the link is opened.</p>'
  return { to, subject: `Join ${ensembleName} on Driftline`, text, html }
}

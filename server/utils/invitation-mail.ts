import type { Knex } from 'knex'
import type { MemberRole } from '../../shared/types/ensemble'
import type { IssuedInvitation } from './invitations'
import type { OutgoingMail } from './mail'
import { sendMail } from './mail'

const ROLE_WORDS: Record<MemberRole, string> = { director: 'a director', section_leader: 'a section leader', player: 'a member' }

/** How long an invitation link stays valid (runtimeConfig.invitations.ttlDays, 7 days by default). */
export function invitationTtlMs (): number {
  const days = Number((useRuntimeConfig().invitations as { ttlDays?: number } | undefined)?.ttlDays)
  return (Number.isFinite(days) && days > 0 ? days : 7) * 86_400_000
}

/** The link an invitation mail carries: {baseUrl}/invitations/{token}. */
export function invitationLink (baseUrl: string, token: string): string {
  return `${baseUrl.replace(/\/+$/, '')}/invitations/${encodeURIComponent(token)}`
}

/** The link with the site's own base URL (runtimeConfig.baseUrl). */
export function invitationUrl (token: string): string {
  return invitationLink(String(useRuntimeConfig().baseUrl), token)
}

/** The invitation message: plain text holding exactly one link. */
export function ensembleInvitationMail (to: string, opts: { name: string | null, ensemble: string, inviter: string, role: MemberRole, section: string | null, link: string, expiresAt: string }): OutgoingMail {
  const until = new Date(opts.expiresAt).toUTCString().replace(/:\d\d GMT$/, ' UTC')
  const where = opts.section ? ` in the ${opts.section} section` : ''
  const text = [
    `Hello${opts.name ? ` ${opts.name}` : ''},`,
    '',
    `${opts.inviter} invites you to join ${opts.ensemble} on Driftline as ${ROLE_WORDS[opts.role]}${where}.`,
    'Driftline is where the ensemble gets its tuning drills, records takes and reads how each held note sat.',
    '',
    `Open this link to accept (it works once, until ${until}):`,
    opts.link,
    '',
    'If you did not expect this invitation, ignore this message: nothing happens unless you open the link.',
  ].join('\n')
  return { to, subject: `Invitation to ${opts.ensemble} on Driftline`, text }
}

/** Mails each issued invitation; returns how many messages could not be sent (they can be re-sent later). */
export async function mailInvitations (db: Knex, ensembleId: number, inviter: string, issued: IssuedInvitation[]): Promise<number> {
  const ensemble = (await db('ensembles').where({ id: ensembleId }).first('name'))?.name ?? 'an ensemble'
  let failed = 0
  for (const inv of issued) {
    try {
      const row = await db('invitations as i').leftJoin('sections as s', 's.id', 'i.section_id').where('i.id', inv.id).first('i.role', 's.name as section')
      await sendMail(ensembleInvitationMail(inv.email, { name: inv.name, ensemble, inviter, role: row.role, section: row.section ?? null, link: invitationUrl(inv.token), expiresAt: inv.expiresAt }))
    } catch (err) {
      failed++
      console.error(`[mail] invitation ${inv.id} not sent: ${(err as Error).message}`)
    }
  }
  return failed
}

/** 410 for an invitation that can no longer be used, saying why. */
export function invitationGone (status: 'accepted' | 'revoked' | 'expired' | 'open') {
  const message = status === 'accepted'
    ? 'This invitation was already used'
    : status === 'revoked' ? 'This invitation was withdrawn' : 'This invitation has expired'
  return apiError(410, 'invitation_gone', message, { status })
}

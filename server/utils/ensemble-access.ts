import type { H3Event } from 'h3'
import type { Knex } from 'knex'
import type { EnsembleRole, SessionUser } from '../../shared/types/user'
import type { Membership } from './auth'
import { requireMembership, requireRole } from './auth'
import type { Actor } from './ensemble-settings'
import { clientAddress } from './rate-limit'

/** The caller's membership of the ensemble with at least `role` (404 outside it, 403 below the role). */
export async function requireEnsembleRole (db: Knex, user: SessionUser, ensembleId: number, role: EnsembleRole): Promise<Membership> {
  return requireRole(await requireMembership(db, user, ensembleId), role)
}

/** The caller as the audit log records them. */
export function actorOf (event: H3Event, user: SessionUser): Actor {
  return { id: user.id, ip: clientAddress(event) }
}

/** Whether the caller may see members' e-mail addresses (directors and site admins only). */
export function seesEmails (user: SessionUser, membership: Membership): boolean {
  return user.siteRole === 'admin' || membership.role === 'director'
}

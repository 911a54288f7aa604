import type { EnsembleKind } from './ensemble'

/** One row of GET /api/admin/users (and the answer of PATCH /api/admin/users/:id). */
export interface AdminUser {
  id: number
  name: string
  email: string
  siteAdmin: boolean
  disabled: boolean
  disabledAt: string | null
  lastLoginAt: string | null
  createdAt: string
  /** Ensembles the person belongs to. */
  ensembleCount: number
}

/** One row of GET /api/admin/ensembles (and the answer of POST/PATCH). */
export interface AdminEnsemble {
  id: number
  name: string
  kind: EnsembleKind
  archived: boolean
  archivedAt: string | null
  createdAt: string
  memberCount: number
  /** Names of the directors who have joined. */
  directors: string[]
  /** Director invitations sent and not yet accepted, revoked or expired. */
  pendingDirectorInvitations: string[]
}

/** POST /api/admin/ensembles → 201. */
export interface AdminEnsembleCreated extends AdminEnsemble {
  invitation: { id: number, email: string, expiresAt: string }
}

/** What an audit row is about. */
export interface AuditTarget {
  type: string
  id: number | null
  /** A readable name (the person, ensemble, section, …) when it still exists. */
  label: string | null
}

/** One row of GET /api/admin/audit. */
export interface AuditItem {
  id: number
  at: string
  actorId: number | null
  /** The actor's name, or null for the system or a deleted account. */
  actor: string | null
  action: string
  ensembleId: number | null
  target: AuditTarget | null
  before: unknown
  after: unknown
}

export interface Paged<T> {
  items: T[]
  total: number
  page: number
  pageSize: number
}

// Response shapes of the ensemble, section, member and invitation routes (server and pages share them).
import type { SystemName, SystemOptions } from '../drill/schema'
import type { EnsembleRole } from './user'

export const ENSEMBLE_KINDS = ['choir', 'brass_band', 'wind_band', 'mixed'] as const
export type EnsembleKind = (typeof ENSEMBLE_KINDS)[number]

export const MEMBER_ROLES = ['director', 'section_leader', 'player'] as const satisfies readonly EnsembleRole[]
/** A member's role (the same values as the session's EnsembleRole). */
export type MemberRole = EnsembleRole

/** Which pitch a member reads their part in. */
export const READINGS = ['concert', 'written'] as const
export type Reading = (typeof READINGS)[number]

export interface SectionSummary {
  id: number
  name: string
  position: number
  memberCount: number
  /** Instrument id of the section's usual instrument, or null. */
  instrument: string | null
}

/** GET/PATCH /api/ensembles/:id */
export interface EnsembleDetail {
  id: number
  name: string
  kind: EnsembleKind
  /** Reference pitch A4 in Hz. */
  a4: number
  system: SystemName
  /** The default target system's options other than its name. */
  systemOptions: Omit<SystemOptions, 'name'>
  /** Default tolerance, ± cents. */
  tolerance: number
  /** The caller's role; 'admin' for a site admin who is not a member. */
  role: MemberRole | 'admin'
  sections: SectionSummary[]
}

/** One row of GET /api/ensembles/:id/members; `email` only for directors and site admins. */
export interface MemberItem {
  userId: number
  name: string
  role: MemberRole
  sectionId: number | null
  section: string | null
  /** Instrument id (voice-* for singers); null = the section's usual instrument. */
  instrument: string | null
  /** The pitch the member reads: their own setting in this ensemble, else their account's default. */
  reads: Reading
  /** Whether `reads` comes from the account's default (the membership sets none). */
  readsFromAccount: boolean
  email?: string
}

export interface Page<T> {
  items: T[]
  total: number
  page: number
  pageSize: number
}

/** A section leader's list holds their own section only; null for everyone else. */
export interface MemberPage extends Page<MemberItem> {
  onlySection: { sectionId: number | null, section: string | null } | null
}

export type InvitationStatus = 'open' | 'accepted' | 'revoked' | 'expired'

/** POST /api/ensembles/:id/invitations (201) */
export interface InvitationCreated {
  id: number
  email: string
  expiresAt: string
}

/** One row of GET /api/ensembles/:id/invitations */
export interface InvitationItem {
  id: number
  email: string
  name: string | null
  role: MemberRole
  sectionId: number | null
  section: string | null
  status: InvitationStatus
  expiresAt: string
  createdAt: string
  invitedBy: string | null
}

/** GET /api/invitations/:token (public) */
export interface InvitationPreview {
  ensemble: string
  role: MemberRole
  section: string | null
  email: string
  hasAccount: boolean
}

/** POST /api/invitations/:token/accept */
export interface InvitationAccepted {
  ensembleId: number
  user: { id: number, email: string, name: string, siteRole: 'admin' | null }
}

/** A problem found in one row of a bulk invitation file. */
export type BulkProblemCode = 'bad_email' | 'missing_email' | 'missing_name' | 'unknown_section' | 'bad_role'
  | 'duplicate' | 'existing_member' | 'open_invitation'

export interface BulkProblem {
  code: BulkProblemCode
  /** Column the problem is in. */
  field: 'name' | 'email' | 'section' | 'role'
  message: string
}

/** One data row of a bulk file as the preview shows it. */
export interface BulkRow {
  /** Line number in the file (the header is line 1). */
  line: number
  name: string
  email: string
  section: string
  sectionId: number | null
  role: MemberRole | null
  /** True when nothing stops the invitation (an open invitation is only a note: a new one replaces it). */
  ok: boolean
  problems: BulkProblem[]
}

/** POST /api/ensembles/:id/invitations/bulk-preview */
export interface BulkPreview {
  rows: BulkRow[]
  goodCount: number
  badCount: number
  /** The column separator read from the file (',' or ';' or tab). */
  delimiter: string
}

/** POST /api/ensembles/:id/invitations/bulk (201) */
export interface BulkSent {
  sent: number
  skipped: number
  invitations: InvitationCreated[]
}

import { z } from 'zod'
import { PASSWORD_MIN } from './auth'
import { A4_MAX, A4_MIN, SYSTEM_NAMES, TOLERANCE_MAX } from '../drill/schema'
import { INSTRUMENTS } from '../tuning/transpose'
import { ENSEMBLE_KINDS, MEMBER_ROLES, READINGS } from '../types/ensemble'

// Bodies and queries shared by the ensemble pages and their routes: one validation on both sides.

const name = (max: number, what: string) => z.string().trim().min(1, `Give the ${what} a name`).max(max, `Keep the ${what} name under ${max + 1} characters`)
const id = z.coerce.number().int().positive().max(Number.MAX_SAFE_INTEGER)
const instrument = z.string().refine(v => Object.hasOwn(INSTRUMENTS, v), 'Choose an instrument or voice part from the list')

export { TOLERANCE_MAX }

/** PATCH /api/ensembles/:id (any of the fields). */
export const EnsemblePatch = z.object({
  name: name(120, 'ensemble'),
  kind: z.enum(ENSEMBLE_KINDS, { message: 'Choose choir, brass band, wind band or mixed' }),
  a4: z.number({ message: `Give the reference pitch in Hz, from ${A4_MIN} to ${A4_MAX}` })
    .min(A4_MIN, `The reference pitch must be at least ${A4_MIN} Hz`).max(A4_MAX, `The reference pitch must be at most ${A4_MAX} Hz`),
  system: z.enum(SYSTEM_NAMES, { message: 'Choose a target system from the list' }),
  /** Checked together with `system` by the tuning engine's SystemOptions schema. */
  systemOptions: z.record(z.string(), z.unknown()),
  tolerance: z.number({ message: `Give the tolerance in cents, above 0 and at most ${TOLERANCE_MAX}` })
    .positive('The tolerance must be above 0 cents').max(TOLERANCE_MAX, `The tolerance must be at most ${TOLERANCE_MAX} cents`),
}).partial().strict()
export type EnsemblePatch = z.infer<typeof EnsemblePatch>

/** POST /api/ensembles/:id/sections */
export const SectionCreate = z.object({
  name: name(60, 'section'),
  instrument: instrument.nullable().optional(),
}).strict()
export type SectionCreate = z.infer<typeof SectionCreate>

/** PATCH /api/ensembles/:id/sections/:sectionId */
export const SectionPatch = SectionCreate.partial().strict()
export type SectionPatch = z.infer<typeof SectionPatch>

/** POST /api/ensembles/:id/sections/order: every section id, in the new order. */
export const SectionOrder = z.object({ ids: z.array(id).min(1).max(200) }).strict()

/** POST /api/ensembles/:id/sections/:sectionId/merge: this section's members join `intoId`, then it goes. */
export const SectionMerge = z.object({ intoId: id, name: name(60, 'section').optional() }).strict()

/** DELETE /api/ensembles/:id/sections/:sectionId?moveTo= (needed when the section has members or assignments). */
export const SectionDeleteQuery = z.object({ moveTo: id.optional() })

/** Route params with a second id. */
export const SectionParams = z.object({ id, sectionId: id })
export const MemberParams = z.object({ id, userId: id })
export const InvitationParams = z.object({ id, invitationId: id })
export const TokenParams = z.object({ token: z.string().min(1).max(200) })

export const MEMBER_SORTS = ['name', 'role', 'section', 'instrument'] as const
export const PAGE_SIZE_MAX = 100

/** GET /api/ensembles/:id/members */
export const MembersQuery = z.object({
  q: z.string().trim().max(120).optional(),
  role: z.enum(MEMBER_ROLES).optional(),
  sectionId: z.union([id, z.literal('none')]).optional(),
  sort: z.enum(MEMBER_SORTS).default('name'),
  dir: z.enum(['asc', 'desc']).default('asc'),
  page: z.coerce.number().int().min(1).max(100_000).default(1),
  pageSize: z.coerce.number().int().min(1).max(PAGE_SIZE_MAX).default(25),
})
export type MembersQuery = z.infer<typeof MembersQuery>

/** PATCH /api/ensembles/:id/members/:userId */
export const MemberPatch = z.object({
  role: z.enum(MEMBER_ROLES, { message: 'Choose director, section leader or player' }),
  sectionId: id.nullable(),
  instrument: instrument.nullable(),
  // null: follow the member's account default.
  reads: z.enum(READINGS, { message: 'Choose concert or written pitch' }).nullable(),
}).partial().strict().refine(v => Object.keys(v).length > 0, 'Change at least one of role, section, instrument or reading')
export type MemberPatch = z.infer<typeof MemberPatch>

/** An address as every table stores it: trimmed, lower-case, at most 254 characters with a local part of at most 64. */
export const email = z.string().trim().toLowerCase().max(254, 'That address is too long')
  .email('Enter an e-mail address such as name@example.org')
  .refine(v => v.lastIndexOf('@') <= 64, 'The part before the @ is too long (at most 64 characters)')

/** POST /api/ensembles/:id/invitations */
export const InvitationCreate = z.object({
  email,
  role: z.enum(MEMBER_ROLES, { message: 'Choose director, section leader or player' }).default('player'),
  sectionId: id.nullable().optional(),
  name: z.string().trim().max(120).optional(),
}).strict()
export type InvitationCreate = z.infer<typeof InvitationCreate>

export const INVITATION_STATUSES = ['open', 'accepted', 'revoked', 'expired', 'all'] as const

/** GET /api/ensembles/:id/invitations */
export const InvitationsQuery = z.object({
  status: z.enum(INVITATION_STATUSES).default('open'),
  page: z.coerce.number().int().min(1).max(100_000).default(1),
  pageSize: z.coerce.number().int().min(1).max(PAGE_SIZE_MAX).default(25),
})

/** Most rows one bulk invitation may hold. */
export const BULK_MAX_ROWS = 500
/** Largest pasted or uploaded file (characters); 500 rows fit many times over. */
export const BULK_MAX_CHARS = 400_000

/** POST /api/ensembles/:id/invitations/bulk-preview */
export const BulkPreviewBody = z.object({
  csv: z.string().max(BULK_MAX_CHARS, `The file is too large: at most ${BULK_MAX_ROWS} rows`),
}).strict()

/** POST /api/ensembles/:id/invitations/bulk: without sendGood, any bad row stops the whole file. */
export const BulkSendBody = BulkPreviewBody.extend({ sendGood: z.boolean().default(false) }).strict()

/** POST /api/invitations/:token/accept without a session (creates the account). */
export const AcceptBody = z.object({
  name: z.string().trim().min(1, 'Enter your name').max(120, 'Keep your name under 121 characters'),
  password: z.string().min(PASSWORD_MIN, `Use at least ${PASSWORD_MIN} characters`).max(200, 'That password is too long'),
})
export type AcceptBody = z.infer<typeof AcceptBody>

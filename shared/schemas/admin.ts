import { z } from 'zod'
import { PersonName } from './account'

// Bodies and queries of the admin routes, shared with the admin pages' forms and filters.

import { ENSEMBLE_KINDS } from '../types/ensemble'

export { ENSEMBLE_KINDS }

/** Rows per page of the admin tables. */
export const ADMIN_PAGE_SIZE = 25

const Page = z.coerce.number('Page must be a number').int().positive().max(100_000).default(1)
const PageSize = z.coerce.number().int().positive().max(100).default(ADMIN_PAGE_SIZE)
const Id = z.coerce.number().int().positive().max(Number.MAX_SAFE_INTEGER)

/** POST /api/admin/ensembles: a new ensemble and the address its first director is invited at. */
export const AdminEnsembleBody = z.object({
  name: PersonName.pipe(z.string().max(120)),
  kind: z.enum(ENSEMBLE_KINDS, 'Choose choir, brass band, wind band or mixed'),
  directorEmail: z.string().trim().toLowerCase().pipe(z.email('Enter an e-mail address like name@example.org').max(254)),
}).strict()
export type AdminEnsembleBody = z.infer<typeof AdminEnsembleBody>

/** PATCH /api/admin/ensembles/:id: archive or restore. */
export const AdminEnsemblePatch = z.object({ archived: z.boolean() }).strict()

/** PATCH /api/admin/users/:id: exactly one of disable/restore or grant/remove site admin. */
export const AdminUserPatch = z.union([
  z.object({ disabled: z.boolean() }).strict(),
  z.object({ siteAdmin: z.boolean() }).strict(),
], 'Send either {"disabled": true|false} or {"siteAdmin": true|false}')
export type AdminUserPatch = z.infer<typeof AdminUserPatch>

/** GET /api/admin/users */
export const AdminUsersQuery = z.object({
  q: z.string().trim().max(200).optional(),
  status: z.enum(['all', 'active', 'disabled', 'admin']).default('all'),
  page: Page,
  pageSize: PageSize,
})
export type AdminUsersQuery = z.infer<typeof AdminUsersQuery>

/** GET /api/admin/ensembles */
export const AdminEnsemblesQuery = z.object({
  q: z.string().trim().max(200).optional(),
  archived: z.enum(['all', 'open', 'archived']).default('all'),
  page: Page,
  pageSize: PageSize,
})
export type AdminEnsemblesQuery = z.infer<typeof AdminEnsemblesQuery>

/**
 * GET /api/admin/audit. `action` is an action name ("user.disabled") or its family ("user"),
 * empty values are no filter (so a form can send every field).
 */
export const AuditQuery = z.object({
  action: z.string().trim().max(60).regex(/^[a-z_.]*$/, 'Actions are lower-case words with dots').optional(),
  actorId: z.union([z.literal(''), Id]).optional(),
  ensembleId: z.union([z.literal(''), Id]).optional(),
  page: Page,
  pageSize: PageSize,
})
export type AuditQuery = z.infer<typeof AuditQuery>

import { z } from 'zod'
import { A4_MAX, A4_MIN, SystemOptions, TOLERANCE_MAX } from '../drill/schema'
import { Id } from './id'

// Take forms and the routes that receive them: one validation on both sides.

// Ids in plain decimal only ("01", "1e1" and "0x10" are refused, not read as other records).
const id = Id
const blankIsAbsent = z.literal('').transform(() => undefined)

/** Text fields of POST /api/takes (multipart; they must come before the `audio` file). */
export const TakeFields = z.object({
  drillId: id,
  part: z.string().trim().min(1).max(60),
  assignmentId: z.union([blankIsAbsent, id]).optional(),
  // A key the form makes once (a UUID); letters, digits and . _ : - are taken from scripts too.
  idempotencyKey: z.union([blankIsAbsent, z.string().trim().min(8).max(100).regex(/^[\w.:-]+$/, 'letters, digits and . _ : - only')]).optional(),
})
export type TakeFields = z.infer<typeof TakeFields>

/** POST /api/takes/:id/rescore */
export const RescoreBody = z.object({
  system: SystemOptions,
  a4: z.number().min(A4_MIN).max(A4_MAX).optional(),
  tolerance: z.number().positive().max(TOLERANCE_MAX).optional(),
})
export type RescoreBody = z.infer<typeof RescoreBody>

/** GET /api/takes query: `withdrawn=only` lists the withdrawn takes (directors see them). */
export const TakeListQuery = z.object({
  player: z.union([z.literal('me'), id]).optional(),
  drillId: id.optional(),
  assignmentId: id.optional(),
  withdrawn: z.enum(['include', 'only']).optional(),
  page: z.coerce.number().int().positive().max(100_000).default(1),
  pageSize: z.coerce.number().int().positive().max(100).default(20),
})
export type TakeListQuery = z.infer<typeof TakeListQuery>

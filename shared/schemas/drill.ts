// Shapes the drill editor form and the drill routes share (one schema on both sides).
import { z } from 'zod'
import { DrillDocument } from '../drill/schema'

/** PUT /api/drills/:id: the whole document and the version it was edited from. */
export const DrillUpdateBody = z.object({
  document: DrillDocument,
  version: z.number({ error: 'the version the drill was opened at is required' }).int().positive(),
})
export type DrillUpdateBody = z.infer<typeof DrillUpdateBody>

/** GET /api/ensembles/:id/drills: an optional search and which drills to list. */
export const DrillListQuery = z.object({
  q: z.string().trim().max(120, 'a search of at most 120 characters').optional(),
  status: z.enum(['active', 'archived', 'all']).default('active'),
})
export type DrillListQuery = z.infer<typeof DrillListQuery>

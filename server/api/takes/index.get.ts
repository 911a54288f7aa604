import { z } from 'zod'

const Query = z.object({
  player: z.union([z.literal('me'), z.coerce.number().int().positive()]).optional(),
  drillId: z.coerce.number().int().positive().optional(),
  assignmentId: z.coerce.number().int().positive().optional(),
  page: z.coerce.number().int().positive().max(100_000).default(1),
  pageSize: z.coerce.number().int().positive().max(100).default(20),
})

// GET /api/takes?player=me|<userId>&drillId=&assignmentId=&page=&pageSize= → { items, total, page, pageSize }
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const q = validateQuery(event, Query)
  return listTakes(useDb(), user, q)
})

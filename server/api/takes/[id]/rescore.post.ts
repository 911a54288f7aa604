import { z } from 'zod'
import { A4_MAX, A4_MIN, SystemOptions } from '../../../../shared/drill/schema'
import { rescoreTake } from '../../../utils/takes'

const Body = z.object({
  system: SystemOptions,
  a4: z.number().min(A4_MIN).max(A4_MAX).optional(),
  tolerance: z.number().positive().max(50).optional(),
})

// POST /api/takes/:id/rescore { system, a4?, tolerance? } → 200 { report }: the stored
// measurement scored against other targets; nothing is decoded or stored.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { id } = validateParams(event, IdParams)
  const body = await readJsonBody(event, Body)
  const db = useDb()
  const access = await requireTakeForUser(db, user, id)
  return rescoreTake(db, access, body)
})

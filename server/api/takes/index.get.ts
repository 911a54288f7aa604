import { TakeListQuery } from '../../../shared/schemas/take'
import type { TakeListPage } from '../../../shared/types/take'

// GET /api/takes?player=me|<userId>&drillId=&assignmentId=&withdrawn=only&page=&pageSize=
// → { items, total, page, pageSize }: the takes the caller may see, newest first.
export default defineEventHandler(async (event): Promise<TakeListPage> => {
  const user = await requireUser(event)
  const q = validateQuery(event, TakeListQuery)
  return listTakes(useDb(), user, q)
})

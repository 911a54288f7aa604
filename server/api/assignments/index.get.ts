import type { MyAssignment } from '../../../shared/types/assignment'

// GET /api/assignments → the caller's own open assignments:
// [{ id, drillId, drill, part, dueAt, status: due|overdue|submitted, latestTakeId, … }].
export default defineEventHandler(async (event): Promise<MyAssignment[]> => {
  const user = await requireUser(event)
  return listMyAssignments(useDb(), user.id)
})

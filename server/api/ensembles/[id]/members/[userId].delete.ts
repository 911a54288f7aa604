import { MemberParams } from '../../../../../shared/schemas/ensemble'

// DELETE /api/ensembles/:id/members/:userId (director) → 204; their takes stay with the ensemble.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { id, userId } = validateParams(event, MemberParams)
  const db = useDb()
  await requireEnsembleRole(db, user, id, 'director')
  const r = await removeMember(db, id, userId, actorOf(event, user))
  if (!r.ok && r.code === 'not_found') throw apiError(404, 'not_found', 'Member not found')
  if (!r.ok) throw apiError(409, 'last_director', 'The ensemble needs at least one director: make someone else director first')
  setResponseStatus(event, 204)
  return null
})

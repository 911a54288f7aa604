import { InvitationsQuery } from '../../../../../shared/schemas/ensemble'

// GET /api/ensembles/:id/invitations?status=open|accepted|revoked|expired|all&page=&pageSize= (director) → a page of invitations.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { id } = validateParams(event, IdParams)
  const query = validateQuery(event, InvitationsQuery)
  const db = useDb()
  await requireEnsembleRole(db, user, id, 'director')
  return listInvitations(db, id, query.status, query.page, query.pageSize)
})

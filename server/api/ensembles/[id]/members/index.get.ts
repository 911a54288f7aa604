import { MembersQuery } from '../../../../../shared/schemas/ensemble'

// GET /api/ensembles/:id/members?q=&role=&sectionId=&sort=&dir=&page=&pageSize= → { items, total, page, pageSize }.
// Every member sees names, roles and sections; only directors and site admins see (and search) e-mail addresses.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { id } = validateParams(event, IdParams)
  const query = validateQuery(event, MembersQuery)
  const db = useDb()
  const m = await requireMembership(db, user, id)
  return listMembers(db, id, query, seesEmails(user, m))
})

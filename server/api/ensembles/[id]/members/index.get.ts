import { MembersQuery } from '../../../../../shared/schemas/ensemble'

// GET /api/ensembles/:id/members?q=&role=&sectionId=&sort=&dir=&page=&pageSize= → { items, total, page, pageSize, onlySection }.
// Directors and site admins see every member with e-mail addresses; players see every member's name
// and section, never an address; a section leader sees their own section only, without addresses.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { id } = validateParams(event, IdParams)
  const query = validateQuery(event, MembersQuery)
  const db = useDb()
  const m = await requireMembership(db, user, id)
  const withEmail = seesEmails(user, m)
  const leader = !withEmail && m.role === 'section_leader'
  if (leader && query.sectionId !== undefined && query.sectionId !== (m.sectionId ?? 'none')) {
    throw apiError(403, 'own_section_only', 'Section leaders see the members of their own section only', { sectionId: m.sectionId })
  }
  return listMembers(db, id, query, { withEmail, onlySection: leader ? { sectionId: m.sectionId, userId: user.id } : undefined })
})

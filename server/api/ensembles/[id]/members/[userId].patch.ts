import { MemberParams, MemberPatch } from '../../../../../shared/schemas/ensemble'

// PATCH /api/ensembles/:id/members/:userId (director) with role, sectionId, instrument and/or reads → the member.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { id, userId } = validateParams(event, MemberParams)
  const db = useDb()
  await requireEnsembleRole(db, user, id, 'director')
  const body = await readJsonBody(event, MemberPatch)
  const r = await updateMember(db, id, userId, actorOf(event, user), body)
  if (r.ok) return r.member
  if (r.code === 'not_found') throw apiError(404, 'not_found', 'Member not found')
  if (r.code === 'section_not_found') throw apiError(400, 'invalid_input', 'Invalid input', { issues: [{ path: ['sectionId'], message: 'That section is not in this ensemble', code: 'section_not_found' }] })
  throw apiError(409, 'last_director', 'The ensemble needs at least one director: make someone else director first')
})

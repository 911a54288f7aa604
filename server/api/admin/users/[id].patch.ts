import { AdminUserPatch } from '../../../../shared/schemas/admin'

// PATCH /api/admin/users/:id {disabled} | {siteAdmin} → 200 and the user. A disabled account's
// live sessions are refused from its next request on.
export default defineEventHandler(async (event) => {
  const admin = await requireSiteAdmin(event)
  const { id } = validateParams(event, IdParams)
  const change = await readJsonBody(event, AdminUserPatch)
  const result = await changeUser(useDb(), admin.id, id, change, clientAddress(event))
  if (!result) throw apiError(404, 'not_found', 'User not found')
  if (!result.ok) throw apiError(409, result.code, 'You cannot change your own access; ask another site admin')
  return result.user
})

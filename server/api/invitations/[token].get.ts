import { TokenParams } from '../../../shared/schemas/ensemble'

// GET /api/invitations/:token (public) → { ensemble, role, section, email, hasAccount };
// unknown or forged → 404; used, revoked or expired → 410 with data.status.
export default defineEventHandler(async (event) => {
  const { token } = validateParams(event, TokenParams)
  const found = await findInvitationByToken(useDb(), token)
  if (!found) throw apiError(404, 'not_found', 'This invitation link is not valid')
  if (found.status !== 'open') throw invitationGone(found.status)
  return found.preview
})

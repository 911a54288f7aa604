import { ProfileBody } from '../../../shared/schemas/account'

// PATCH /api/account {name?, instrument?, pitchView?} → 200 and the profile.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const body = await readJsonBody(event, ProfileBody)
  const profile = await updateProfile(useDb(), user.id, body, clientAddress(event))
  if (!profile) throw apiError(404, 'not_found', 'Account not found')
  // The header shows the name kept in the session cookie.
  if (profile.name !== user.name) {
    const session = await getUserSession(event)
    await setUserSession(event, { user: { ...user, name: profile.name }, loggedInAt: Number(session.loggedInAt) })
  }
  return profile
})

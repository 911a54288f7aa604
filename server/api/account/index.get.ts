// GET /api/account → the caller's own profile.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const profile = await findProfile(useDb(), user.id)
  if (!profile) throw apiError(404, 'not_found', 'Account not found')
  return profile
})

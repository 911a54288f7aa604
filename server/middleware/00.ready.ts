// /api requests wait for start-up (migrations, demo seed); health answers on its own.
export default defineEventHandler(async (event) => {
  const path = event.path
  if (!path.startsWith('/api/') || path.startsWith('/api/health')) return
  try {
    await whenReady(30_000)
  } catch {
    const { state } = startupState()
    setResponseHeader(event, 'Retry-After', 5)
    throw apiError(503, state === 'failed' ? 'startup_failed' : 'starting', state === 'failed' ? 'Service unavailable' : 'Starting, try again shortly')
  }
})

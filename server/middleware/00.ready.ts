// /api requests wait for start-up (migrations, demo seed); health answers on its own.
// They only read the runtime settings, so they share the process's frozen copy: asked with the
// event, Nitro would otherwise clone the settings and apply the environment again for every
// request (about a millisecond each, most of a cached answer's cost).
export default defineEventHandler(async (event) => {
  const path = event.path
  const nitro = event.context.nitro as { runtimeConfig?: unknown } | undefined
  if (path.startsWith('/api/') && nitro && !nitro.runtimeConfig) nitro.runtimeConfig = useRuntimeConfig()
  if (!path.startsWith('/api/') || path.startsWith('/api/health')) return
  try {
    await whenReady(30_000)
  } catch {
    const { state } = startupState()
    setResponseHeader(event, 'Retry-After', 5)
    throw apiError(503, state === 'failed' ? 'startup_failed' : 'starting', state === 'failed' ? 'Service unavailable' : 'Starting, try again shortly')
  }
})

// Errors under /api/ are always answered as JSON. The page error handler would otherwise render
// an error page for a request that accepts HTML (a browser tab), and its sign-in guard would turn
// a 401 or 404 into a redirect to the sign-in page. Registered ahead of the page error handler in
// nuxt.config.ts; every other path falls through to it.
import { send, setResponseHeaders, setResponseStatus } from 'h3'
import type { NitroErrorHandler } from 'nitropack/types'

const apiErrorHandler: NitroErrorHandler = async (error, event, { defaultHandler }) => {
  const path = event.path
  if (path !== '/api' && !path.startsWith('/api/') && !path.startsWith('/api?')) return
  const res = await defaultHandler(error, event, { json: true })
  setResponseHeaders(event, res.headers)
  setResponseStatus(event, res.status, res.statusText)
  return send(event, JSON.stringify(res.body, null, 2))
}

export default apiErrorHandler

// Under /api/ every answer is JSON: a path no route has is 404 and a method its routes lack is
// 405 with Allow, here, before the request could reach the page renderer (which would redirect
// an anonymous caller to the sign-in page or answer with a page). HEAD is answered as GET
// without the body (Node sends no body for HEAD).
import { handlers } from '#nitro-internal-virtual/server-handlers'

// Built on the first request: the handler list includes this middleware, so it is not ready
// while this module is being loaded.
let table: RouteTable | null = null

export default defineEventHandler((event) => {
  const path = event.path
  if (path !== '/api' && !path.startsWith('/api/') && !path.startsWith('/api?')) return
  table ??= routeTable(handlers)
  const methods = table.methodsFor(path)
  if (methods === 'all') return
  if (!methods.size) throw apiError(404, 'not_found', 'No such API route')
  if (event.method === 'HEAD' && methods.has('GET')) {
    // The router only knows GET handlers; Node already knows this response has no body.
    event.node.req.method = 'GET'
    ;(event as unknown as { _method?: string })._method = 'GET'
    return
  }
  if (methods.has(event.method)) return
  const allow = [...methods].sort().join(', ')
  setResponseHeader(event, 'Allow', allow)
  throw apiError(405, 'method_not_allowed', 'Method not allowed', { allow })
})

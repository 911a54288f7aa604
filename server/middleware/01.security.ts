// Headers every answer carries, and a refusal of cross-site writes: the session cookie is
// SameSite=Lax, and this closes the remaining gap (form posts from another site). Pages replace
// the strict policy set here with their own (server/plugins/20.page-security.ts). Built apps
// also ask browsers to use HTTPS only (ignored by browsers on plain-HTTP answers). Development
// serves pages and Vite's modules (hot reload needs eval and a socket) without a policy: the
// strict one would stop every page's styles and scripts; JSON answers keep it there too.
const SAFE = new Set(['GET', 'HEAD', 'OPTIONS'])

function originAllowed (origin: string, host: string, baseUrl: string): boolean {
  try {
    const o = new URL(origin)
    if (o.host === host) return true
    // Behind a proxy the Host header may be internal; the public address is baseUrl.
    return baseUrl ? o.origin === new URL(baseUrl).origin : false
  } catch {
    return false
  }
}

export default defineEventHandler((event) => {
  setResponseHeaders(event, {
    'X-Content-Type-Options': 'nosniff',
    'Referrer-Policy': 'same-origin',
    'X-Frame-Options': 'DENY',
  })
  if (!import.meta.dev || event.path.startsWith('/api/')) setResponseHeader(event, 'Content-Security-Policy', NON_PAGE_POLICY)
  if (!import.meta.dev) setResponseHeader(event, 'Strict-Transport-Security', 'max-age=31536000; includeSubDomains')
  if (SAFE.has(event.method) || !event.path.startsWith('/api/')) return
  const site = getRequestHeader(event, 'sec-fetch-site')
  const origin = getRequestHeader(event, 'origin')
  const crossSite = site === 'cross-site'
    || (origin != null && !originAllowed(origin, getRequestHost(event, { xForwardedHost: false }), String(useRuntimeConfig().baseUrl || '')))
  if (crossSite) throw apiError(403, 'cross_site', 'Cross-site request refused')
})

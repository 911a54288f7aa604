// Headers every answer carries, and a refusal of cross-site writes: the session cookie is
// SameSite=Lax, and this closes the remaining gap (form posts from another site).
const SAFE = new Set(['GET', 'HEAD', 'OPTIONS'])

export default defineEventHandler((event) => {
  setResponseHeaders(event, {
    'X-Content-Type-Options': 'nosniff',
    'Referrer-Policy': 'same-origin',
    'X-Frame-Options': 'DENY',
  })
  if (SAFE.has(event.method) || !event.path.startsWith('/api/')) return
  const site = getRequestHeader(event, 'sec-fetch-site')
  const origin = getRequestHeader(event, 'origin')
  let crossSite = site === 'cross-site'
  if (!crossSite && origin && origin !== 'null') {
    try {
      crossSite = new URL(origin).host !== getRequestHost(event, { xForwardedHost: false })
    } catch {
      crossSite = true
    }
  } else if (origin === 'null') {
    crossSite = true
  }
  if (crossSite) throw apiError(403, 'cross_site', 'Cross-site request refused')
})

// Paths: router patterns as regular expressions, and safe places to return to after sign-in.

const PARAM = /(:\w+(?:\([^)]*\))?[?*+]?)/

/** A router path pattern ("/takes/:id()", "/:slug(.*)*") as a regular expression. */
export function routePatternToRegExp(pattern: string): RegExp {
  const body = pattern.split(PARAM).map((part) => {
    if (!part.startsWith(':')) return part.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')
    if (part.includes('(.*)')) return '.*'
    return part.endsWith('?') ? '[^/]*' : '[^/]+'
  }).join('')
  return new RegExp(`^${body}/?$`)
}

const AUTH_PAGES = ['/login', '/forgot-password', '/reset-password']

/** A same-site path to return to after sign-in; anything else (other sites, sign-in pages) gives "/". */
export function safeRedirect(value: unknown): string {
  const v = Array.isArray(value) ? value[0] : value
  if (typeof v !== 'string' || !v.startsWith('/') || v.startsWith('//') || v.startsWith('/\\')) return '/'
  const path = v.split(/[?#]/)[0]!
  if (AUTH_PAGES.includes(path)) return '/'
  return v
}

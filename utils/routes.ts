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

/** The screens an error state can send someone back to, nearest first, with how a link names them. */
const PLACES: Array<[RegExp, string]> = [
  [/^\/ensembles\/[^/]+$/, 'the ensemble'],
  [/^\/ensembles$/, 'your ensembles'],
  [/^\/drills$/, 'the drills'],
  [/^\/takes$/, 'the takes'],
  [/^\/assignments$/, 'your assignments'],
  [/^\/charts$/, 'the charts'],
  [/^\/review$/, 'the review queue'],
  [/^\/admin$/, 'the admin area'],
]

/**
 * Where a page that cannot be shown (403, 404) sends someone: the nearest screen above its path
 * that exists ("/takes/6" → the takes), else the home page; null on the home page itself.
 */
export function wayBack(path: string, exists: (path: string) => boolean): { to: string, label: string } | null {
  const segments = path.split(/[?#]/)[0]!.split('/').filter(Boolean)
  if (!segments.length) return null
  for (let n = segments.length - 1; n > 0; n--) {
    const up = `/${segments.slice(0, n).join('/')}`
    const place = PLACES.find(([re]) => re.test(up))
    if (place && exists(up)) return { to: up, label: place[1] }
  }
  return { to: '/', label: 'your home page' }
}

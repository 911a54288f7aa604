// Which methods the app's routes answer for a path, from Nitro's handler list. Lets /api/ answer
// 404 for a path no route has and 405 (with Allow) for a method a route lacks, as JSON, instead
// of falling through to the page renderer.

export interface RouteEntry { route?: string, method?: string, middleware?: boolean }

const escape = (s: string) => s.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')

/** A route pattern ("/api/takes/:id", "/api/files/**") as a regular expression over the raw path. */
export function routePattern (route: string): RegExp {
  const segments = route.split('/').filter(Boolean).map((seg) => {
    if (seg === '**' || seg.startsWith('**:')) return '(?:/.*)?'
    if (seg.startsWith(':')) return '/[^/]+'
    return '/' + escape(seg)
  })
  return new RegExp(`^${segments.join('')}/?$`)
}

export interface RouteTable {
  /** Upper-case methods routes answer at this path; 'all' when a route takes every method. */
  methodsFor: (path: string) => Set<string> | 'all'
}

export function routeTable (entries: readonly RouteEntry[], prefix = '/api'): RouteTable {
  const routes = entries
    .filter(e => !e.middleware && e.route && (e.route === prefix || e.route.startsWith(prefix + '/')))
    .map(e => ({ re: routePattern(e.route!), method: e.method ? e.method.toUpperCase() : 'ALL' }))
  return {
    methodsFor (path) {
      const p = path.split('?')[0]!
      const methods = new Set<string>()
      for (const r of routes) {
        if (!r.re.test(p)) continue
        if (r.method === 'ALL') return 'all'
        methods.add(r.method)
      }
      if (methods.has('GET')) methods.add('HEAD')
      return methods
    },
  }
}

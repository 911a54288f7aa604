/**
 * Whether the app has a page for a path, so links are only drawn to screens that exist. Matches
 * the route table directly rather than `router.resolve`, which warns about every miss.
 */
export function useRouteExists() {
  const router = useRouter()
  let patterns: RegExp[] | null = null
  return (path: string) => {
    // A catch-all (a custom 404 page) would match everything, so it does not count.
    patterns ??= router.getRoutes().filter(r => !r.path.includes('(.*)')).map(r => routePatternToRegExp(r.path))
    const p = path.split(/[?#]/)[0]!
    return patterns.some(re => re.test(p))
  }
}

/** Whether the app has a page for a path, so links are only drawn to screens that exist. */
export function useRouteExists() {
  const router = useRouter()
  return (path: string) => {
    try {
      return router.resolve(path).matched.length > 0
    } catch {
      return false
    }
  }
}

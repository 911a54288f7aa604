import type { HomeData } from '#shared/types/home'

/**
 * The home page's data and which sections the caller's roles call for. Lazy: the server render
 * still waits for it, but a click on "Home" shows the page (and its skeleton) at once.
 */
export function useHome() {
  const res = useFetch<HomeData>('/api/home', { key: 'home', lazy: true })
  const roles = computed(() => new Set(res.data.value?.memberships.map(m => m.role) ?? []))
  const sections = computed(() => ({
    due: roles.value.has('player') || (res.data.value?.due.length ?? 0) > 0,
    review: roles.value.has('director') || roles.value.has('section_leader'),
    summary: roles.value.has('director'),
    recent: roles.value.has('player') || (res.data.value?.recent.length ?? 0) > 0,
  }))
  return Object.assign(res, { roles, sections })
}

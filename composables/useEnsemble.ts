import type { Ref } from 'vue'
import type { EnsembleDetail, InvitationItem, MemberPage, Page } from '#shared/types/ensemble'

/** GET /api/ensembles/:id: settings and sections. */
export function useEnsemble(id: Ref<number>) {
  return useFetch<EnsembleDetail>(() => `/api/ensembles/${id.value}`, { key: `ensemble:${id.value}` })
}

export interface MemberFilters {
  q: string
  role: '' | 'director' | 'section_leader' | 'player'
  sectionId: '' | 'none' | number
  sort: 'name' | 'role' | 'section' | 'instrument'
  dir: 'asc' | 'desc'
  page: number
  pageSize: number
}

/** GET /api/ensembles/:id/members with the filters; refetches when they change. */
export function useMembers(id: Ref<number>, filters: Ref<MemberFilters>) {
  const query = computed(() => {
    const f = filters.value
    const q: Record<string, string | number> = { sort: f.sort, dir: f.dir, page: f.page, pageSize: f.pageSize }
    if (f.q.trim()) q.q = f.q.trim()
    if (f.role) q.role = f.role
    if (f.sectionId !== '') q.sectionId = f.sectionId
    return q
  })
  return useFetch<MemberPage>(() => `/api/ensembles/${id.value}/members`, { key: `members:${id.value}`, query, watch: [query] })
}

/** GET /api/ensembles/:id/invitations with a status and page. */
export function useInvitations(id: Ref<number>, status: Ref<string>, page: Ref<number>) {
  const query = computed(() => ({ status: status.value, page: page.value, pageSize: 20 }))
  return useFetch<Page<InvitationItem>>(() => `/api/ensembles/${id.value}/invitations`, { key: `invitations:${id.value}`, query, watch: [query] })
}

/** The ensemble id of the current route (0 when the path holds no number). */
export function useEnsembleId() {
  const route = useRoute()
  return computed(() => {
    const n = Number(route.params.id)
    return Number.isInteger(n) && n > 0 ? n : 0
  })
}

import type { Ref } from 'vue'
import type { AdminEnsemble, AdminUser, AuditItem, Paged } from '#shared/types/admin'

type Query = Record<string, string | number | undefined>

/** Drops empty filters so the address and the request stay short. */
function clean(q: Query): Record<string, string | number> {
  return Object.fromEntries(Object.entries(q).filter(([, v]) => v !== undefined && v !== '')) as Record<string, string | number>
}

/** One page of users for the admin area (GET /api/admin/users). */
export function useAdminUsers(query: Ref<Query>) {
  return useFetch<Paged<AdminUser>>('/api/admin/users', { key: 'admin:users', query: computed(() => clean(query.value)), watch: [query] })
}

/** One page of ensembles for the admin area (GET /api/admin/ensembles). */
export function useAdminEnsembles(query: Ref<Query>) {
  return useFetch<Paged<AdminEnsemble>>('/api/admin/ensembles', { key: 'admin:ensembles', query: computed(() => clean(query.value)), watch: [query] })
}

/** One page of the audit log (GET /api/admin/audit). */
export function useAuditLog(query: Ref<Query>) {
  return useFetch<Paged<AuditItem>>('/api/admin/audit', { key: 'admin:audit', query: computed(() => clean(query.value)), watch: [query] })
}

/** The values the audit filters offer. */
export function useAuditFacets() {
  return useFetch<{ actions: string[], actors: { id: number, name: string, email: string }[], ensembles: { id: number, name: string }[] }>(
    '/api/admin/audit/facets', { key: 'admin:audit-facets' })
}

import type { DrillDocument } from '#shared/drill/schema'
import type { DrillListItem } from '#shared/types/drill-view'
import type { DrillArchiveState, DrillCreated, DrillDefaults, DrillUpdated } from '#shared/types/drill'
import type { MyEnsemble } from './useMyEnsembles'

export interface EnsembleDrills {
  ensemble: MyEnsemble
  drills: DrillListItem[]
  /** Set when this ensemble's list could not be loaded; the others still show. */
  error: string | null
}

/** Which drills to list: a search over titles, part names and keys, and active/archived (directors). */
export interface DrillFilter {
  q?: MaybeRefOrGetter<string | undefined>
  status?: MaybeRefOrGetter<'active' | 'archived' | 'all' | undefined>
}

/** Drills of every ensemble the caller belongs to (archived ensembles left out), grouped by ensemble. */
export function useDrills(filter: DrillFilter = {}) {
  // Forwards the session cookie during the server render (plain $fetch would not).
  const request = useRequestFetch()
  const key = computed(() => `drills:mine:${toValue(filter.status) ?? 'active'}:${toValue(filter.q)?.trim() ?? ''}`)
  return useAsyncData<EnsembleDrills[]>(key, async () => {
    const ensembles = await request<MyEnsemble[]>('/api/ensembles')
    const active = ensembles.filter(e => !e.archived)
    const q = toValue(filter.q)?.trim() || undefined
    const wanted = toValue(filter.status) ?? 'active'
    return Promise.all(active.map(async (ensemble) => {
      // Archived drills are the directors' to see; everyone else gets the active ones.
      const status = directsEnsemble(ensemble.role) ? wanted : 'active'
      try {
        const drills = await request<DrillListItem[]>(`/api/ensembles/${ensemble.id}/drills`, { query: { q, status } })
        return { ensemble, drills, error: null }
      }
      catch (err) {
        return { ensemble, drills: [], error: apiProblem(err, 'The drills of this ensemble could not be loaded.').message }
      }
    }))
  }, { default: () => [] })
}

/** Writes to drills: create, save a new version, copy, archive and restore (each a plain $fetch). */
export function useDrillActions() {
  return {
    create: (ensembleId: number, document: DrillDocument) =>
      $fetch<DrillCreated>(`/api/ensembles/${ensembleId}/drills`, { method: 'POST', body: document }),
    update: (drillId: number, document: DrillDocument, version: number) =>
      $fetch<DrillUpdated>(`/api/drills/${drillId}`, { method: 'PUT', body: { document, version } }),
    duplicate: (drillId: number) => $fetch<DrillCreated>(`/api/drills/${drillId}/duplicate`, { method: 'POST' }),
    archive: (drillId: number) => $fetch<DrillArchiveState>(`/api/drills/${drillId}/archive`, { method: 'POST' }),
    restore: (drillId: number) => $fetch<DrillArchiveState>(`/api/drills/${drillId}/restore`, { method: 'POST' }),
  }
}

/** Where a new drill in an ensemble starts (its defaults and sections); directors only. */
export function useDrillDefaults(ensembleId: MaybeRefOrGetter<number | null>) {
  return useFetch<DrillDefaults>(() => `/api/ensembles/${toValue(ensembleId) ?? 0}/drills/defaults`, {
    key: computed(() => `drill-defaults:${toValue(ensembleId)}`),
    immediate: toValue(ensembleId) != null,
  })
}

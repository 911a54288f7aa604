import type { DrillListItem } from '#shared/types/drill-view'
import type { MyEnsemble } from './useMyEnsembles'

export interface EnsembleDrills {
  ensemble: MyEnsemble
  drills: DrillListItem[]
  /** Set when this ensemble's list could not be loaded; the others still show. */
  error: string | null
}

/** Drills of every ensemble the caller belongs to (archived ensembles left out), grouped by ensemble. */
export function useDrills() {
  // Forwards the session cookie during the server render (plain $fetch would not).
  const request = useRequestFetch()
  return useAsyncData<EnsembleDrills[]>('drills:mine', async () => {
    const ensembles = await request<MyEnsemble[]>('/api/ensembles')
    const active = ensembles.filter(e => !e.archived)
    return Promise.all(active.map(async (ensemble) => {
      try {
        const drills = await request<DrillListItem[]>(`/api/ensembles/${ensemble.id}/drills`)
        return { ensemble, drills, error: null }
      }
      catch (err) {
        return { ensemble, drills: [], error: apiProblem(err, 'The drills of this ensemble could not be loaded.').message }
      }
    }))
  }, { default: () => [] })
}

import type { EnsembleKind } from '#shared/types/ensemble'
import type { EnsembleRole } from '#shared/types/user'

/** One row of GET /api/ensembles: an ensemble and the caller's role in it. */
export interface MyEnsemble {
  id: number
  name: string
  kind: EnsembleKind
  role: EnsembleRole | null
  sectionCount: number
  memberCount: number
  archived: boolean
}

/** The caller's ensembles; shared by the navigation and the Ensembles page through one key. */
export function useMyEnsembles() {
  return useFetch<MyEnsemble[]>('/api/ensembles', { key: 'ensembles:mine', default: () => [] })
}

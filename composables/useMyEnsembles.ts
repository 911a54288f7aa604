export type EnsembleRole = 'director' | 'section_leader' | 'player'

/** One row of GET /api/ensembles: an ensemble and the caller's role in it. */
export interface MyEnsemble {
  id: number
  name: string
  kind: 'choir' | 'band' | 'ensemble'
  role: EnsembleRole | null
  sectionCount: number
  memberCount: number
  archived: boolean
}

/** The caller's ensembles; shared by the navigation and the Ensembles page through one key. */
export function useMyEnsembles() {
  return useFetch<MyEnsemble[]>('/api/ensembles', { key: 'ensembles:mine', default: () => [] })
}

/** Words for roles (the stored values stay machine-like). */
export function roleLabel(role: string | null | undefined): string {
  switch (role) {
    case 'director': return 'Director'
    case 'section_leader': return 'Section leader'
    case 'player': return 'Player'
    case 'admin': return 'Site admin'
    default: return 'No role'
  }
}

export function kindLabel(kind: string | null | undefined): string {
  switch (kind) {
    case 'choir': return 'Choir'
    case 'band': return 'Band'
    case 'ensemble': return 'Ensemble'
    default: return kind ?? '—'
  }
}

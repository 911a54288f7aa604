import type { EnsembleRole } from './useMyEnsembles'

export type TakeStatus = 'queued' | 'analysing' | 'analysed' | 'failed'

export interface HomeMembership {
  ensembleId: number
  ensembleName: string
  role: EnsembleRole
  sectionId: number | null
  sectionName: string | null
}
export interface HomeDue {
  assignmentId: number
  ensembleId: number
  ensembleName: string
  drillId: number
  drillTitle: string
  part: string
  dueAt: string | null
  submitted: boolean
}
export interface HomeReview {
  takeId: number
  ensembleName: string
  playerName: string
  sectionName: string | null
  drillTitle: string
  part: string
  status: TakeStatus
  submittedAt: string
  meanAbsCents: number | null
  tolerance?: number
}
export interface HomeRecent {
  takeId: number
  drillTitle: string
  part: string
  status: TakeStatus
  createdAt: string
  meanAbsCents: number | null
  withinToleranceShare: number | null
  tolerance?: number
}
export interface HomeEnsembleSummary {
  ensembleId: number
  ensembleName: string
  takesAnalysed: number
  meanAbsCents: number | null
  withinToleranceShare: number | null
  tolerance?: number
}
/** GET /api/home */
export interface HomeData {
  user: { id: number, email: string, name: string, siteRole: 'admin' | null }
  memberships: HomeMembership[]
  due: HomeDue[]
  toReview: HomeReview[]
  recent: HomeRecent[]
  ensembleSummary: HomeEnsembleSummary[]
}

/** A drill's tolerance when a row does not carry its own (the drill document's default). */
export const DEFAULT_TOLERANCE = 10

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

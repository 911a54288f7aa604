import type { TakeStatusName } from './useTake'

/** A row of GET /api/takes. */
export interface TakeRow {
  id: number
  drillId: number
  drillTitle: string
  part: string
  playerName: string
  status: TakeStatusName
  createdAt: string
  meanAbsCents: number | null
  withinToleranceShare: number | null
  withdrawn: boolean
}

export interface TakePage {
  items: TakeRow[]
  total: number
  page: number
  pageSize: number
}

/** Filters of the take list; `player` is 'me', a user id, or empty for every take the caller may see. */
export interface TakeFilters {
  player?: string
  drillId?: string | number
  assignmentId?: string | number
  page?: number
  pageSize?: number
}

export const DEFAULT_PAGE_SIZE = 20

/** The query GET /api/takes receives: empty filters left out, page from 1. */
export function takeQuery(f: TakeFilters): Record<string, string | number> {
  const q: Record<string, string | number> = {
    page: Math.max(1, Math.floor(Number(f.page) || 1)),
    pageSize: Math.min(100, Math.max(1, Math.floor(Number(f.pageSize) || DEFAULT_PAGE_SIZE))),
  }
  if (f.player) q.player = String(f.player)
  if (f.drillId) q.drillId = String(f.drillId)
  if (f.assignmentId) q.assignmentId = String(f.assignmentId)
  return q
}

/** One page of takes; refetches whenever the filters change. */
export function useTakes(filters: MaybeRefOrGetter<TakeFilters>) {
  const query = computed(() => takeQuery(toValue(filters)))
  return useFetch<TakePage>('/api/takes', {
    key: computed(() => `takes:${new URLSearchParams(Object.entries(query.value).map(([k, v]) => [k, String(v)])).toString()}`),
    query,
    default: () => ({ items: [], total: 0, page: 1, pageSize: DEFAULT_PAGE_SIZE }),
  })
}

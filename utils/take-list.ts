// The take list's filters as the query GET /api/takes reads.

/** Filters of the take list; `player` is 'me', a user id, or empty for every take the caller may see. */
export interface TakeFilters {
  player?: string
  drillId?: string | number
  assignmentId?: string | number
  /** 'only': the withdrawn takes (a director restores them from there). */
  withdrawn?: string
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
  if (f.withdrawn === 'only') q.withdrawn = 'only'
  return q
}


import type { MyAssignment } from '#shared/types/assignment'

/** The caller's own open assignments (GET /api/assignments). */
export function useMyAssignments() {
  return useFetch<MyAssignment[]>('/api/assignments', { key: 'assignments:mine', default: () => [] })
}

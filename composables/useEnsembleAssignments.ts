import type { Ref } from 'vue'
import type { AssignmentList } from '#shared/types/assignment'
import type { EnsembleDetail, MemberItem, Page } from '#shared/types/ensemble'
import type { DrillListItem } from '#shared/types/drill-view'

/**
 * An ensemble's assignments a page at a time, with what the assignment form needs: its sections,
 * members (every page) and active drills. Nothing is fetched while `ensembleId` is null.
 */
export function useEnsembleAssignments(ensembleId: Readonly<Ref<number | null>>, opts: { page: Ref<number>, archived: Ref<boolean>, withForm: Readonly<Ref<boolean>> }) {
  // The request's cookies go with the calls made while the server draws the page.
  const $fetch = useRequestFetch()
  const list = useAsyncData<AssignmentList | null>(
    () => `assignments:${ensembleId.value}:${opts.page.value}:${opts.archived.value}`,
    () => ensembleId.value
      ? $fetch<AssignmentList>(`/api/ensembles/${ensembleId.value}/assignments`, { query: { page: opts.page.value, pageSize: 20, ...(opts.archived.value ? { archived: 'include' } : {}) } })
      : Promise.resolve(null),
    { watch: [ensembleId, opts.page, opts.archived] },
  )
  const formData = useAsyncData(
    () => `assignment-form:${ensembleId.value}:${opts.withForm.value}`,
    async () => {
      if (!ensembleId.value || !opts.withForm.value) return null
      const id = ensembleId.value
      const [ensemble, drills] = await Promise.all([
        $fetch<EnsembleDetail>(`/api/ensembles/${id}`),
        $fetch<DrillListItem[]>(`/api/ensembles/${id}/drills`),
      ])
      const members: MemberItem[] = []
      for (let page = 1; page <= 20; page++) {
        const p = await $fetch<Page<MemberItem>>(`/api/ensembles/${id}/members`, { query: { page, pageSize: 100 } })
        members.push(...p.items)
        if (members.length >= p.total || !p.items.length) break
      }
      return { ensemble, drills, members }
    },
    { watch: [ensembleId, opts.withForm] },
  )
  return { list, formData }
}

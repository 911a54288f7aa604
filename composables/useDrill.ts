import type { DrillView } from '#shared/types/drill-view'

/** The drill with its targets in the drill's own system; `assignmentId` lets the server preselect the assigned part. */
export function useDrill(id: MaybeRefOrGetter<string | number>, opts: { immediate?: boolean, assignmentId?: MaybeRefOrGetter<string | number | null | undefined> } = {}) {
  const query = computed(() => {
    const a = toValue(opts.assignmentId)
    return a ? { assignmentId: String(a) } : {}
  })
  return useFetch<DrillView>(() => `/api/drills/${encodeURIComponent(String(toValue(id)))}`, {
    key: computed(() => `drill:${toValue(id)}:${query.value.assignmentId ?? ''}`),
    query,
    immediate: opts.immediate ?? true,
  })
}

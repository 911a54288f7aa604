import type { TakeListPage } from '#shared/types/take'

/** One page of takes; refetches whenever the filters change. */
export function useTakes(filters: MaybeRefOrGetter<TakeFilters>) {
  const query = computed(() => takeQuery(toValue(filters)))
  return useFetch<TakeListPage>('/api/takes', {
    key: computed(() => `takes:${new URLSearchParams(Object.entries(query.value).map(([k, v]) => [k, String(v)])).toString()}`),
    query,
    default: () => ({ items: [], total: 0, page: 1, pageSize: DEFAULT_PAGE_SIZE }),
  })
}

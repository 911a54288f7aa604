import type { EnsembleStats } from '#shared/types/stats'
import type { ChartChoices, ChartSeries } from '#shared/types/charts'

/** The statistics and chart series of one ensemble for a query (null: nothing to ask yet); both refetch when it changes. */
export function useCharts(ensembleId: MaybeRefOrGetter<number | null>, query: MaybeRefOrGetter<Record<string, string> | null>) {
  // Forwards the session cookie during the server render (plain $fetch would not).
  const request = useRequestFetch()
  const key = computed(() => `${toValue(ensembleId)}?${queryString(toValue(query) ?? {})}`)
  const ask = <T>(path: string) => () => {
    const id = toValue(ensembleId)
    const q = toValue(query)
    return id == null || q == null ? Promise.resolve(null) : request<T>(`/api/ensembles/${id}/${path}`, { query: q })
  }
  const stats = useAsyncData<EnsembleStats | null>(() => `charts-stats:${key.value}`, ask<EnsembleStats>('stats'), { default: () => null })
  const series = useAsyncData<ChartSeries | null>(() => `charts-series:${key.value}`, ask<ChartSeries>('charts'), { default: () => null })
  return { stats, series }
}

/** What the caller may chart in one ensemble (sections, players, drills, assignments). */
export function useChartChoices(ensembleId: MaybeRefOrGetter<number | null>) {
  const request = useRequestFetch()
  return useAsyncData<ChartChoices | null>(() => `charts-choices:${toValue(ensembleId)}`, () => {
    const id = toValue(ensembleId)
    return id == null ? Promise.resolve(null) : request<ChartChoices>(`/api/ensembles/${id}/charts/choices`)
  }, { default: () => null })
}

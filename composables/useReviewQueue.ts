import type { ReviewQueuePage } from '#shared/types/review'

/** One page of the caller's review queue; refetches whenever the filters change. */
export function useReviewQueue(filters: MaybeRefOrGetter<ReviewQueueFilters>) {
  const query = computed(() => reviewQueueQuery(toValue(filters)))
  return useFetch<ReviewQueuePage>('/api/reviews/queue', {
    key: computed(() => `review-queue:${new URLSearchParams(query.value).toString()}`),
    query,
  })
}

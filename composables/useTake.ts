import type { TakeDetail, TakeLiveState, TakeStatusName } from '#shared/types/take'

/** The take with its report; `refresh` reloads it after a change. */
export function useTake(id: MaybeRefOrGetter<string | number>) {
  return useFetch<TakeDetail>(() => `/api/takes/${encodeURIComponent(String(toValue(id)))}`, {
    key: computed(() => `take:${toValue(id)}`),
  })
}

const POLL_MS = 2000
const SETTLED: TakeStatusName[] = ['analysed', 'failed']

/**
 * Follows a take's analysis live: server-sent events on /api/takes/:id/events, falling back to
 * polling GET /api/takes/:id when the stream is unavailable or drops. Calls `onSettled` once
 * when the take ends analysed or failed. Client only; stops when the calling scope ends.
 */
export function useTakeLive(
  id: MaybeRefOrGetter<number | null | undefined>,
  initial: MaybeRefOrGetter<TakeLiveState | null | undefined>,
  onSettled?: (s: TakeLiveState) => void,
  opts: { pollMs?: number } = {},
) {
  const pollMs = opts.pollMs ?? POLL_MS
  const state = ref<TakeLiveState | null>(toValue(initial) ?? null)
  const mode = ref<'idle' | 'stream' | 'poll'>('idle')
  let source: EventSource | null = null
  let timer: ReturnType<typeof setTimeout> | null = null
  let stopped = false
  let settledFor: number | null = null

  function apply(next: TakeLiveState, takeId: number) {
    state.value = { status: next.status, progress: Number.isFinite(next.progress) ? next.progress : 0, error: next.error ?? null }
    if (SETTLED.includes(next.status)) {
      close()
      if (settledFor !== takeId) {
        settledFor = takeId
        onSettled?.(state.value)
      }
    }
  }

  function close() {
    source?.close()
    source = null
    if (timer) clearTimeout(timer)
    timer = null
    mode.value = 'idle'
  }

  function poll(takeId: number) {
    mode.value = 'poll'
    timer = setTimeout(async () => {
      if (stopped) return
      try {
        const t = await $fetch<TakeDetail>(`/api/takes/${takeId}`)
        apply({ status: t.status, progress: t.progress, error: t.error }, takeId)
      }
      catch { /* a missed poll is retried on the next tick */ }
      if (!stopped && state.value && !SETTLED.includes(state.value.status)) poll(takeId)
    }, pollMs)
  }

  function start() {
    close()
    const takeId = toValue(id)
    const s = toValue(initial)
    if (s) state.value = { ...s }
    if (!takeId || !s || SETTLED.includes(s.status)) return
    stopped = false
    if (typeof EventSource === 'undefined') return poll(takeId)
    try {
      source = new EventSource(`/api/takes/${takeId}/events`)
    }
    catch {
      return poll(takeId)
    }
    mode.value = 'stream'
    source.addEventListener('status', (ev) => {
      try { apply(JSON.parse((ev as MessageEvent).data), takeId) }
      catch { /* a malformed event is ignored; the poll fallback still reaches the end */ }
    })
    source.onerror = () => {
      // The browser would retry the stream on its own; polling is steadier behind proxies.
      if (!source) return
      source.close()
      source = null
      if (!stopped) poll(takeId)
    }
  }

  onMounted(() => {
    watch(() => [toValue(id), toValue(initial)?.status], start, { immediate: true })
  })
  onScopeDispose(() => {
    stopped = true
    close()
  })

  return { state, mode, restart: start }
}

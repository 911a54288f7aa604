import type { SystemOptions } from '#shared/drill/schema'
import { issueLine } from './useDrills'

export type TakeStatusName = 'queued' | 'analysing' | 'analysed' | 'failed'

/** One held note of a take report (the `driftline analyze --json` hold plus the extras). */
export interface TakeHold {
  index: number
  note: string | null
  member: string | null
  startS: number
  endS: number
  targetHz: number | null
  detectedHz: number | null
  centsFromTarget: number | null
  centsFromEqual: number | null
  spreadCents: number | null
  slopeCentsPerS: number | null
  confidence: number | null
  withinTolerance: boolean | null
  reason: string | null
  writtenNote?: string | null
  equalHz?: number | null
  vibrato?: { rateHz: number, extentCents: number } | null
  /** Decimated f0 track: [seconds into the take, Hz]. */
  trace?: [number, number][] | null
}

export interface TakeSummaryFigures {
  meanAbsCents: number | null
  withinToleranceShare: number | null
  driftCentsPerMin: number | null
  holdsFound: number
  holdsExpected: number
}

/** The take report: the shape of `driftline analyze --json` plus extras. */
export interface TakeReport {
  take: { durationS: number, sampleRate: number, channels: number }
  system: SystemOptions | string
  a4: number
  part: string
  tolerance?: number
  holds: TakeHold[]
  summary: TakeSummaryFigures
  memberBias?: Record<string, number | null>
  /** How the system was set up, in words. */
  description?: string
  warnings?: { code: string, message: string }[]
}

export interface TakeError { code: string, message: string }

export interface EarlierTake { id: number, createdAt: string, meanAbsCents: number | null, withinToleranceShare: number | null }

/** GET /api/takes/:id */
export interface TakeDetail {
  id: number
  status: TakeStatusName
  progress: number
  error: TakeError | null
  report: TakeReport | null
  drill: { id: number, title: string }
  part: string
  player: { id: number, name: string }
  assignmentId: number | null
  createdAt: string
  withdrawnAt: string | null
  canWithdraw: boolean
  canRestore: boolean
  canRescore: boolean
  canReanalyse?: boolean
  audioUrl: string
  mime: string
  earlier: EarlierTake[]
}

/** What a status event and the poll both carry. */
export interface TakeLiveState { status: TakeStatusName, progress: number, error: TakeError | null }

/** Unsigned figure with a unit; a dash for a missing value. */
export function formatFigure(value: number | null | undefined, digits: number, unit = ''): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return '—'
  const s = value.toFixed(digits).replace('-', '\u2212')
  return unit ? `${s} ${unit}` : s
}

/** What each analysis error code means to a player, and what to do about it. */
const ERROR_HELP: Record<string, string> = {
  not_audio: 'This file is not audio Driftline can read. Send WAV, FLAC, MP3, Ogg or WebM/Opus.',
  corrupt: 'The audio file is damaged or was cut off part-way. Export or record it again and send it once more.',
  empty: 'The file has no audio in it.',
  silent: 'The recording is silent. Check that the right microphone is chosen and not muted, then record again.',
  clipped: 'The recording is heavily clipped (too loud). Move back from the microphone or lower the input level, then record again.',
  too_long: 'The take is longer than 20 minutes. Trim it to the drill and send it again.',
  too_large: 'The file is larger than 200 MB. Send a shorter or compressed recording.',
  unknown_part: 'This drill has no part by that name. Choose one of the drill’s parts.',
  no_holds: 'None of the drill’s held notes were found in the recording. Check that you recorded the chosen part of this drill.',
  upload_aborted: 'The upload was cut off before it finished. Your file is still here: send it again.',
  drill_not_found: 'This drill is not in any of your ensembles.',
  drill_archived: 'This drill is archived and takes no new takes.',
  assignment_not_found: 'That assignment was not found in this drill’s ensemble. Open the take form from the assignment again.',
  assignment_mismatch: 'That assignment is for another drill. Open the take form from the assignment again.',
  storage_unavailable: 'Storage is not available just now. Your file is still here: send it again in a moment.',
  audio_missing: 'The stored audio of this take could not be found.',
  analysis_error: 'The analysis stopped with an internal error. Run it again; if it fails again, tell your director.',
  analysis_interrupted: 'The analysis was interrupted too often. Run it again.',
}

/** A clear message for an analysis or upload error code, falling back to the server's text. */
export function takeErrorMessage(code: string | null | undefined, fallback?: string | null): string {
  if (code && ERROR_HELP[code]) return ERROR_HELP[code]
  return fallback || 'Something went wrong while handling this take.'
}

/** The take with its report; `refresh` reloads it after a change. */
export function useTake(id: MaybeRefOrGetter<string | number>) {
  return useFetch<TakeDetail>(() => `/api/takes/${encodeURIComponent(String(toValue(id)))}`, {
    key: computed(() => `take:${toValue(id)}`),
  })
}

/** Re-scores a take's stored measurement against another system; the server does not decode again. */
export function rescoreTake(id: number, body: { system: SystemOptions, a4?: number, tolerance?: number }) {
  return $fetch<{ report: TakeReport }>(`/api/takes/${id}/rescore`, { method: 'POST', body })
}

/** Queues the take for a fresh analysis. */
export function reanalyseTake(id: number) {
  return $fetch<{ status: TakeStatusName }>(`/api/takes/${id}/reanalyse`, { method: 'POST' })
}

/** Withdraws (player) or restores (director) a take. */
export function setTakeWithdrawn(id: number, withdrawn: boolean) {
  return $fetch(`/api/takes/${id}/${withdrawn ? 'withdraw' : 'restore'}`, { method: 'POST' })
}

/** Answer of POST /api/takes (202 new, 200 the same take again for a repeated idempotency key). */
export interface TakeCreated { id: number, status: TakeStatusName }

/** A failed upload, with the HTTP status (0 when the server was not reached) and the server's code. */
export class TakeUploadError extends Error {
  constructor(message: string, readonly status: number, readonly code: string | null, readonly issues: string[] = []) {
    super(message)
    this.name = 'TakeUploadError'
  }
}

function uploadErrorFromResponse(status: number, body: unknown): TakeUploadError {
  const b = (body ?? {}) as { statusMessage?: string, message?: string, data?: { code?: string, message?: string, issues?: { path?: (string | number)[] | string | null, message?: string }[] } }
  const code = b.data?.code ?? null
  const issues = (b.data?.issues ?? []).map(issueLine)
  let message: string
  if (code && ERROR_HELP[code]) message = ERROR_HELP[code]
  else if (status === 401) message = 'Your session has ended. Sign in again, then send the take.'
  else if (status === 403) message = 'Your role in this ensemble does not allow sending this take.'
  else if (status === 404) message = 'This drill is not in any of your ensembles.'
  else if (status === 413) message = ERROR_HELP.too_large!
  else if (status === 415) message = ERROR_HELP.not_audio!
  else if (status === 429) message = 'Too many uploads at once. Wait a moment and send again.'
  else if (status >= 500) message = 'The server could not store the take. Your file is still here: send it again in a moment.'
  else message = b.data?.message || b.statusMessage || b.message || `The upload was refused (${status}).`
  return new TakeUploadError(message, status, code, issues)
}

/**
 * Sends a take with XMLHttpRequest so the upload can report progress (fetch cannot).
 * `onProgress` gets the share of bytes sent, 0..1.
 */
export function uploadTake(form: FormData, onProgress?: (share: number) => void, signal?: AbortSignal): Promise<TakeCreated> {
  return new Promise((resolve, reject) => {
    const xhr = new XMLHttpRequest()
    xhr.open('POST', '/api/takes')
    xhr.setRequestHeader('Accept', 'application/json')
    xhr.upload.onprogress = (e: ProgressEvent) => {
      if (e.lengthComputable && e.total > 0) onProgress?.(Math.min(1, e.loaded / e.total))
    }
    xhr.onload = () => {
      let body: unknown = null
      try { body = xhr.responseText ? JSON.parse(xhr.responseText) : null }
      catch { body = null }
      if (xhr.status >= 200 && xhr.status < 300 && body && typeof body === 'object' && 'id' in body) {
        onProgress?.(1)
        resolve(body as TakeCreated)
      }
      else if (xhr.status >= 200 && xhr.status < 300) {
        reject(new TakeUploadError('The server answered without a take. Send it again.', xhr.status, null))
      }
      else reject(uploadErrorFromResponse(xhr.status, body))
    }
    xhr.onerror = () => reject(new TakeUploadError('The connection dropped during the upload. Your file is still here: send it again.', 0, 'network'))
    xhr.ontimeout = xhr.onerror
    xhr.onabort = () => reject(new TakeUploadError('The upload was cancelled.', 0, 'aborted'))
    signal?.addEventListener('abort', () => xhr.abort(), { once: true })
    xhr.send(form)
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

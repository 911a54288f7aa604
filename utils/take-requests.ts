// Requests the take pages make besides fetching (rescore, re-run, withdraw, upload) and the
// words for the codes a take can fail or be refused with.
import type { RescoreBody } from '#shared/schemas/take'
import type { TakeCreated, TakeRescored, TakeStatusName, TakeUploadLimits, TakeWithdrawal } from '#shared/types/take'

/** What each analysis error code means to a player, and what to do about it. */
const ERROR_HELP: Record<string, string> = {
  not_audio: 'This file is not audio Driftline can read. Send WAV, FLAC, MP3, Ogg, WebM/Opus or M4A/AAC.',
  corrupt: 'The audio file is damaged or was cut off part-way. Export or record it again and send it once more.',
  empty: 'The file has no audio in it.',
  silent: 'The recording is silent. Check that the right microphone is chosen and not muted, then record again.',
  clipped: 'The recording is heavily clipped (too loud). Move back from the microphone or lower the input level, then record again.',
  too_long: 'The take is longer than the longest take allowed. Trim it to the drill and send it again.',
  too_large: 'The file is larger than the largest upload allowed. Send a shorter or compressed recording.',
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

/** "200 MB", "1.5 MB", "800 KB". */
export function formatBytes(bytes: number): string {
  if (bytes >= 1024 * 1024) return `${Number((bytes / 1024 / 1024).toFixed(1))} MB`
  if (bytes >= 1024) return `${Math.round(bytes / 1024)} KB`
  return `${bytes} B`
}

/** "20 minutes", "1 minute", "45 seconds". */
export function formatDuration(seconds: number): string {
  if (seconds >= 60 && seconds % 60 === 0) return `${seconds / 60} minute${seconds === 60 ? '' : 's'}`
  if (seconds >= 60) return `${Number((seconds / 60).toFixed(1))} minutes`
  return `${Math.round(seconds)} second${Math.round(seconds) === 1 ? '' : 's'}`
}

/**
 * A clear message for an analysis or upload error code, falling back to the server's text; with
 * the upload limits the size and length messages name them.
 */
export function takeErrorMessage(code: string | null | undefined, fallback?: string | null, limits?: Partial<TakeUploadLimits> | null): string {
  if (code === 'too_large' && limits?.maxBytes) return `The file is larger than ${formatBytes(limits.maxBytes)}. Send a shorter or compressed recording.`
  if (code === 'too_long' && limits?.maxDurationS) return `The take is longer than ${formatDuration(limits.maxDurationS)}. Trim it to the drill and send it again.`
  if (code && ERROR_HELP[code]) return ERROR_HELP[code]
  return fallback || 'Something went wrong while handling this take.'
}

/** Re-scores a take's stored measurement against another system; the server does not decode again. */
export function requestRescore(id: number, body: RescoreBody) {
  return $fetch<TakeRescored>(`/api/takes/${id}/rescore`, { method: 'POST', body })
}

/** Queues the take for a fresh analysis. */
export function requestReanalysis(id: number) {
  return $fetch<{ status: TakeStatusName }>(`/api/takes/${id}/reanalyse`, { method: 'POST' })
}

/** Withdraws (player) or restores (director) a take. */
export function requestWithdrawal(id: number, withdrawn: boolean) {
  return $fetch<TakeWithdrawal>(`/api/takes/${id}/${withdrawn ? 'withdraw' : 'restore'}`, { method: 'POST' })
}

/** A failed upload, with the HTTP status (0 when the server was not reached) and the server's code. */
export class TakeUploadError extends Error {
  constructor(message: string, readonly status: number, readonly code: string | null, readonly issues: string[] = []) {
    super(message)
    this.name = 'TakeUploadError'
  }
}

function uploadErrorFromResponse(status: number, body: unknown): TakeUploadError {
  const p = apiProblem({ status, data: body }, `The upload was refused (${status}).`)
  const limits = { maxBytes: Number(p.details.maxBytes) || undefined, maxDurationS: Number(p.details.maxDurationS) || undefined }
  let message: string
  if (p.code && ERROR_HELP[p.code]) message = takeErrorMessage(p.code, null, limits)
  else if (status === 401) message = 'Your session has ended. Sign in again, then send the take.'
  else if (status === 403) message = 'Your role in this ensemble does not allow sending this take.'
  else if (status === 404) message = 'This drill is not in any of your ensembles.'
  else if (status === 413) message = takeErrorMessage('too_large', null, limits)
  else if (status === 415) message = ERROR_HELP.not_audio!
  else if (status === 429) message = 'Too many uploads at once. Wait a moment and send again.'
  else if (status >= 500) message = 'The server could not store the take. Your file is still here: send it again in a moment.'
  else message = p.message
  return new TakeUploadError(message, status, p.code, p.issues)
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


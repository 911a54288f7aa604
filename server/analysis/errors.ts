/** Stable error codes of the analysis engine; routes and the CLI map them to statuses and exit messages. */
export type AnalysisErrorCode =
  | 'not_audio'
  | 'corrupt'
  | 'empty'
  | 'silent'
  | 'clipped'
  | 'too_long'
  | 'too_large'
  | 'unknown_part'
  | 'no_holds'

/** HTTP status per code: 415 unreadable type, 413 over a size/length limit, 400 a request the user can fix, 422 audio we read but cannot score. */
export const ANALYSIS_ERROR_STATUS: Readonly<Record<AnalysisErrorCode, number>> = Object.freeze({
  not_audio: 415,
  corrupt: 422,
  empty: 422,
  silent: 422,
  clipped: 422,
  too_long: 413,
  too_large: 413,
  unknown_part: 400,
  no_holds: 422,
})

/** Short fixed messages shown to users; anything variable goes in `details`. */
export const ANALYSIS_ERROR_MESSAGE: Readonly<Record<AnalysisErrorCode, string>> = Object.freeze({
  not_audio: 'This file is not an audio format Driftline can read',
  corrupt: 'The audio file is damaged or cut short',
  empty: 'The audio file is empty',
  silent: 'The recording is silent',
  clipped: 'The recording is too heavily clipped to measure',
  too_long: 'The recording is longer than the allowed length',
  too_large: 'The file is larger than the allowed size',
  unknown_part: 'That part is not in the drill',
  no_holds: 'No held notes could be found in the recording',
})

/** Error raised for input the analysis cannot use; carries a stable `code` and its HTTP `status`. */
export class AnalysisError extends Error {
  readonly code: AnalysisErrorCode
  readonly status: number
  readonly details?: Record<string, unknown>

  constructor (code: AnalysisErrorCode, details?: Record<string, unknown>, message?: string) {
    super(message ?? ANALYSIS_ERROR_MESSAGE[code])
    this.name = 'AnalysisError'
    this.code = code
    this.status = ANALYSIS_ERROR_STATUS[code]
    if (details !== undefined) this.details = details
  }
}

/** True when `err` is an AnalysisError (also across module copies, by shape). */
export function isAnalysisError (err: unknown): err is AnalysisError {
  return err instanceof AnalysisError ||
    (err instanceof Error && err.name === 'AnalysisError' && typeof (err as { code?: unknown }).code === 'string')
}

import { createError } from 'h3'

/** An HTTP error with short fixed text and a stable `code` (plus details) in `data`. */
export function apiError (status: number, code: string, message: string, details: Record<string, unknown> = {}) {
  return createError({ statusCode: status, statusMessage: message, message, data: { code, ...details } })
}

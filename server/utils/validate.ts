import type { H3Event } from 'h3'
import { getQuery, getRequestHeader, getRouterParams, readRawBody } from 'h3'
import { z } from 'zod'
import { apiError } from './errors'
import { Id } from '../../shared/schemas/id'
import { plainIssueMessage } from '../../shared/text'

/** Zod issues in the plain shape every 400 carries in `data.issues`. */
export function formatIssues (error: z.ZodError) {
  return error.issues.map(i => ({ path: i.path.map(p => (typeof p === 'symbol' ? String(p) : p)), message: i.message, code: i.code }))
}

function parseOr400<T extends z.ZodType> (schema: T, value: unknown): z.output<T> {
  const result = schema.safeParse(value, { error: plainIssueMessage })
  if (!result.success) throw apiError(400, 'invalid_input', 'Invalid input', { issues: formatIssues(result.error) })
  return result.data
}

/** `application/json`, with or without parameters such as a charset. */
export function isJsonContentType (type: string | null | undefined): boolean {
  return /^application\/json\s*(;|$)/i.test(String(type ?? '').trim())
}

/** 415 for a body that is not JSON where JSON is expected. */
export function unsupportedMediaType () {
  return apiError(415, 'unsupported_media_type', 'Send the body as application/json', { expected: 'application/json' })
}

/**
 * Reads a JSON body and validates it: 415 `unsupported_media_type` for a body of another type,
 * 400 `invalid_json` when unreadable, 400 `invalid_input` with issues.
 */
export async function readJsonBody<T extends z.ZodType> (event: H3Event, schema: T): Promise<z.output<T>> {
  const type = getRequestHeader(event, 'content-type')
  if (type && !isJsonContentType(type)) throw unsupportedMediaType()
  const raw = await readRawBody(event, 'utf8')
  let value: unknown
  try {
    value = raw == null || raw === '' ? undefined : JSON.parse(raw)
  } catch {
    throw apiError(400, 'invalid_json', 'Body is not valid JSON')
  }
  if (value === undefined) throw apiError(400, 'invalid_json', 'Body is not valid JSON')
  return parseOr400(schema, value)
}

/** Validates the route params (400 with issues). */
export function validateParams<T extends z.ZodType> (event: H3Event, schema: T): z.output<T> {
  return parseOr400(schema, getRouterParams(event, { decode: true }))
}

/** Validates the query string (400 with issues). */
export function validateQuery<T extends z.ZodType> (event: H3Event, schema: T): z.output<T> {
  return parseOr400(schema, getQuery(event))
}

/** `:id` route param as a positive integer in plain decimal (anything else is 400). */
export const IdParams = z.object({ id: Id })

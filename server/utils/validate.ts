import type { H3Event } from 'h3'
import { getQuery, getRouterParams, readRawBody } from 'h3'
import { z } from 'zod'
import { apiError } from './errors'

/** Zod issues in the plain shape every 400 carries in `data.issues`. */
export function formatIssues (error: z.ZodError) {
  return error.issues.map(i => ({ path: i.path.map(p => (typeof p === 'symbol' ? String(p) : p)), message: i.message, code: i.code }))
}

function parseOr400<T extends z.ZodType> (schema: T, value: unknown): z.output<T> {
  const result = schema.safeParse(value)
  if (!result.success) throw apiError(400, 'invalid_input', 'Invalid input', { issues: formatIssues(result.error) })
  return result.data
}

/** Reads a JSON body and validates it: 400 `invalid_json` when unreadable, 400 `invalid_input` with issues. */
export async function readJsonBody<T extends z.ZodType> (event: H3Event, schema: T): Promise<z.output<T>> {
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

/** `:id` route param as a positive integer. */
export const IdParams = z.object({ id: z.coerce.number().int().positive().max(Number.MAX_SAFE_INTEGER) })

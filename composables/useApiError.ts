/** What the pages need from a failed $fetch/useFetch: status, the server's short text, field issues. */
export interface ApiProblem {
  status: number | null
  message: string
  /** The server's stable error code (`data.code`), when it sent one. */
  code: string | null
  /** First message per top-level field, from zod issues the server returns in `data`. */
  fields: Record<string, string>
  /** Seconds from a Retry-After header, when present. */
  retryAfterS: number | null
}

interface IssueLike { path?: (string | number)[], message?: string }

function issuesOf(data: unknown): IssueLike[] {
  if (!data || typeof data !== 'object') return []
  const d = data as Record<string, unknown>
  for (const c of [d.issues, d.data, (d.data as Record<string, unknown> | undefined)?.issues]) {
    if (Array.isArray(c)) return c as IssueLike[]
  }
  return []
}

/** Reads a FetchError (or anything thrown) into an ApiProblem without ever throwing. */
export function apiProblem(err: unknown, fallback = 'Something went wrong. Try again.'): ApiProblem {
  const e = (err ?? {}) as {
    statusCode?: number, status?: number, data?: unknown, message?: string, statusMessage?: string
    response?: { status?: number, headers?: Headers }
  }
  const status = e.statusCode ?? e.status ?? e.response?.status ?? null
  const body = (e.data && typeof e.data === 'object' ? e.data : {}) as Record<string, unknown>
  let message = fallback
  for (const m of [body.message, body.statusMessage, e.statusMessage]) {
    if (typeof m === 'string' && m.trim() && !/^\[(GET|POST|PUT|PATCH|DELETE)\]/.test(m)) { message = m; break }
  }
  if (status == null) message = 'The server could not be reached. Check your connection and try again.'
  const fields: Record<string, string> = {}
  for (const issue of issuesOf(body.data ?? body)) {
    const key = issue.path?.[0]
    if (key != null && issue.message && !(String(key) in fields)) fields[String(key)] = issue.message
  }
  const ra = e.response?.headers?.get?.('retry-after')
  let retryAfterS: number | null = null
  if (ra) {
    const n = Number(ra)
    if (Number.isFinite(n)) retryAfterS = Math.max(0, n)
    else {
      const t = Date.parse(ra)
      if (Number.isFinite(t)) retryAfterS = Math.max(0, Math.round((t - Date.now()) / 1000))
    }
  }
  const details = (body.data && typeof body.data === 'object' ? body.data : {}) as Record<string, unknown>
  if (retryAfterS == null && typeof details.retryAfterS === 'number' && Number.isFinite(details.retryAfterS)) {
    retryAfterS = Math.max(0, details.retryAfterS)
  }
  const code = typeof details.code === 'string' ? details.code : null
  return { status, message, code, fields, retryAfterS }
}

/** "Too many attempts, try again in N minutes" from a Retry-After in seconds. */
export function tooManyAttemptsMessage(retryAfterS: number | null): string {
  if (retryAfterS == null) return 'Too many attempts, try again in a few minutes'
  const minutes = Math.max(1, Math.ceil(retryAfterS / 60))
  return `Too many attempts, try again in ${minutes} ${minutes === 1 ? 'minute' : 'minutes'}`
}

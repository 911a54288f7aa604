// The one reader of a failed request: $fetch/useFetch errors and raw response bodies (the
// upload's XMLHttpRequest) become an ApiProblem with the server's short text, code and issues.

/** What the pages need from a failed request: status, the server's short text, field issues. */
export interface ApiProblem {
  status: number | null
  message: string
  /** The server's stable error code (`data.code`), when it sent one. */
  code: string | null
  /** First message per top-level field, from zod issues the server returns in `data`. */
  fields: Record<string, string>
  /** Every issue as a line ("chords.2.notes.Alto: …"). */
  issues: string[]
  /** The rest of the server's `data` (details such as `message`, `path`, `expected`). */
  details: Record<string, unknown>
  /** Seconds from a Retry-After header, when present. */
  retryAfterS: number | null
}

/** A field issue as the server sends it in `data.issues` (zod: path array; tuning: dotted string). */
interface IssueLike { path?: (string | number)[] | string | null, message?: string }

function issuesOf(data: unknown): IssueLike[] {
  if (!data || typeof data !== 'object') return []
  const d = data as Record<string, unknown>
  for (const c of [d.issues, d.data, (d.data as Record<string, unknown> | undefined)?.issues]) {
    if (Array.isArray(c)) return c as IssueLike[]
  }
  return []
}

/** "chords.2.notes.Alto: …" from either path form. */
export function issueLine(issue: IssueLike): string {
  const path = Array.isArray(issue.path) ? issue.path.join('.') : issue.path ?? ''
  return `${path ? `${path}: ` : ''}${typeof issue.message === 'string' ? issue.message : 'invalid'}`
}

/**
 * Reads a FetchError, anything thrown, or `{ status, data: body }` of a raw response into an
 * ApiProblem without ever throwing.
 */
export function apiProblem(err: unknown, fallback = 'Something went wrong. Try again.'): ApiProblem {
  const e = (err ?? {}) as {
    statusCode?: number, status?: number, data?: unknown, message?: string, statusMessage?: string
    response?: { status?: number, headers?: Headers }
  }
  const raw = e.statusCode ?? e.status ?? e.response?.status ?? null
  const status = typeof raw === 'number' && raw > 0 ? raw : null
  const body = (e.data && typeof e.data === 'object' ? e.data : {}) as Record<string, unknown>
  let message = fallback
  for (const m of [body.message, body.statusMessage, e.statusMessage]) {
    if (typeof m === 'string' && m.trim() && !/^\[(GET|POST|PUT|PATCH|DELETE)\]/.test(m)) { message = m; break }
  }
  if (status == null) message = 'The server could not be reached. Check your connection and try again.'
  const fields: Record<string, string> = {}
  const list = issuesOf(body.data ?? body)
  for (const issue of list) {
    const key = Array.isArray(issue.path) ? issue.path[0] : null
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
  return { status, message, code, fields, issues: list.map(issueLine), details, retryAfterS }
}

/** Clear lines for a failed request: a sentence for the status, the server's text, then each issue. */
export function problemLines(err: unknown, fallback: string): string[] {
  const p = apiProblem(err, fallback)
  const lines: string[] = []
  if (p.status === 401) lines.push('Your session has ended. Sign in again.')
  else if (p.status === 403) lines.push('Your role in this ensemble does not allow this.')
  else if (p.status === 429) lines.push('Too many requests. Wait a moment and try again.')
  else if (p.status == null || p.status < 500) lines.push(p.message)
  const inner = typeof p.details.message === 'string' ? p.details.message : null
  const path = typeof p.details.path === 'string' ? p.details.path : null
  if (inner && !lines.includes(inner)) lines.push(path ? `${inner} (at ${path})` : inner)
  if (typeof p.details.expected === 'string') lines.push(`Expected: ${p.details.expected}.`)
  for (const line of p.issues) {
    if (!lines.includes(line) && !(inner && line.endsWith(inner))) lines.push(line)
  }
  if (!lines.length) lines.push(fallback)
  return lines
}

/** "Too many attempts, try again in N minutes" from a Retry-After in seconds. */
export function tooManyAttemptsMessage(retryAfterS: number | null): string {
  if (retryAfterS == null) return 'Too many attempts, try again in a few minutes'
  const minutes = Math.max(1, Math.ceil(retryAfterS / 60))
  return `Too many attempts, try again in ${minutes} ${minutes === 1 ? 'minute' : 'minutes'}`
}

/**
 * Whether asking again can help: no answer at all, a timeout, too many requests or a server
 * fault. Any other 4xx (403 not allowed, 404 not found or not yours, 400/422 refused input) gives
 * the same answer until something else changes.
 */
export function isRetryable(status: number | null): boolean {
  return status == null || status >= 500 || status === 408 || status === 429
}

import type { SystemOptions } from '#shared/drill/schema'
import type { MyEnsemble } from './useMyEnsembles'

/** A row of GET /api/ensembles/:id/drills. */
export interface DrillRow {
  id: number
  title: string
  key: string
  tempo: number
  a4: number
  system: SystemOptions
  tolerance: number
  parts: { name: string, instrument?: string | null }[]
  chords: number
  createdAt: string
}

export interface EnsembleDrills {
  ensemble: MyEnsemble
  drills: DrillRow[]
  /** Set when this ensemble's list could not be loaded; the others still show. */
  error: string | null
}

/** 201 of POST /api/ensembles/:id/drills/import */
export interface DrillImportResult {
  id: number
  parts: string[]
  chords: number
}

/** Drills of every ensemble the caller belongs to (archived ensembles left out), grouped by ensemble. */
export function useDrills() {
  // Forwards the session cookie during the server render (plain $fetch would not).
  const request = useRequestFetch()
  return useAsyncData<EnsembleDrills[]>('drills:mine', async () => {
    const ensembles = await request<MyEnsemble[]>('/api/ensembles')
    const active = ensembles.filter(e => !e.archived)
    return Promise.all(active.map(async (ensemble) => {
      try {
        const drills = await request<DrillRow[]>(`/api/ensembles/${ensemble.id}/drills`)
        return { ensemble, drills, error: null }
      }
      catch (err) {
        return { ensemble, drills: [], error: apiProblem(err, 'The drills of this ensemble could not be loaded.').message }
      }
    }))
  }, { default: () => [] })
}

/** Sends a drill file (JSON document or Standard MIDI File) to be imported into an ensemble. */
export function importDrill(ensembleId: number, file: File, title?: string): Promise<DrillImportResult> {
  const body = new FormData()
  body.append('file', file, file.name)
  if (title && title.trim()) body.append('title', title.trim())
  return $fetch<DrillImportResult>(`/api/ensembles/${ensembleId}/drills/import`, { method: 'POST', body })
}

/** A field issue as the server sends it in `data.issues` (zod: path array; tuning: dotted string). */
interface Issue { path?: (string | number)[] | string | null, message?: string }

/** "chords.2.notes.Alto: …" from either path form. */
export function issueLine(issue: Issue): string {
  const path = Array.isArray(issue.path) ? issue.path.join('.') : issue.path ?? ''
  return `${path ? `${path}: ` : ''}${issue.message ?? 'invalid'}`
}

/** Clear lines for a failed request: the server's fixed message plus any field issues in `data`. */
export function fetchErrorLines(err: unknown, fallback: string): string[] {
  const e = err as { statusCode?: number, status?: number, statusMessage?: string, data?: Record<string, unknown> }
  const status = e?.statusCode ?? e?.status
  const data = (e?.data ?? {}) as { statusMessage?: string, message?: string, data?: Record<string, unknown> }
  // $fetch puts the h3 error body in `data`; its own `data` holds { code, issues, … }.
  const inner = (data.data ?? {}) as { code?: string, message?: string, path?: string | null, expected?: string, issues?: Issue[] }
  const lines: string[] = []
  const head = data.statusMessage ?? e?.statusMessage
  if (status === 401) lines.push('Your session has ended. Sign in again.')
  else if (status === 403) lines.push('Your role in this ensemble does not allow this.')
  else if (status === 429) lines.push('Too many requests. Wait a moment and try again.')
  else if (head && status && status < 500) lines.push(head)
  if (inner.message && !lines.includes(inner.message)) lines.push(inner.path ? `${inner.message} (at ${inner.path})` : inner.message)
  if (inner.expected) lines.push(`Expected: ${inner.expected}.`)
  for (const issue of inner.issues ?? []) {
    const line = issueLine(issue)
    if (!lines.includes(line) && !(inner.message && line.endsWith(inner.message))) lines.push(line)
  }
  if (!lines.length) lines.push(status === undefined || status === 0 ? 'The server could not be reached. Check the connection and try again.' : fallback)
  return lines
}

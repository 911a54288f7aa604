// Filters of the ensemble statistics and the holds CSV (query strings), shared by the routes and
// the charts page.
import { z } from 'zod'
import { A4_MAX, A4_MIN, SYSTEM_NAMES } from '../drill/schema'

/** Longest Scala text a filter takes (characters; percent-encoded it may triple). */
export const SCALA_FILTER_MAX = 4_000

const Id = z.string().regex(/^[1-9]\d{0,15}$/, 'a positive whole number').transform(Number)
/** A date (YYYY-MM-DD, UTC) or an ISO 8601 instant. */
const When = z.string().refine(v => /^\d{4}-\d{2}-\d{2}(T[\d:.]+(Z|[+-]\d{2}:\d{2})?)?$/.test(v) && Number.isFinite(Date.parse(v)), 'a date such as 2026-03-01')
const Num = (min: number, max: number) => z.string().regex(/^\d+(\.\d+)?$/, 'a number').transform(Number).pipe(z.number().min(min).max(max))

export const StatsQuery = z.strictObject({
  sectionId: Id.optional(),
  userId: Id.optional(),
  drillId: Id.optional(),
  assignmentId: Id.optional(),
  from: When.optional(),
  to: When.optional(),
  system: z.enum(SYSTEM_NAMES).optional(),
  seventh: z.enum(['harmonic', '5-limit']).optional(),
  tonic: z.string().min(1).max(4).optional(),
  start: z.string().min(1).max(4).optional(),
  wolf: z.string().min(1).max(4).optional(),
  fraction: z.string().min(1).max(12).optional(),
  // The scale travels in the address: kept well under the server's 16 KB limit on request headers.
  scala: z.string().min(1).max(SCALA_FILTER_MAX, 'too long for a filter (4,000 characters at most, comments left out)').optional(),
  a4: Num(A4_MIN, A4_MAX).optional(),
  tolerance: Num(0.01, 50).optional(),
}).superRefine((q, ctx) => {
  if (q.from && q.to && rangeStart(q.from) >= rangeEnd(q.to)) {
    ctx.addIssue({ code: 'custom', path: ['to'], message: '"to" must not be before "from"' })
  }
  if (q.system === 'scala' && !q.scala) ctx.addIssue({ code: 'custom', path: ['scala'], message: 'choose a Scala .scl file to score against' })
  for (const k of ['seventh', 'tonic', 'start', 'wolf', 'fraction', 'scala'] as const) {
    if (q[k] !== undefined && !q.system) ctx.addIssue({ code: 'custom', path: [k], message: `"${k}" is an option of a tuning system: give "system" too` })
  }
})
export type StatsQuery = z.output<typeof StatsQuery>

/** First instant of a `from` filter. */
export function rangeStart(v: string): string {
  return new Date(v.length === 10 ? `${v}T00:00:00.000Z` : v).toISOString()
}

/** First instant after a `to` filter (a date includes its whole day). */
export function rangeEnd(v: string): string {
  if (v.length === 10) return new Date(Date.parse(`${v}T00:00:00.000Z`) + 86400_000).toISOString()
  return new Date(Date.parse(v) + 1).toISOString()
}

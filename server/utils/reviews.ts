// Reviews as data: who may review a take, saving a review with its notes in one transaction, and
// the reviews a take report shows. These return data or a refusal code and never throw HTTP
// errors; the route turns refusals into statuses.
import type { Knex } from 'knex'
import type { SessionUser } from '../../shared/types/user'
import type { ReportHold, TakeReport } from '../../shared/types/take'
import type { ReviewMark, ReviewNote, TakeReview } from '../../shared/types/review'
import type { ReviewBody, ReviewVerdict } from '../../shared/schemas/review'
import { holdIndexAt } from '../../shared/review'
import type { Membership } from './auth'
import { membershipFor } from './access'
import { toTake, type TakeRecord } from './takes'
import { writeAudit } from './audit'
import { apiError } from './errors'

export type ReviewAccess =
  | { ok: true, take: TakeRecord, membership: Membership }
  | { ok: false, refused: 'not_found' | 'forbidden' | 'own_take' | 'other_section' }

/**
 * Whether the caller may review the take: a director of its ensemble (or a site admin acting as
 * one) or the leader of the player's section, never the player themself. Not a member of the
 * ensemble: not_found; a member in another role or section: forbidden / other_section.
 */
export async function reviewAccess (db: Knex, user: SessionUser, takeId: number): Promise<ReviewAccess> {
  const row = await db('takes').where({ id: takeId }).first()
  if (!row) return { ok: false, refused: 'not_found' }
  const take = toTake(row)
  const membership = await membershipFor(db, user, take.ensembleId)
  if (!membership) return { ok: false, refused: 'not_found' }
  if (take.userId === user.id) return { ok: false, refused: 'own_take' }
  if (membership.role === 'director') return { ok: true, take, membership }
  if (membership.role !== 'section_leader') return { ok: false, refused: 'forbidden' }
  const pm = await db('memberships').where({ ensemble_id: take.ensembleId, user_id: take.userId }).first('section_id')
  if (membership.sectionId == null || pm?.section_id !== membership.sectionId) return { ok: false, refused: 'other_section' }
  // A withdrawn take is hidden from section leaders (as everywhere else).
  if (take.withdrawnAt) return { ok: false, refused: 'not_found' }
  return { ok: true, take, membership }
}

/** The take's timeline: its current report's holds and its length in seconds (null when unknown). */
export async function takeTimeline (db: Knex, take: TakeRecord): Promise<{ holds: ReportHold[], durationS: number | null }> {
  const [an, t] = await Promise.all([
    db('analyses').where({ take_id: take.id, is_current: true }).first('report'),
    db('takes').where({ id: take.id }).first('duration_s'),
  ])
  const report = an?.report ? JSON.parse(an.report) as TakeReport : null
  const d = report?.take.durationS ?? (t?.duration_s == null ? null : Number(t.duration_s))
  return { holds: report?.holds ?? [], durationS: d != null && Number.isFinite(d) && d > 0 ? d : null }
}

export type NoteProblem = { index: number, code: 'note_outside_take' | 'no_timeline', atS: number, durationS: number | null }

/** The first pinned note that does not fall inside the take, or null when all do. */
export function notePlacementProblem (notes: ReviewBody['notes'], durationS: number | null): NoteProblem | null {
  for (const [index, n] of (notes ?? []).entries()) {
    if (n.atS == null) continue
    if (durationS == null) return { index, code: 'no_timeline', atS: n.atS, durationS }
    if (n.atS > durationS) return { index, code: 'note_outside_take', atS: n.atS, durationS }
  }
  return null
}

export interface SavedReview { id: number, created: boolean, verdict: ReviewVerdict, notes: number }

/**
 * Creates the reviewer's review of the take or replaces it (one per reviewer and take), with its
 * notes, in one transaction: either all of it is saved or none of it.
 */
export async function saveReview (db: Knex, reviewerId: number, take: TakeRecord, body: ReviewBody, holds: ReportHold[]): Promise<SavedReview> {
  return db.transaction(async (trx) => {
    const now = new Date().toISOString()
    const existing = await trx('reviews').where({ take_id: take.id, reviewer_id: reviewerId }).first('id', 'verdict', 'summary')
    let id: number
    if (existing) {
      id = existing.id
      const change: Record<string, unknown> = { verdict: body.verdict, updated_at: now }
      if (body.summary !== undefined) change.summary = body.summary || null
      await trx('reviews').where({ id }).update(change)
    } else {
      const [row] = await trx('reviews').insert({ take_id: take.id, reviewer_id: reviewerId, verdict: body.verdict, summary: body.summary || null, created_at: now, updated_at: now }).returning('id')
      id = typeof row === 'object' ? row.id : row
    }
    if (body.notes !== undefined) {
      await trx('review_notes').where({ review_id: id }).delete()
      for (const n of body.notes) {
        const atS = n.atS ?? null
        await trx('review_notes').insert({ review_id: id, at_s: atS, hold_index: holdIndexAt(holds, atS), body: n.body, created_at: now, updated_at: now })
      }
    }
    const notes = Number((await trx('review_notes').where({ review_id: id }).count({ n: 'id' }))[0]!.n)
    await writeAudit(trx, {
      actorId: reviewerId,
      action: existing ? 'review.updated' : 'review.created',
      subjectType: 'take',
      subjectId: take.id,
      ensembleId: take.ensembleId,
      ...(existing ? { before: { verdict: existing.verdict }, after: { verdict: body.verdict } } : { data: { verdict: body.verdict, notes } }),
    })
    return { id, created: !existing, verdict: body.verdict, notes }
  })
}

/**
 * Every review of the take, newest first, with notes in the order of the take (whole-take notes
 * first). A pinned note is placed on the hold of the current report under its moment, so it
 * follows a fresh analysis; a note stored with a hold but no moment keeps its hold.
 */
export async function takeReviews (db: Knex, takeId: number, viewerId: number, holds: ReportHold[] | null): Promise<TakeReview[]> {
  const reviews = await db('reviews as r').join('users as u', 'u.id', 'r.reviewer_id')
    .where('r.take_id', takeId)
    .orderBy([{ column: 'r.updated_at', order: 'desc' }, { column: 'r.id', order: 'desc' }])
    .select('r.id', 'r.reviewer_id', 'u.name', 'r.verdict', 'r.summary', 'r.updated_at')
  if (!reviews.length) return []
  const notes = await db('review_notes').whereIn('review_id', reviews.map(r => r.id))
    .orderByRaw('at_s is not null, at_s, hold_index, id')
    .select('id', 'review_id', 'at_s', 'hold_index', 'body')
  return reviews.map((r): TakeReview => ({
    id: r.id,
    reviewer: { id: r.reviewer_id, name: r.name },
    verdict: r.verdict,
    summary: r.summary ?? null,
    at: r.updated_at,
    mine: r.reviewer_id === viewerId,
    notes: notes.filter(n => n.review_id === r.id).map((n): ReviewNote => {
      const atS = n.at_s == null ? null : Number(n.at_s)
      return { id: n.id, atS, holdIndex: atS != null && holds ? holdIndexAt(holds, atS) : (n.hold_index ?? null), body: n.body }
    }),
  }))
}

/**
 * A 400 about a review's body, reworded to name the note at fault ("Note 2 is empty") when the
 * first problem is in a note; anything else is returned as it was.
 */
export function namedNoteError (err: unknown): unknown {
  const data = (err as { data?: { code?: string, issues?: Array<{ path: Array<string | number>, message: string, code: string }> } })?.data
  if (data?.code !== 'invalid_input' || !data.issues) return err
  const issue = data.issues.find(i => i.path[0] === 'notes' && typeof i.path[1] === 'number')
  if (!issue) return err
  const n = Number(issue.path[1])
  const empty = issue.path[2] === 'body' && issue.code === 'too_small'
  const message = empty ? `Note ${n + 1} is empty` : `Note ${n + 1}: ${issue.path.slice(2).join('.') || 'note'} ${issue.message}`
  return apiError(400, empty ? 'empty_note' : 'invalid_note', message, { noteIndex: n, issues: data.issues })
}

/** A select column `review_marks` over `takes as t`: its reviews as a JSON list (for lists of takes). */
export function reviewMarksSql (db: Knex): Knex.Raw {
  return db.raw(`(select json_group_array(json_object('reviewer', ru.name, 'verdict', rr.verdict, 'at', rr.updated_at))
    from reviews rr join users ru on ru.id = rr.reviewer_id where rr.take_id = t.id) as review_marks`)
}

/** The `review_marks` column read back, newest first. */
export function reviewMarks (raw: unknown): ReviewMark[] {
  if (typeof raw !== 'string') return []
  try {
    const list = JSON.parse(raw) as ReviewMark[]
    return Array.isArray(list) ? list.filter(m => m && m.reviewer).sort((a, b) => (a.at < b.at ? 1 : a.at > b.at ? -1 : 0)) : []
  } catch {
    return []
  }
}

// The message a player gets when their take is reviewed (sent after the review is saved).
import type { Knex } from 'knex'
import type { ReviewVerdict } from '../../shared/schemas/review'
import { VERDICT_LABELS } from '../../shared/review'
import type { OutgoingMail } from './mail'
import { sendMail } from './mail'

/** The review message: who reviewed which take, the verdict, the summary and one link. */
export function reviewMail (to: string, o: { player: string, reviewer: string, drill: string, part: string, verdict: ReviewVerdict, summary: string | null, notes: number, updated: boolean, link: string }): OutgoingMail {
  const noteWords = o.notes === 0 ? 'no notes' : o.notes === 1 ? 'one note' : `${o.notes} notes`
  const text = [
    `Hello ${o.player},`,
    '',
    `${o.reviewer} ${o.updated ? 'updated their review of' : 'reviewed'} your take of ${o.drill} (${o.part}).`,
    `Verdict: ${VERDICT_LABELS[o.verdict]}`,
    ...(o.summary ? ['', o.summary] : []),
    '',
    `The review has ${noteWords}. Read ${o.notes === 1 ? 'it' : 'them'} beside the recording:`,
    o.link,
  ].join('\n')
  return { to, subject: `${o.updated ? 'Review updated' : 'Your take was reviewed'}: ${o.drill} (${o.part})`, text }
}

/** Mails the player about a saved review; a failure is logged, never thrown (the review stays saved). */
export async function mailReview (db: Knex, reviewId: number, updated: boolean): Promise<void> {
  try {
    const r = await db('reviews as r')
      .join('takes as t', 't.id', 'r.take_id')
      .join('users as p', 'p.id', 't.user_id')
      .join('users as rv', 'rv.id', 'r.reviewer_id')
      .join('drills as d', 'd.id', 't.drill_id')
      .where('r.id', reviewId)
      .first('t.id as take_id', 't.part', 'p.email', 'p.name as player', 'p.disabled_at', 'rv.name as reviewer', 'd.title', 'r.verdict', 'r.summary',
        db.raw('(select count(*) from review_notes n where n.review_id = r.id) as notes'))
    if (!r || r.disabled_at) return
    const link = `${String(useRuntimeConfig().baseUrl).replace(/\/+$/, '')}/takes/${r.take_id}`
    await sendMail(reviewMail(r.email, { player: r.player, reviewer: r.reviewer, drill: r.title, part: r.part, verdict: r.verdict, summary: r.summary ?? null, notes: Number(r.notes), updated, link }))
  } catch (err) {
    console.error(`[mail] review ${reviewId} not mailed: ${(err as Error).message}`)
  }
}

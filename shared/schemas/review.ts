// The review a reviewer sends (POST /api/takes/:id/reviews) and the queue's query string
// (GET /api/reviews/queue): one validation for the review panel, the queue page and the routes.
import { z } from 'zod'
import { userText } from './text'

export const VERDICTS = ['approved', 'needs_work', 'retake'] as const
export type ReviewVerdict = typeof VERDICTS[number]

/** Longest note and summary, in characters; most notes on one review. */
export const NOTE_MAX = 2000
export const SUMMARY_MAX = 4000
export const NOTES_MAX = 100

/** One note: pinned to a moment (seconds from the start of the take) or, without `atS`, on the whole take. */
export const ReviewNoteInput = z.strictObject({
  atS: z.number().finite().min(0, 'a moment of the take (seconds from its start, 0 or more)').max(86_400).nullable().optional(),
  body: userText(NOTE_MAX),
})
export type ReviewNoteInput = z.infer<typeof ReviewNoteInput>

/**
 * The whole review. Sending it again replaces the reviewer's review: the verdict, the summary
 * when given, and every note when `notes` is given (so a note is edited or deleted by sending
 * the list without it); a field left out keeps what was saved.
 */
export const ReviewBody = z.strictObject({
  verdict: z.enum(VERDICTS, 'one of approved, needs_work or retake'),
  summary: z.union([z.null(), userText(SUMMARY_MAX, 0)]).optional(),
  notes: z.array(ReviewNoteInput).max(NOTES_MAX).optional(),
})
export type ReviewBody = z.infer<typeof ReviewBody>

const QueryId = z.string().regex(/^[1-9]\d{0,15}$/, 'a positive whole number such as 12').transform(Number)

/** GET /api/reviews/queue: filters and the page (unknown names are refused). */
export const ReviewQueueQuery = z.strictObject({
  ensembleId: QueryId.optional(),
  sectionId: QueryId.optional(),
  drillId: QueryId.optional(),
  assignmentId: QueryId.optional(),
  playerId: QueryId.optional(),
  page: z.string().regex(/^[1-9]\d{0,5}$/, 'a page number such as 2').transform(Number).default(1),
  pageSize: z.string().regex(/^[1-9]\d{0,2}$/, 'a whole number from 1 to 100').transform(Number).pipe(z.number().max(100, 'at most 100')).default(20),
})
export type ReviewQueueQuery = z.output<typeof ReviewQueueQuery>

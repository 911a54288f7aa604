import { z } from 'zod'
import { Id } from './id'
import { userText } from './text'

// The assignment form and its routes: one validation on both sides. Whether the due date is
// in the past, and whether the sections, players and drill belong to the ensemble, is decided
// by the server (it owns the clock and the data) with codes of their own.

/** The calendar date and clock time exist (Date.parse would roll 30 February over into March). */
function realDate (s: string): boolean {
  const m = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2})/.exec(s)
  if (!m) return false // the pattern check has said why
  const [, y, mo, d, h, mi] = m.map(Number) as number[]
  const day = new Date(Date.UTC(y!, mo! - 1, d!))
  return day.getUTCMonth() === mo! - 1 && day.getUTCDate() === d && h! <= 23 && mi! <= 59 && Number.isFinite(Date.parse(s))
}

/** A due date: an ISO 8601 date-time with a zone (Z or ±hh:mm), stored as UTC. */
export const DueAt = z.string().trim().max(40)
  .regex(/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(:\d{2}(\.\d{1,3})?)?(Z|[+-]\d{2}:\d{2})$/, 'a date and time with its zone, such as 2030-05-02T18:00:00Z')
  .refine(realDate, 'not a real date')
  .transform(s => new Date(Date.parse(s)).toISOString())

const PartName = z.string().trim().min(1).max(60)
/** Per section or player (by id, as JSON object keys), the part they record instead of the default. */
const PartChoices = z.record(z.string().regex(/^[1-9][0-9]{0,15}$/, 'an id such as 12'), PartName)

/** The largest number of attempts an assignment may allow. */
export const MAX_ATTEMPTS = 20

const fields = {
  drillId: Id,
  sectionIds: z.array(Id).max(200).default([]),
  userIds: z.array(Id).max(1000).default([]),
  /** Parts chosen for sections / players; the rest record the part named like their section. */
  sectionParts: PartChoices.default({}),
  userParts: PartChoices.default({}),
  dueAt: DueAt,
  title: z.union([z.literal('').transform(() => null), userText(120)]).nullable().optional(),
  instructions: userText(2000, 0).default(''),
  /** Takes each assignee may send; null (or left out) = no limit. */
  attempts: z.number().int().min(1).max(MAX_ATTEMPTS).nullable().default(null),
}

/** POST /api/ensembles/:id/assignments */
export const AssignmentCreate = z.strictObject(fields)
export type AssignmentCreate = z.output<typeof AssignmentCreate>

/** PATCH /api/ensembles/:id/assignments/:assignmentId: any field of the form, or `archived`. */
export const AssignmentPatch = z.strictObject({
  sectionIds: z.array(Id).max(200).optional(),
  userIds: z.array(Id).max(1000).optional(),
  sectionParts: PartChoices.optional(),
  userParts: PartChoices.optional(),
  dueAt: DueAt.optional(),
  title: fields.title,
  instructions: userText(2000, 0).optional(),
  attempts: z.number().int().min(1).max(MAX_ATTEMPTS).nullable().optional(),
  archived: z.boolean().optional(),
})
export type AssignmentPatch = z.output<typeof AssignmentPatch>

export const AssignmentParams = z.object({ id: Id, assignmentId: Id })

/** GET /api/ensembles/:id/assignments */
export const AssignmentListQuery = z.object({
  archived: z.enum(['include', 'only']).optional(),
  drillId: Id.optional(),
  page: z.coerce.number().int().positive().max(100_000).default(1),
  pageSize: z.coerce.number().int().positive().max(100).default(20),
})
export type AssignmentListQuery = z.output<typeof AssignmentListQuery>

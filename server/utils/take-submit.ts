// A new take: its fields checked against the caller's drills before any audio is read, then the
// take row and its analysis job written together. Data functions: no HTTP errors.
import type { Knex } from 'knex'
import type { SessionUser } from '../../shared/types/user'
import type { TakeStatusName, TakeUploadLimits } from '../../shared/types/take'
import type { TakeFields } from '../../shared/schemas/take'
import { ANALYSE_TAKE_JOB, enqueueJob } from './jobs'
import { writeAudit } from './audit'
import { assigneeOf, openAssignmentsFor } from './take-assignments'
import { findDrillForUser, type DrillAccess } from './access'
import type { StoredUpload } from './uploads'

/** Limits of a take upload, from runtimeConfig.analysis (NUXT_ANALYSIS_MAX_UPLOAD_BYTES, …_MAX_DURATION_S). */
export function takeUploadLimits (): TakeUploadLimits {
  const c = useRuntimeConfig().analysis
  return { maxBytes: Number(c.maxUploadBytes), maxDurationS: Number(c.maxDurationS) }
}

/** Why a new take is refused before its audio is stored (the route gives each its status). */
export type TakeRefusal =
  | { refused: 'drill_not_found' }
  | { refused: 'drill_archived' }
  | { refused: 'unknown_part', part: string, parts: string[] }
  | { refused: 'assignment_not_found' }
  | { refused: 'assignment_mismatch', assignmentId: number }
  | { refused: 'assignment_archived', assignmentId: number }
  | { refused: 'assignment_part', assignmentId: number, part: string }
  | { refused: 'attempts_used', assignmentId: number, attempts: number, used: number }

export interface PreparedTake {
  access: DrillAccess
  part: string
  assignmentId: number | null
  idempotencyKey: string | null
}

/**
 * Checks a new take's fields against the caller's drills before any audio is read: the drill is
 * theirs and open, the part is in it, the assignment belongs to it. Without an assignment, the
 * caller's one open assignment of this drill and part is the one the take answers.
 */
export async function prepareTake (db: Knex, user: SessionUser, f: TakeFields): Promise<PreparedTake | TakeRefusal> {
  const access = await findDrillForUser(db, user, f.drillId)
  if (!access) return { refused: 'drill_not_found' }
  if (access.drill.archivedAt || access.ensembleArchived) return { refused: 'drill_archived' }
  const parts = access.drill.document.parts.map(p => p.name)
  if (!parts.includes(f.part)) return { refused: 'unknown_part', part: f.part, parts }
  let assignmentId = f.assignmentId ?? null
  if (assignmentId) {
    // Only the caller's own assignments: anyone else's answers 404, as if it did not exist.
    const a = await assigneeOf(db, user.id, assignmentId)
    if (!a || a.ensembleId !== access.drill.ensembleId) return { refused: 'assignment_not_found' }
    if (a.drillId !== access.drill.id) return { refused: 'assignment_mismatch', assignmentId }
    if (a.archived) return { refused: 'assignment_archived', assignmentId }
    if (a.part && a.part !== f.part) return { refused: 'assignment_part', assignmentId, part: a.part }
    // A repeated submit (same idempotency key) is answered with its first take, never refused.
    const repeat = f.idempotencyKey ? await findTakeByIdempotencyKey(db, user.id, f.idempotencyKey) : null
    if (!repeat && a.attempts != null && a.used >= a.attempts) return { refused: 'attempts_used', assignmentId, attempts: a.attempts, used: a.used }
  } else {
    // The caller's one open assignment of this drill and part with takes left.
    const open = (await openAssignmentsFor(db, user.id, access.drill.id, f.part)).filter(a => a.attemptsLeft !== 0)
    if (open.length === 1) assignmentId = open[0]!.id
  }
  return { access, part: f.part, assignmentId, idempotencyKey: f.idempotencyKey ?? null }
}

/** A take earlier sent with the same idempotency key by this user, or null. */
export async function findTakeByIdempotencyKey (db: Knex, userId: number, key: string): Promise<{ id: number, status: TakeStatusName } | null> {
  const r = await db('takes').where({ user_id: userId, idempotency_key: key }).first('id', 'status')
  return r ? { id: r.id, status: r.status } : null
}

/**
 * Writes the take row and its analysis job in one transaction. A repeated idempotency key
 * returns the first take instead (`created: false`).
 */
export async function createTake (db: Knex, userId: number, t: PreparedTake, upload: StoredUpload): Promise<{ id: number, status: TakeStatusName, created: boolean } | Extract<TakeRefusal, { refused: 'attempts_used' }>> {
  if (t.idempotencyKey) {
    const first = await findTakeByIdempotencyKey(db, userId, t.idempotencyKey)
    if (first) return { ...first, created: false }
  }
  const drill = t.access.drill
  try {
    return await db.transaction(async (trx) => {
      if (t.assignmentId) {
        // Checked again under the write lock: two uploads at once cannot both take the last attempt.
        const a = await assigneeOf(trx, userId, t.assignmentId)
        if (a && a.attempts != null && a.used >= a.attempts) return { refused: 'attempts_used' as const, assignmentId: t.assignmentId, attempts: a.attempts, used: a.used }
      }
      const now = new Date().toISOString()
      const [row] = await trx('takes').insert({
        ensemble_id: drill.ensembleId,
        drill_id: drill.id,
        drill_version: drill.version,
        user_id: userId,
        assignment_id: t.assignmentId,
        part: t.part,
        object_key: upload.key,
        original_name: upload.originalName,
        mime: upload.mime,
        bytes: upload.bytes,
        status: 'queued',
        idempotency_key: t.idempotencyKey,
        created_at: now,
        updated_at: now,
      }).returning('id')
      const id = typeof row === 'object' ? row.id : row
      await enqueueJob(trx, ANALYSE_TAKE_JOB, { takeId: id }, { takeId: id })
      await writeAudit(trx, { actorId: userId, action: 'take.create', subjectType: 'take', subjectId: id, ensembleId: drill.ensembleId, data: { drillId: drill.id, part: t.part, bytes: upload.bytes, format: upload.format } })
      return { id, status: 'queued' as const, created: true }
    })
  } catch (err) {
    // Two submits with one key racing: the unique index lets one through; answer the other with it.
    if (t.idempotencyKey && /UNIQUE constraint failed: takes\.user_id, takes\.idempotency_key/.test(String((err as Error).message))) {
      const first = await findTakeByIdempotencyKey(db, userId, t.idempotencyKey)
      if (first) return { ...first, created: false }
    }
    throw err
  }
}

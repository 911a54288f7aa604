// Assignment notices and reminders, and the in-process runner of their jobs. Every message is
// claimed in the database before it is sent (notified_at / reminded_at set only where still
// empty), so two runs, two processes or a restart never mail one person twice; a failed send
// gives the claim back and the job retries.
import type { Knex } from 'knex'
import type { OutgoingMail } from './mail'
import { ASSIGNMENT_NOTICE_JOB } from './assignments'
import { claimJob, completeJob, enqueueJob, failJob } from './jobs'
import { REMINDER_LEAD_MS, reminderDue } from '../../shared/assignments/status'

/** Recurring job that mails the reminders due now, then schedules its next run. */
export const ASSIGNMENT_REMINDERS_JOB = 'assignment_reminders'

interface MailRow {
  assigneeId: number
  assignmentId: number
  email: string
  name: string
  drill: string
  ensemble: string
  title: string | null
  instructions: string
  part: string | null
  dueAt: string | null
  attempts: number | null
  drillId: number
}

/** "Thu, 03 Dec 2026 18:00 UTC": the due date as every message words it. */
export function dueWords (dueAt: string | null): string {
  if (!dueAt) return 'no due date'
  return new Date(dueAt).toUTCString().replace(/:\d\d GMT$/, ' UTC')
}

function recordLink (baseUrl: string, r: MailRow): string {
  const q = new URLSearchParams({ drillId: String(r.drillId), assignmentId: String(r.assignmentId), ...(r.part ? { part: r.part } : {}) })
  return `${baseUrl.replace(/\/+$/, '')}/takes/new?${q}`
}

/** The message telling an assignee what to record, in which part, by when. */
export function assignmentNoticeMail (r: MailRow, baseUrl: string): OutgoingMail {
  const text = [
    `Hello ${r.name},`,
    '',
    `${r.ensemble} has a new assignment for you${r.title ? `: ${r.title}` : ''}.`,
    `Drill: ${r.drill}`,
    `Your part: ${r.part ?? 'the part of your section'}`,
    `Due: ${dueWords(r.dueAt)}`,
    ...(r.attempts ? [`Takes allowed: ${r.attempts}`] : []),
    ...(r.instructions ? ['', r.instructions] : []),
    '',
    `Record or upload your take here: ${recordLink(baseUrl, r)}`,
  ].join('\n')
  return { to: r.email, subject: `New assignment: ${r.drill} (${r.part ?? 'your part'}), due ${dueWords(r.dueAt)}`, text }
}

/** The message after an edit: the assignment as it now stands. */
export function assignmentChangedMail (r: MailRow, baseUrl: string): OutgoingMail {
  const text = [
    `Hello ${r.name},`,
    '',
    `${r.ensemble} has changed your assignment${r.title ? ` "${r.title}"` : ''}. This is how it stands now:`,
    `Drill: ${r.drill}`,
    `Your part: ${r.part ?? 'the part of your section'}`,
    `Due: ${dueWords(r.dueAt)}`,
    ...(r.attempts ? [`Takes allowed: ${r.attempts}`] : []),
    ...(r.instructions ? ['', r.instructions] : []),
    '',
    `Record or upload your take here: ${recordLink(baseUrl, r)}`,
  ].join('\n')
  return { to: r.email, subject: `Changed: ${r.drill} (${r.part ?? 'your part'}), now due ${dueWords(r.dueAt)}`, text }
}

/** The reminder one day before the due date. */
export function assignmentReminderMail (r: MailRow, baseUrl: string): OutgoingMail {
  const text = [
    `Hello ${r.name},`,
    '',
    `A reminder from ${r.ensemble}: your take of ${r.drill} (${r.part ?? 'your part'}) is due ${dueWords(r.dueAt)}, and none has arrived yet.`,
    '',
    `Record or upload it here: ${recordLink(baseUrl, r)}`,
  ].join('\n')
  return { to: r.email, subject: `Reminder: ${r.drill} (${r.part ?? 'your part'}) is due ${dueWords(r.dueAt)}`, text }
}

function mailRows (db: Knex) {
  return db('assignment_assignees as aa')
    .join('assignments as a', 'a.id', 'aa.assignment_id')
    .join('users as u', 'u.id', 'aa.user_id')
    .join('drills as d', 'd.id', 'a.drill_id')
    .join('ensembles as e', 'e.id', 'a.ensemble_id')
    .join('memberships as m', function () { this.on('m.ensemble_id', '=', 'a.ensemble_id').andOn('m.user_id', '=', 'aa.user_id') })
    .whereNull('u.disabled_at').whereNull('e.archived_at')
    .select('aa.id as assigneeId', 'a.id as assignmentId', 'u.email', 'u.name', 'd.title as drill', 'd.id as drillId', 'e.name as ensemble', 'a.title',
      'a.instructions', 'aa.part', 'a.due_at as dueAt', 'a.attempts', 'aa.notified_at as notifiedAt', 'aa.reminded_at as remindedAt', 'a.archived_at as archivedAt',
      db.raw('exists (select 1 from takes t where t.assignment_id = a.id and t.user_id = aa.user_id and t.withdrawn_at is null) as submitted'))
}

type Send = (mail: OutgoingMail) => Promise<void>

/** Claims one assignee's message (column still empty → now); false when another run has it. */
async function claim (db: Knex, assigneeId: number, column: 'notified_at' | 'reminded_at', at: string): Promise<boolean> {
  return (await db('assignment_assignees').where({ id: assigneeId }).whereNull(column).update({ [column]: at })) === 1
}

async function sendClaimed (db: Knex, r: MailRow, column: 'notified_at' | 'reminded_at', mail: OutgoingMail, send: Send, at: string): Promise<boolean> {
  if (!await claim(db, r.assigneeId, column, at)) return false
  try {
    await send(mail)
    return true
  } catch (err) {
    await db('assignment_assignees').where({ id: r.assigneeId, [column]: at }).update({ [column]: null })
    throw err
  }
}

/**
 * Mails the notice to every assignee of the assignment not yet notified, and the change message to
 * those told before whose assignment changed since; returns how many were sent.
 */
export async function sendAssignmentNotices (db: Knex, assignmentId: number, send: Send, baseUrl: string, now = new Date()): Promise<number> {
  const at = now.toISOString()
  const rows = await mailRows(db).where('a.id', assignmentId).whereNull('aa.notified_at').whereNull('a.archived_at') as (MailRow & Record<string, any>)[]
  let sent = 0
  for (const r of rows) if (await sendClaimed(db, r, 'notified_at', assignmentNoticeMail(r, baseUrl), send, at)) sent++
  const changed = await mailRows(db).where('a.id', assignmentId).whereNotNull('aa.notified_at').whereNotNull('aa.changed_at').whereNull('a.archived_at')
    .where(q => q.whereNull('aa.changed_notified_at').orWhereRaw('aa.changed_notified_at < aa.changed_at')) as (MailRow & Record<string, any>)[]
  for (const r of changed) if (await sendChangeClaimed(db, r, assignmentChangedMail(r, baseUrl), send, at)) sent++
  return sent
}

/** Like sendClaimed, for the change message: claimed while the change is newer than the last one mailed. */
async function sendChangeClaimed (db: Knex, r: MailRow, mail: OutgoingMail, send: Send, at: string): Promise<boolean> {
  const claimed = await db('assignment_assignees').where({ id: r.assigneeId }).whereNotNull('changed_at')
    .where(q => q.whereNull('changed_notified_at').orWhereRaw('changed_notified_at < changed_at'))
    .update({ changed_notified_at: at })
  if (claimed !== 1) return false
  try {
    await send(mail)
    return true
  } catch (err) {
    await db('assignment_assignees').where({ id: r.assigneeId, changed_notified_at: at }).update({ changed_notified_at: null })
    throw err
  }
}

/** Mails every reminder due now (see reminderDue); returns how many were sent. */
export async function sendDueReminders (db: Knex, send: Send, baseUrl: string, now = new Date()): Promise<number> {
  const rows = await mailRows(db).whereNull('aa.reminded_at').whereNull('a.archived_at').whereNotNull('a.due_at')
    .where('a.due_at', '>', now.toISOString()).where('a.due_at', '<=', new Date(now.getTime() + REMINDER_LEAD_MS).toISOString()) as (MailRow & Record<string, any>)[]
  let sent = 0
  for (const r of rows) {
    const state = { dueAt: r.dueAt, notifiedAt: r.notifiedAt ?? null, remindedAt: r.remindedAt ?? null, submitted: Boolean(r.submitted), archived: r.archivedAt != null }
    if (!reminderDue(state, now)) continue
    if (await sendClaimed(db, r, 'reminded_at', assignmentReminderMail(r, baseUrl), send, now.toISOString())) sent++
  }
  return sent
}

/** Queues the recurring reminder job unless one is already waiting or running (one statement). */
export async function ensureReminderJob (db: Knex, runAfter = new Date()): Promise<void> {
  const exists = await db('jobs').where({ kind: ASSIGNMENT_REMINDERS_JOB }).whereIn('status', ['queued', 'running']).first('id')
  if (!exists) await enqueueJob(db, ASSIGNMENT_REMINDERS_JOB, {}, { runAfter, maxAttempts: 3 })
}

export interface AssignmentMailRunner { stop: () => Promise<void> }

/**
 * Runs the notice and reminder jobs of the queue in this process: polls every `pollMs`, runs the
 * reminder sweep every `everyMs` (its next run is a queued job, so it survives a restart), and
 * puts back the jobs a stopped process left running.
 */
export function startAssignmentMail (o: { db: () => Knex, send: Send, baseUrl: string, pollMs: number, everyMs: number, staleMs?: number }): AssignmentMailRunner {
  const workerId = `assignment-mail-${process.pid}-${Math.random().toString(36).slice(2, 8)}`
  const kinds = [ASSIGNMENT_NOTICE_JOB, ASSIGNMENT_REMINDERS_JOB]
  let stopped = false
  let busy: Promise<void> = Promise.resolve()
  const tick = async () => {
    const db = o.db()
    const stale = new Date(Date.now() - (o.staleMs ?? 5 * 60_000)).toISOString()
    await db('jobs').whereIn('kind', kinds).where('status', 'running').where(q => q.whereNull('locked_at').orWhere('locked_at', '<', stale))
      .update({ status: 'queued', locked_by: null, locked_at: null, updated_at: new Date().toISOString() })
    await ensureReminderJob(db)
    for (let job = await claimJob(db, workerId, { kinds }); job && !stopped; job = await claimJob(db, workerId, { kinds })) {
      try {
        if (job.kind === ASSIGNMENT_NOTICE_JOB) {
          const sent = await sendAssignmentNotices(db, Number(job.payload.assignmentId), o.send, o.baseUrl)
          await completeJob(db, job.id, workerId, { sent })
        } else {
          const sent = await sendDueReminders(db, o.send, o.baseUrl)
          await db.transaction(async (trx) => {
            await completeJob(trx, job!.id, workerId, { sent })
            await enqueueJob(trx, ASSIGNMENT_REMINDERS_JOB, {}, { runAfter: new Date(Date.now() + o.everyMs), maxAttempts: 3 })
          })
        }
      } catch (err) {
        console.error(`[assignments] ${job.kind} job ${job.id} failed: ${(err as Error).message}`)
        await failJob(db, job.id, workerId, 'mail not sent')
      }
    }
  }
  let running = false
  const timer = setInterval(() => {
    if (running || stopped) return
    running = true
    busy = tick().catch(err => console.error(`[assignments] mail runner: ${(err as Error).message}`)).finally(() => { running = false })
  }, o.pollMs)
  return {
    async stop () {
      stopped = true
      clearInterval(timer)
      await busy
    },
  }
}

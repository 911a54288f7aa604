// What an assignment looks like to one assignee (due, overdue, submitted) and when the reminder
// goes out. Pure: the caller passes the clock. Times are ISO 8601 instants (UTC), so "one day
// before" is 86 400 s earlier whatever the local clocks do that night.

export type AssignmentStatus = 'due' | 'overdue' | 'submitted'

/** How long before the due time the reminder is sent. */
export const REMINDER_LEAD_MS = 24 * 3600_000

const instant = (iso: string | null | undefined): number | null => {
  if (iso == null || iso === '') return null
  const t = Date.parse(iso)
  return Number.isFinite(t) ? t : null
}

/**
 * Submitted once a take (not withdrawn) answers it; otherwise overdue from the due instant on
 * (the due instant itself is already late), else due. No due date: due until submitted.
 */
export function assignmentStatus (a: { dueAt: string | null, submitted: boolean }, now: Date): AssignmentStatus {
  if (a.submitted) return 'submitted'
  const due = instant(a.dueAt)
  return due != null && now.getTime() >= due ? 'overdue' : 'due'
}

export interface ReminderState {
  dueAt: string | null
  /** When the assignment notice went to this assignee (null: not yet). */
  notifiedAt: string | null
  remindedAt: string | null
  submitted: boolean
  archived: boolean
}

/** When the reminder should go out: one day before the due instant (null without a due date). */
export function reminderAt (dueAt: string | null): Date | null {
  const due = instant(dueAt)
  return due == null ? null : new Date(due - REMINDER_LEAD_MS)
}

/**
 * Whether the reminder should be sent now: never twice, never for an archived or submitted
 * assignment, only inside the last day before the due instant, and not when the notice itself
 * went out inside that day (it already named the due date).
 */
export function reminderDue (s: ReminderState, now: Date): boolean {
  if (s.remindedAt || s.submitted || s.archived) return false
  const due = instant(s.dueAt)
  if (due == null) return false
  const t = now.getTime()
  if (t < due - REMINDER_LEAD_MS || t >= due) return false
  const notified = instant(s.notifiedAt)
  if (notified == null) return false // the notice goes first
  return notified < due - REMINDER_LEAD_MS
}

/** Takes left for an assignee: null = no limit. Never below zero. */
export function attemptsLeft (attempts: number | null, used: number): number | null {
  if (attempts == null) return null
  return Math.max(0, attempts - used)
}

// Assignment status and reminder timing (pure). Sources beside each check: RFC 3339 for the
// instants, POSIX "Seconds Since the Epoch" for the length of a day, Directive 2000/84/EC for the
// European summer-time change, and common practice for what "due" and "overdue" mean.
import { describe, expect, it } from 'vitest'
import { REMINDER_LEAD_MS, assignmentStatus, attemptsLeft, reminderAt, reminderDue } from '../../../shared/assignments/status'
import { DueAt } from '../../../shared/schemas/assignment'

describe('assignmentStatus', () => {
  const due = '2030-05-02T18:00:00.000Z'
  it.each([
    // common practice: nothing sent and the due time not reached → due
    [{ dueAt: due, submitted: false }, '2030-05-02T17:59:59.999Z', 'due'],
    // common practice: a deadline is missed at the instant itself, not a moment after
    [{ dueAt: due, submitted: false }, '2030-05-02T18:00:00.000Z', 'overdue'],
    [{ dueAt: due, submitted: false }, '2030-06-01T00:00:00.000Z', 'overdue'],
    // common practice: a take sent (even late) counts as submitted
    [{ dueAt: due, submitted: true }, '2030-06-01T00:00:00.000Z', 'submitted'],
    [{ dueAt: null, submitted: false }, '2030-06-01T00:00:00.000Z', 'due'],
    // RFC 3339 §5.8: 1996-12-19T16:39:57-08:00 is the same instant as 1996-12-20T00:39:57Z
    [{ dueAt: '1996-12-19T16:39:57-08:00', submitted: false }, '1996-12-20T00:39:56Z', 'due'],
    [{ dueAt: '1996-12-19T16:39:57-08:00', submitted: false }, '1996-12-20T00:39:57Z', 'overdue'],
  ] as const)('%o at %s is %s', (a, now, want) => {
    expect(assignmentStatus(a, new Date(now))).toBe(want)
  })
})

describe('reminder timing', () => {
  it('a day is 86 400 s (POSIX.1-2017 XBD 4.16, Seconds Since the Epoch)', () => {
    expect(REMINDER_LEAD_MS).toBe(86_400 * 1000)
  })

  it('comes one day before the due instant, also across the European summer-time change', () => {
    // Directive 2000/84/EC art. 2: summer time begins at 01:00 UTC on the last Sunday of March
    // (29 March 2026). Instants in UTC do not move with it: the reminder is 24 h earlier.
    expect(reminderAt('2026-03-29T20:00:00Z')!.toISOString()).toBe('2026-03-28T20:00:00.000Z')
    // RFC 3339 §5.6 offset form: 18:00+02:00 is 16:00Z
    expect(reminderAt('2026-03-30T18:00:00+02:00')!.toISOString()).toBe('2026-03-29T16:00:00.000Z')
    expect(reminderAt(null)).toBeNull()
  })

  const base = { dueAt: '2030-05-02T18:00:00Z', notifiedAt: '2030-04-20T09:00:00Z', remindedAt: null, submitted: false, archived: false }
  it.each([
    ['before the last day', base, '2030-05-01T17:59:59Z', false],
    ['at the start of the last day', base, '2030-05-01T18:00:00Z', true],
    ['during the last day', base, '2030-05-02T09:00:00Z', true],
    ['once the due time has passed', base, '2030-05-02T18:00:00Z', false],
    ['a second time', { ...base, remindedAt: '2030-05-01T18:00:05Z' }, '2030-05-02T09:00:00Z', false],
    ['after a take was sent', { ...base, submitted: true }, '2030-05-02T09:00:00Z', false],
    ['for an archived assignment', { ...base, archived: true }, '2030-05-02T09:00:00Z', false],
    ['before the notice went out', { ...base, notifiedAt: null }, '2030-05-02T09:00:00Z', false],
    ['when the notice itself came inside the last day', { ...base, notifiedAt: '2030-05-02T08:00:00Z' }, '2030-05-02T09:00:00Z', false],
    ['without a due date', { ...base, dueAt: null }, '2030-05-02T09:00:00Z', false],
  ] as const)('is sent %s: %s', (_label, state, now, want) => {
    expect(reminderDue(state, new Date(now))).toBe(want)
  })
})

describe('attemptsLeft', () => {
  it.each([[null, 5, null], [3, 0, 3], [3, 2, 1], [3, 3, 0], [2, 5, 0]] as const)('allowed %s, used %s → %s', (allowed, used, want) => {
    expect(attemptsLeft(allowed, used)).toBe(want)
  })
})

describe('the due date field', () => {
  it('stores the instant in UTC (RFC 3339 §5.8 examples)', () => {
    expect(DueAt.parse('1996-12-19T16:39:57-08:00')).toBe('1996-12-20T00:39:57.000Z')
    expect(DueAt.parse('1985-04-12T23:20:50.52Z')).toBe('1985-04-12T23:20:50.520Z')
  })
  it.each(['2030-05-02', '2030-05-02T18:00', 'next Thursday', '2030-02-30T18:00:00Z', ''])('refuses %j (no zone, or no such date)', (s) => {
    expect(DueAt.safeParse(s).success).toBe(false)
  })
})

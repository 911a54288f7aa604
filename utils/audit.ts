// Words for audit rows: the log stores machine names and changed fields; people read sentences.

const ACTIONS: Record<string, string> = {
  'auth.login': 'Signed in',
  'auth.login_failed': 'Failed sign-in',
  'auth.logout': 'Signed out',
  'auth.password_reset_requested': 'Asked for a password reset',
  'auth.password_reset': 'Reset their password',
  'account.updated': 'Changed their profile',
  'account.password_changed': 'Changed their password',
  'user.disabled': 'Disabled an account',
  'user.restored': 'Restored an account',
  'user.site_admin_granted': 'Made a site admin',
  'user.site_admin_removed': 'Removed a site admin',
  'ensemble.created': 'Created an ensemble',
  'ensemble.archived': 'Archived an ensemble',
  'ensemble.restored': 'Restored an ensemble',
  'invitation.created': 'Sent an invitation',
  'assignment.created': 'Assigned a drill',
  'assignment.updated': 'Changed an assignment',
  'assignment.archived': 'Archived an assignment',
  'assignment.restored': 'Restored an assignment',
  'review.created': 'Reviewed a take',
  'review.updated': 'Changed a review',
}

/** "user.site_admin_granted" → "Made a site admin"; unknown actions become readable words. */
export function auditActionLabel(action: string): string {
  if (ACTIONS[action]) return ACTIONS[action]
  const words = action.replace(/[._]+/g, ' ').trim()
  return words ? words[0]!.toUpperCase() + words.slice(1) : 'Unnamed action'
}

/** The families of a list of actions ("user.disabled" → "user"), sorted, without repeats. */
export function auditFamilies(actions: string[]): string[] {
  return [...new Set(actions.map(a => a.split('.')[0]!).filter(Boolean))].sort()
}

const FIELD_WORDS: Record<string, string> = {
  pitchView: 'reads', siteAdmin: 'site admin', expiresAt: 'expires', sectionId: 'section', a4: 'A4',
}

/** A stored value as short text: yes/no, "none", numbers and text as they are, lists joined. */
export function auditValue(v: unknown): string {
  if (v === null || v === undefined || v === '') return 'none'
  if (typeof v === 'boolean') return v ? 'yes' : 'no'
  if (typeof v === 'number') return Number.isFinite(v) ? String(v) : 'none'
  if (typeof v === 'string') return v
  if (Array.isArray(v)) return v.length ? v.map(auditValue).join(', ') : 'none'
  const entries = Object.entries(v as Record<string, unknown>)
  return entries.length ? entries.map(([k, x]) => `${FIELD_WORDS[k] ?? k} ${auditValue(x)}`).join('; ') : 'none'
}

export interface AuditChange { field: string, before: string | null, after: string | null }

/** One line per changed field; a value with no before (or after) has null there. */
export function auditChanges(before: unknown, after: unknown): AuditChange[] {
  const obj = (x: unknown) => (x && typeof x === 'object' && !Array.isArray(x) ? x as Record<string, unknown> : null)
  const b = obj(before)
  const a = obj(after)
  if (!b && !a) {
    if (before == null && after == null) return []
    return [{ field: '', before: before == null ? null : auditValue(before), after: after == null ? null : auditValue(after) }]
  }
  const keys = [...new Set([...Object.keys(b ?? {}), ...Object.keys(a ?? {})])]
  return keys.map(k => ({
    field: FIELD_WORDS[k] ?? k,
    before: b && k in b ? auditValue(b[k]) : null,
    after: a && k in a ? auditValue(a[k]) : null,
  }))
}

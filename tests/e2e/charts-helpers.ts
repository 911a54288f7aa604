// Helpers of the charts tests.
import type Database from 'better-sqlite3'

/**
 * Where assignments list their assignees one by one (a later migration), record the singers each
 * asks: everyone, or one section's; marked as already notified so no notice is mailed.
 */
export function recordAssignees (raw: Database.Database, ensembleId: number, list: Array<[assignmentId: number, sectionId: number | null]>) {
  if (!raw.prepare("select 1 from sqlite_master where type = 'table' and name = 'assignment_assignees'").get()) return
  const singers = raw.prepare("select user_id, section_id from memberships where ensemble_id = ? and role != 'director'").all(ensembleId) as Array<{ user_id: number, section_id: number | null }>
  const now = new Date().toISOString()
  const ins = raw.prepare('insert into assignment_assignees (assignment_id, user_id, section_id, notified_at, reminded_at) values (?, ?, ?, ?, ?)')
  for (const [assignmentId, sectionId] of list) {
    for (const s of singers) if (sectionId == null || s.section_id === sectionId) ins.run(assignmentId, s.user_id, s.section_id, now, now)
  }
}

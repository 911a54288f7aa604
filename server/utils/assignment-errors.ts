import type { AssignmentRefusal } from './assignments'

const ERRORS: Record<AssignmentRefusal['code'], [number, string]> = {
  not_found: [404, 'Assignment not found'],
  assignment_archived: [409, 'The assignment is archived: restore it first'],
  drill_not_found: [404, 'Drill not found'],
  drill_archived: [409, 'Drill is archived'],
  section_not_found: [404, 'Section not found'],
  user_not_found: [404, 'Player not found'],
  no_assignees: [400, 'Choose at least one section or player with members'],
  due_in_past: [400, 'The due date is in the past'],
  unknown_target: [400, 'A part was chosen for a section or player that is not assigned'],
  unknown_part: [400, 'That part is not in the drill'],
  part_required: [400, 'Choose the part this section or player records'],
}

/** The HTTP error for a refused assignment write: fixed text, the code and its details (the field) in `data`. */
export function assignmentError (r: AssignmentRefusal) {
  const { ok: _, code, ...details } = r
  const [status, message] = ERRORS[code]
  return apiError(status, code, message, details)
}

// How the take routes answer a take refused before or after its audio is stored: each refusal's
// status and short fixed message, with the refusal's details in `data`.
import type { TakeRefusal } from './take-submit'

const REFUSED: Record<TakeRefusal['refused'], readonly [number, string]> = {
  drill_not_found: [404, 'Drill not found'],
  drill_archived: [409, 'Drill is archived'],
  unknown_part: [400, 'That part is not in the drill'],
  assignment_not_found: [404, 'Assignment not found'],
  assignment_mismatch: [400, 'The assignment is for another drill'],
  assignment_archived: [409, 'The assignment is archived'],
  assignment_part: [400, 'The assignment asks for another part'],
  attempts_used: [409, 'Every attempt of this assignment is used'],
}

/** The API error of a refused take. */
export function takeRefusedError (out: TakeRefusal) {
  const { refused, ...details } = out
  return apiError(REFUSED[refused][0], refused, REFUSED[refused][1], details)
}

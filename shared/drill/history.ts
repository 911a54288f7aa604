// Undo and redo over immutable states: each edit pushes the state it replaced.
export interface History<T> { past: T[], present: T, future: T[] }

/** How many steps back the editor keeps. */
export const HISTORY_LIMIT = 200

export function startHistory<T>(present: T): History<T> {
  return { past: [], present, future: [] }
}

/** Records a new state (an edit); the redo steps are dropped. An unchanged state records nothing. */
export function pushHistory<T>(h: History<T>, next: T): History<T> {
  if (next === h.present) return h
  const past = [...h.past, h.present]
  return { past: past.length > HISTORY_LIMIT ? past.slice(past.length - HISTORY_LIMIT) : past, present: next, future: [] }
}

export function undoHistory<T>(h: History<T>): History<T> {
  if (!h.past.length) return h
  return { past: h.past.slice(0, -1), present: h.past[h.past.length - 1]!, future: [h.present, ...h.future] }
}

export function redoHistory<T>(h: History<T>): History<T> {
  if (!h.future.length) return h
  return { past: [...h.past, h.present], present: h.future[0]!, future: h.future.slice(1) }
}

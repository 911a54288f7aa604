// Live take events inside one process: the analysis pool emits, the event-stream route listens.
import { EventEmitter } from 'node:events'
import type { TakeLiveState } from '../../shared/types/take'

/** A take's live state, as the event stream sends it. */
export interface TakeEvent extends TakeLiveState {
  takeId: number
}

const events = new EventEmitter()
events.setMaxListeners(0)

/** Listens to a take's status and progress; returns the function that stops listening. */
export function onTakeEvent (takeId: number, listener: (e: TakeEvent) => void): () => void {
  const name = `take:${takeId}`
  events.on(name, listener)
  return () => { events.off(name, listener) }
}

/** Tells every listener of the take (the analysis pool calls it as a job moves). */
export function emitTakeEvent (e: TakeEvent) {
  events.emit(`take:${e.takeId}`, e)
}

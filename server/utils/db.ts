import type { Knex } from 'knex'
import { createKnex } from '../database/knex'

let instance: Knex | undefined

/** The process's one Knex instance on runtimeConfig.dbFile (better-sqlite3, WAL, foreign keys on). */
export function useDb (): Knex {
  if (!instance) instance = createKnex(useRuntimeConfig().dbFile)
  return instance
}

/** Closes the process's Knex instance (on shutdown). */
export async function closeDb (): Promise<void> {
  const db = instance
  instance = undefined
  if (db) await db.destroy()
}

/** Current time as the ISO text every table stores. */
export function nowIso (): string {
  return new Date().toISOString()
}

/** Parses a JSON text column; null stays null. */
export function parseJsonColumn<T = unknown> (text: string | null | undefined): T | null {
  if (text == null || text === '') return null
  return JSON.parse(text) as T
}

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

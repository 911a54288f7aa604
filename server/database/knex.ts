// Knex settings shared by the server (useDb), the knex CLI (knexfile.ts) and the demo seed.
// No Nitro imports here: the CLI loads this file through tsx.
import { mkdirSync } from 'node:fs'
import { dirname, resolve } from 'node:path'
import knex, { type Knex } from 'knex'

/** Default database file, relative to the working directory (same as runtimeConfig.dbFile). */
export const DEFAULT_DB_FILE = './storage/driftline.sqlite'

/** Knex config for a SQLite file: foreign keys on, WAL journal, busy timeout. */
export function knexConfig (file: string): Knex.Config {
  const filename = file === ':memory:' ? file : resolve(file)
  if (filename !== ':memory:') mkdirSync(dirname(filename), { recursive: true })
  return {
    client: 'better-sqlite3',
    connection: { filename },
    useNullAsDefault: true,
    pool: {
      min: 1,
      max: 1,
      afterCreate (conn: { pragma: (s: string) => unknown }, done: (err: Error | null, conn: unknown) => void) {
        try {
          conn.pragma('journal_mode = WAL')
          conn.pragma('foreign_keys = ON')
          conn.pragma('busy_timeout = 5000')
          conn.pragma('synchronous = NORMAL')
          done(null, conn)
        } catch (err) {
          done(err as Error, conn)
        }
      },
    },
  }
}

/** A new Knex instance on the file (callers keep one per process). */
export function createKnex (file: string): Knex {
  return knex(knexConfig(file))
}

// Every migration, imported so the built server has them (.output carries no migration files).
// Names equal the file names, so the knex CLI and the server share one knex_migrations table.
// A new migration file must be added here too (tests/unit/server/migrations.test.ts checks it).
import type { Knex } from 'knex'
import * as m001 from '../../migrations/001_people_and_ensembles'
import * as m002 from '../../migrations/002_drills_and_assignments'
import * as m003 from '../../migrations/003_takes_and_analyses'
import * as m004 from '../../migrations/004_reviews'
import * as m005 from '../../migrations/005_jobs_and_audit'
import * as m006 from '../../migrations/006_people_settings'
import * as m007 from '../../migrations/007_accounts_and_admin'
import * as m008 from '../../migrations/008_drill_versions'
import * as m009 from '../../migrations/009_assignment_assignees'
import * as m010 from '../../migrations/010_review_notes'
import * as m011 from '../../migrations/011_member_reading_default'
import * as m012 from '../../migrations/012_figure_indexes'
import * as m013 from '../../migrations/013_assignment_changes'

interface Migration { up: (knex: Knex) => Promise<void>, down: (knex: Knex) => Promise<void>, config?: { transaction?: boolean } }

export const MIGRATIONS: Record<string, Migration> = {
  '001_people_and_ensembles.ts': m001,
  '002_drills_and_assignments.ts': m002,
  '003_takes_and_analyses.ts': m003,
  '004_reviews.ts': m004,
  '005_jobs_and_audit.ts': m005,
  '006_people_settings.ts': m006,
  '007_accounts_and_admin.ts': m007,
  '008_drill_versions.ts': m008,
  '009_assignment_assignees.ts': m009,
  '010_review_notes.ts': m010,
  '011_member_reading_default.ts': m011,
  '012_figure_indexes.ts': m012,
  '013_assignment_changes.ts': m013,
}

/** Knex migration source over MIGRATIONS (pass as `migrationSource` to migrate.latest()). */
export const migrationSource: Knex.MigrationSource<string> = {
  getMigrations: async () => Object.keys(MIGRATIONS).sort(),
  getMigrationName: name => name,
  getMigration: async name => MIGRATIONS[name]!,
}

/** Brings the schema up to date; returns the names of the migrations it ran. */
export async function migrateLatest (db: Knex): Promise<string[]> {
  const [, ran] = await db.migrate.latest({ migrationSource }) as [number, string[]]
  return ran
}

import type { Knex } from 'knex'

const now = (knex: Knex) => knex.raw("(strftime('%Y-%m-%dT%H:%M:%fZ', 'now'))")

// The column is added with a plain ALTER TABLE: the query builder would rebuild `drills` (copy,
// drop, rename), and dropping a table that takes and parts refer to fails once there is data.
// Dropping it again needs that rebuild with foreign keys off, which no transaction may surround
// (https://www.sqlite.org/lang_altertable.html#otheralter).
export const config = { transaction: false }

export async function up (knex: Knex): Promise<void> {
  await knex.transaction(async (trx) => {
  // Every saved version of a drill's document, so a take recorded against version 3 can still be
  // read against what it was sung to after the director edits the drill.
  await trx.schema.createTable('drill_versions', (t) => {
    t.increments('id')
    t.integer('drill_id').notNullable().references('drills.id').onDelete('CASCADE')
    t.integer('version').notNullable()
    t.text('document').notNullable() // DrillDocument JSON
    t.integer('created_by').references('users.id').onDelete('SET NULL')
    t.string('created_at').notNullable().defaultTo(now(knex))
    t.unique(['drill_id', 'version'])
  })
  // Drills saved before this table existed keep their current version as their history.
  await trx.raw(`insert into drill_versions (drill_id, version, document, created_by, created_at)
    select id, version, document, coalesce(updated_by, created_by), updated_at from drills`)
  // Copies of another drill remember where they came from (shown in the list).
  await trx.raw('alter table drills add column copied_from integer references drills(id) on delete set null')
  })
}

export async function down (knex: Knex): Promise<void> {
  await knex.raw('PRAGMA foreign_keys = OFF')
  try {
    await knex.schema.alterTable('drills', (t) => { t.dropColumn('copied_from') })
    await knex.schema.dropTableIfExists('drill_versions')
  } finally {
    await knex.raw('PRAGMA foreign_keys = ON')
  }
}

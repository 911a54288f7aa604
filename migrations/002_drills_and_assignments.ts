import type { Knex } from 'knex'

const now = (knex: Knex) => knex.raw("(strftime('%Y-%m-%dT%H:%M:%fZ', 'now'))")

export async function up (knex: Knex): Promise<void> {
  // The drill document (shared/drill/schema.ts) is the source of truth; parts, chords and notes
  // are its normalised copy, rewritten with it in one transaction, for queries and charts.
  await knex.schema.createTable('drills', (t) => {
    t.increments('id')
    t.integer('ensemble_id').notNullable().references('ensembles.id').onDelete('CASCADE')
    t.string('title', 120).notNullable()
    t.string('key_name', 20).notNullable()
    t.float('tempo').notNullable()
    t.float('a4').notNullable()
    t.string('system_name', 20).notNullable()
    t.float('tolerance').notNullable()
    t.text('document').notNullable() // DrillDocument JSON
    t.integer('version').notNullable().defaultTo(1)
    t.integer('created_by').references('users.id').onDelete('SET NULL')
    t.integer('updated_by').references('users.id').onDelete('SET NULL')
    t.string('archived_at')
    t.string('created_at').notNullable().defaultTo(now(knex))
    t.string('updated_at').notNullable().defaultTo(now(knex))
    t.index(['ensemble_id'])
  })

  await knex.schema.createTable('drill_parts', (t) => {
    t.increments('id')
    t.integer('drill_id').notNullable().references('drills.id').onDelete('CASCADE')
    t.integer('position').notNullable()
    t.string('name', 60).notNullable()
    t.string('instrument', 40)
    t.unique(['drill_id', 'name'])
    t.unique(['drill_id', 'position'])
  })

  await knex.schema.createTable('drill_chords', (t) => {
    t.increments('id')
    t.integer('drill_id').notNullable().references('drills.id').onDelete('CASCADE')
    t.integer('position').notNullable()
    t.float('start_beat').notNullable()
    t.float('beats').notNullable()
    t.string('symbol', 20)
    t.unique(['drill_id', 'position'])
  })

  await knex.schema.createTable('drill_notes', (t) => {
    t.increments('id')
    t.integer('drill_id').notNullable().references('drills.id').onDelete('CASCADE')
    t.integer('chord_id').notNullable().references('drill_chords.id').onDelete('CASCADE')
    t.integer('part_id').notNullable().references('drill_parts.id').onDelete('CASCADE')
    t.string('note', 6) // concert pitch; null = rest
    t.integer('midi')
    t.unique(['chord_id', 'part_id'])
    t.index(['drill_id'])
    t.index(['part_id'])
  })

  await knex.schema.createTable('assignments', (t) => {
    t.increments('id')
    t.integer('ensemble_id').notNullable().references('ensembles.id').onDelete('CASCADE')
    t.integer('drill_id').notNullable().references('drills.id').onDelete('CASCADE')
    t.integer('section_id').references('sections.id').onDelete('RESTRICT') // null = the whole ensemble
    t.string('part', 60) // drill part to record; null = the part named like the player's section
    t.string('title', 120)
    t.text('instructions')
    t.string('due_at')
    t.integer('created_by').references('users.id').onDelete('SET NULL')
    t.string('archived_at')
    t.string('created_at').notNullable().defaultTo(now(knex))
    t.string('updated_at').notNullable().defaultTo(now(knex))
    t.index(['ensemble_id', 'due_at'])
    t.index(['drill_id'])
  })
}

export async function down (knex: Knex): Promise<void> {
  for (const table of ['assignments', 'drill_notes', 'drill_chords', 'drill_parts', 'drills']) {
    await knex.schema.dropTableIfExists(table)
  }
}

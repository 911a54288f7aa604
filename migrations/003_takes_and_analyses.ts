import type { Knex } from 'knex'

const now = (knex: Knex) => knex.raw("(strftime('%Y-%m-%dT%H:%M:%fZ', 'now'))")

export async function up (knex: Knex): Promise<void> {
  // Takes are never lost by accident: ensemble, drill and player are RESTRICT (archive instead).
  await knex.schema.createTable('takes', (t) => {
    t.increments('id')
    t.integer('ensemble_id').notNullable().references('ensembles.id').onDelete('RESTRICT')
    t.integer('drill_id').notNullable().references('drills.id').onDelete('RESTRICT')
    t.integer('drill_version').notNullable().defaultTo(1)
    t.integer('user_id').notNullable().references('users.id').onDelete('RESTRICT')
    t.integer('assignment_id').references('assignments.id').onDelete('SET NULL')
    t.string('part', 60).notNullable()
    t.string('object_key', 200).notNullable().unique() // opaque, never derived from the file name
    t.string('original_name', 255)
    t.string('mime', 100) // sniffed from the content
    t.bigInteger('bytes')
    t.float('duration_s')
    t.integer('sample_rate')
    t.integer('channels')
    t.enu('status', ['queued', 'analysing', 'analysed', 'failed']).notNullable().defaultTo('queued')
    t.string('error_code', 40)
    t.text('error_message')
    t.string('idempotency_key', 100)
    t.string('withdrawn_at')
    t.integer('withdrawn_by').references('users.id').onDelete('SET NULL')
    t.string('created_at').notNullable().defaultTo(now(knex))
    t.string('updated_at').notNullable().defaultTo(now(knex))
    t.unique(['user_id', 'idempotency_key']) // NULL keys never collide in SQLite
    t.index(['ensemble_id', 'created_at'])
    t.index(['user_id', 'created_at'])
    t.index(['drill_id'])
    t.index(['assignment_id'])
    t.index(['status'])
  })

  // One analysis per scoring of a take; re-scoring with another system adds a row and moves `is_current`.
  await knex.schema.createTable('analyses', (t) => {
    t.increments('id')
    t.integer('take_id').notNullable().references('takes.id').onDelete('CASCADE')
    t.text('system').notNullable() // SystemOptions JSON
    t.string('system_name', 20).notNullable()
    t.float('a4').notNullable()
    t.float('tolerance').notNullable()
    t.text('measurement') // Measurement JSON (independent of the system)
    t.text('report') // TakeReport JSON
    t.float('mean_abs_cents')
    t.float('within_tolerance_share')
    t.float('drift_cents_per_min')
    t.integer('holds_total')
    t.integer('holds_found')
    t.boolean('is_current').notNullable().defaultTo(false)
    t.string('engine_version', 40)
    t.integer('duration_ms')
    t.integer('created_by').references('users.id').onDelete('SET NULL')
    t.string('created_at').notNullable().defaultTo(now(knex))
    t.index(['take_id'])
  })
  await knex.raw('CREATE UNIQUE INDEX analyses_one_current ON analyses (take_id) WHERE is_current = 1')

  await knex.schema.createTable('hold_results', (t) => {
    t.increments('id')
    t.integer('analysis_id').notNullable().references('analyses.id').onDelete('CASCADE')
    t.integer('hold_index').notNullable()
    t.integer('chord_index').notNullable()
    t.string('note', 6)
    t.string('written_note', 6)
    t.string('member', 20)
    t.float('start_s')
    t.float('end_s')
    t.float('target_hz')
    t.float('equal_hz')
    t.float('detected_hz') // null = no pitch found
    t.float('cents_from_target')
    t.float('cents_from_equal')
    t.float('spread_cents')
    t.float('slope_cents_per_s')
    t.float('confidence')
    t.boolean('within_tolerance')
    t.string('reason', 200)
    t.unique(['analysis_id', 'hold_index'])
  })
}

export async function down (knex: Knex): Promise<void> {
  for (const table of ['hold_results', 'analyses', 'takes']) {
    await knex.schema.dropTableIfExists(table)
  }
}

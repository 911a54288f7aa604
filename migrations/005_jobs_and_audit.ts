import type { Knex } from 'knex'

const now = (knex: Knex) => knex.raw("(strftime('%Y-%m-%dT%H:%M:%fZ', 'now'))")

export async function up (knex: Knex): Promise<void> {
  // Background work queue in the database, so jobs survive a restart (server/utils/jobs.ts).
  await knex.schema.createTable('jobs', (t) => {
    t.increments('id')
    t.string('kind', 40).notNullable()
    t.text('payload').notNullable().defaultTo('{}')
    t.enu('status', ['queued', 'running', 'done', 'failed']).notNullable().defaultTo('queued')
    t.integer('attempts').notNullable().defaultTo(0)
    t.integer('max_attempts').notNullable().defaultTo(3)
    t.string('run_after').notNullable().defaultTo(now(knex))
    t.string('locked_by', 100)
    t.string('locked_at')
    t.float('progress').notNullable().defaultTo(0)
    t.text('error')
    t.text('result')
    t.integer('take_id').references('takes.id').onDelete('CASCADE')
    t.string('created_at').notNullable().defaultTo(now(knex))
    t.string('updated_at').notNullable().defaultTo(now(knex))
    t.string('finished_at')
    t.index(['status', 'run_after'])
    t.index(['take_id'])
  })

  await knex.schema.createTable('audit_log', (t) => {
    t.increments('id')
    t.string('at').notNullable().defaultTo(now(knex))
    t.integer('actor_id').references('users.id').onDelete('SET NULL')
    t.string('action', 60).notNullable()
    t.string('subject_type', 40)
    t.integer('subject_id')
    t.integer('ensemble_id').references('ensembles.id').onDelete('SET NULL')
    t.string('ip', 64)
    t.text('data') // JSON
    t.index(['at'])
    t.index(['ensemble_id', 'at'])
    t.index(['actor_id'])
  })
}

export async function down (knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('audit_log')
  await knex.schema.dropTableIfExists('jobs')
}

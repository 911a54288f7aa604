import type { Knex } from 'knex'

const now = (knex: Knex) => knex.raw("(strftime('%Y-%m-%dT%H:%M:%fZ', 'now'))")

export async function up (knex: Knex): Promise<void> {
  await knex.schema.createTable('reviews', (t) => {
    t.increments('id')
    t.integer('take_id').notNullable().references('takes.id').onDelete('CASCADE')
    t.integer('reviewer_id').notNullable().references('users.id').onDelete('RESTRICT')
    t.enu('verdict', ['approved', 'needs_work', 'retake']).notNullable()
    t.text('summary')
    t.string('created_at').notNullable().defaultTo(now(knex))
    t.string('updated_at').notNullable().defaultTo(now(knex))
    t.unique(['take_id', 'reviewer_id'])
  })

  await knex.schema.createTable('review_notes', (t) => {
    t.increments('id')
    t.integer('review_id').notNullable().references('reviews.id').onDelete('CASCADE')
    t.integer('hold_index') // null = a note on the whole take
    t.text('body').notNullable()
    t.string('created_at').notNullable().defaultTo(now(knex))
    t.index(['review_id'])
  })
}

export async function down (knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('review_notes')
  await knex.schema.dropTableIfExists('reviews')
}

import type { Knex } from 'knex'

// Notes pinned to a moment of the take (seconds from its start) and edited in place. Plain
// ALTER TABLE ADD COLUMN: nothing is rebuilt, so reviews and notes already stored stay as they
// are (a note stored with a hold but no moment keeps its hold). SQLite refuses a non-constant
// default on an added column, so `updated_at` is filled from `created_at` instead.
export async function up (knex: Knex): Promise<void> {
  await knex.raw('alter table review_notes add column at_s real')
  await knex.raw('alter table review_notes add column updated_at varchar(255)')
  await knex.raw('update review_notes set updated_at = created_at where updated_at is null')
  await knex.raw('create index if not exists reviews_reviewer_id_index on reviews (reviewer_id)')
}

export async function down (knex: Knex): Promise<void> {
  await knex.raw('drop index if exists reviews_reviewer_id_index')
  // DROP COLUMN needs SQLite 3.35 or later (better-sqlite3 ships a newer one).
  await knex.raw('alter table review_notes drop column updated_at')
  await knex.raw('alter table review_notes drop column at_s')
}

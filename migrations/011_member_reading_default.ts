import type { Knex } from 'knex'

// A membership's concert/written setting may be unset: it then follows the account's own default
// (users.pitch_view). Rows that say the same as their account's default become unset, so nothing
// anyone reads changes; a row that differs keeps its value. SQLite cannot drop NOT NULL in place,
// so the column is replaced: add the new one, copy, drop the old one, rename
// (https://www.sqlite.org/lang_altertable.html; DROP COLUMN needs SQLite 3.35).
export async function up (knex: Knex): Promise<void> {
  await knex.transaction(async (trx) => {
    await trx.raw("alter table memberships add column reads_own text check (reads_own in ('concert', 'written'))")
    await trx.raw(`update memberships set reads_own = reads
      where reads is not (select u.pitch_view from users u where u.id = memberships.user_id)`)
    await trx.raw('alter table memberships drop column reads')
    await trx.raw('alter table memberships rename column reads_own to reads')
  })
}

export async function down (knex: Knex): Promise<void> {
  await knex.transaction(async (trx) => {
    await trx.raw("alter table memberships add column reads_set text not null default 'written' check (reads_set in ('concert', 'written'))")
    await trx.raw(`update memberships set reads_set = coalesce(reads,
      (select case u.pitch_view when 'written' then 'written' else 'concert' end from users u where u.id = memberships.user_id), 'written')`)
    await trx.raw('alter table memberships drop column reads')
    await trx.raw('alter table memberships rename column reads_set to reads')
  })
}

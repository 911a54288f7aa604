import type { Knex } from 'knex'

// Ensemble kinds become choir / brass band / wind band / mixed; members get an instrument (or
// voice part) and a reading preference; invitations remember the invitee's name.
// SQLite cannot change a CHECK constraint in place, so `ensembles` is rebuilt with foreign keys
// off (https://www.sqlite.org/lang_altertable.html#otheralter): that needs no surrounding transaction.
export const config = { transaction: false }

const now = (knex: Knex) => knex.raw("(strftime('%Y-%m-%dT%H:%M:%fZ', 'now'))")
const COLUMNS = 'id, name, kind, description, a4, tolerance, default_system, created_by, archived_at, created_at, updated_at'

async function rebuildEnsembles (knex: Knex, kinds: string[], fallback: string, mapKind: string): Promise<void> {
  await knex.raw('PRAGMA foreign_keys = OFF')
  try {
    await knex.transaction(async (trx) => {
      await trx.schema.createTable('ensembles_rebuilt', (t) => {
        t.increments('id')
        t.string('name', 120).notNullable()
        t.enu('kind', kinds).notNullable().defaultTo(fallback)
        t.text('description')
        t.float('a4').notNullable().defaultTo(440)
        t.float('tolerance').notNullable().defaultTo(10)
        t.text('default_system')
        t.integer('created_by').references('users.id').onDelete('SET NULL')
        t.string('archived_at')
        t.string('created_at').notNullable().defaultTo(now(trx))
        t.string('updated_at').notNullable().defaultTo(now(trx))
      })
      await trx.raw(`insert into ensembles_rebuilt (${COLUMNS}) select ${COLUMNS.replace('kind', `${mapKind} as kind`)} from ensembles`)
      await trx.schema.dropTable('ensembles')
      await trx.schema.renameTable('ensembles_rebuilt', 'ensembles')
      const broken = await trx.raw('PRAGMA foreign_key_check') as unknown[]
      if (broken.length) throw new Error(`ensembles rebuild left ${broken.length} broken references`)
    })
  } finally {
    await knex.raw('PRAGMA foreign_keys = ON')
  }
}

export async function up (knex: Knex): Promise<void> {
  await rebuildEnsembles(knex, ['choir', 'brass_band', 'wind_band', 'mixed'], 'mixed',
    "case kind when 'choir' then 'choir' when 'band' then 'brass_band' else 'mixed' end")
  await knex.transaction(async (trx) => {
    await trx.schema.alterTable('memberships', (t) => {
      t.string('instrument', 40) // instrument id of the tuning engine (voice-* for singers); null = the section's
      t.enu('reads', ['concert', 'written']).notNullable().defaultTo('written')
    })
    await trx.schema.alterTable('invitations', (t) => {
      t.string('name', 120)
      t.string('sent_at')
    })
  })
}

export async function down (knex: Knex): Promise<void> {
  await knex.transaction(async (trx) => {
    await trx.schema.alterTable('invitations', (t) => {
      t.dropColumn('sent_at')
      t.dropColumn('name')
    })
    await trx.schema.alterTable('memberships', (t) => {
      t.dropColumn('reads')
      t.dropColumn('instrument')
    })
  })
  await rebuildEnsembles(knex, ['choir', 'band', 'ensemble'], 'ensemble',
    "case kind when 'choir' then 'choir' when 'mixed' then 'ensemble' else 'band' end")
}

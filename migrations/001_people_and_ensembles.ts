import type { Knex } from 'knex'

// Times are ISO 8601 UTC text ("2026-03-01T18:30:00.000Z"): sortable, readable, one format everywhere.
const now = (knex: Knex) => knex.raw("(strftime('%Y-%m-%dT%H:%M:%fZ', 'now'))")

export async function up (knex: Knex): Promise<void> {
  await knex.schema.createTable('users', (t) => {
    t.increments('id')
    t.string('email', 254).notNullable().unique() // stored lower-case
    t.string('name', 120).notNullable()
    t.string('password_hash') // null until an invited user sets a password
    t.enu('site_role', ['admin'])
    t.string('password_changed_at')
    t.string('last_login_at')
    t.string('disabled_at')
    t.string('created_at').notNullable().defaultTo(now(knex))
    t.string('updated_at').notNullable().defaultTo(now(knex))
  })

  await knex.schema.createTable('ensembles', (t) => {
    t.increments('id')
    t.string('name', 120).notNullable()
    t.enu('kind', ['choir', 'band', 'ensemble']).notNullable().defaultTo('ensemble')
    t.text('description')
    t.float('a4').notNullable().defaultTo(440)
    t.float('tolerance').notNullable().defaultTo(10)
    t.text('default_system') // SystemOptions JSON
    t.integer('created_by').references('users.id').onDelete('SET NULL')
    t.string('archived_at')
    t.string('created_at').notNullable().defaultTo(now(knex))
    t.string('updated_at').notNullable().defaultTo(now(knex))
  })

  await knex.schema.createTable('sections', (t) => {
    t.increments('id')
    t.integer('ensemble_id').notNullable().references('ensembles.id').onDelete('CASCADE')
    t.string('name', 60).notNullable()
    t.integer('position').notNullable().defaultTo(0)
    t.string('instrument', 40) // transposition id of the section's usual instrument
    t.string('created_at').notNullable().defaultTo(now(knex))
    t.unique(['ensemble_id', 'name'])
  })

  await knex.schema.createTable('memberships', (t) => {
    t.increments('id')
    t.integer('ensemble_id').notNullable().references('ensembles.id').onDelete('CASCADE')
    t.integer('user_id').notNullable().references('users.id').onDelete('CASCADE')
    t.enu('role', ['director', 'section_leader', 'player']).notNullable()
    t.integer('section_id').references('sections.id').onDelete('SET NULL')
    t.string('created_at').notNullable().defaultTo(now(knex))
    t.string('updated_at').notNullable().defaultTo(now(knex))
    t.unique(['ensemble_id', 'user_id'])
    t.index(['user_id'])
    t.index(['section_id'])
  })

  await knex.schema.createTable('invitations', (t) => {
    t.increments('id')
    t.integer('ensemble_id').notNullable().references('ensembles.id').onDelete('CASCADE')
    t.string('email', 254).notNullable()
    t.enu('role', ['director', 'section_leader', 'player']).notNullable()
    t.integer('section_id').references('sections.id').onDelete('SET NULL')
    t.string('token_hash', 64).notNullable().unique() // sha-256 hex; the token itself is only mailed
    t.integer('invited_by').references('users.id').onDelete('SET NULL')
    t.string('expires_at').notNullable()
    t.string('accepted_at')
    t.integer('accepted_user_id').references('users.id').onDelete('SET NULL')
    t.string('revoked_at')
    t.string('created_at').notNullable().defaultTo(now(knex))
    t.index(['ensemble_id', 'email'])
  })

  await knex.schema.createTable('password_resets', (t) => {
    t.increments('id')
    t.integer('user_id').notNullable().references('users.id').onDelete('CASCADE')
    t.string('token_hash', 64).notNullable().unique()
    t.string('expires_at').notNullable()
    t.string('used_at')
    t.string('requested_ip', 64)
    t.string('created_at').notNullable().defaultTo(now(knex))
    t.index(['user_id'])
  })

  // Sealed session cookies carry no server state; a signed-out session's id is kept here until
  // it would have expired anyway, so a copied cookie cannot be replayed after sign-out.
  await knex.schema.createTable('revoked_sessions', (t) => {
    t.string('session_id', 64).primary()
    t.integer('user_id').references('users.id').onDelete('CASCADE')
    t.string('revoked_at').notNullable().defaultTo(now(knex))
    t.string('expires_at').notNullable()
    t.index(['expires_at'])
  })
}

export async function down (knex: Knex): Promise<void> {
  for (const table of ['revoked_sessions', 'password_resets', 'invitations', 'memberships', 'sections', 'ensembles', 'users']) {
    await knex.schema.dropTableIfExists(table)
  }
}

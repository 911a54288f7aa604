import type { Knex } from 'knex'

// A person's own reading preferences (the default for memberships that name none); the moment
// every earlier session of an account ended (disabling it ends them for good, so restoring it
// does not bring a copied cookie back); an index so the audit log filters by action.
export async function up (knex: Knex): Promise<void> {
  await knex.schema.alterTable('users', (t) => {
    t.string('instrument', 40) // an id from the tuning engine's instrument list, or null
    t.string('pitch_view', 10).notNullable().defaultTo('concert') // 'concert' | 'written'
    t.string('sessions_revoked_at')
  })
  await knex.schema.alterTable('audit_log', (t) => {
    t.index(['action', 'id'])
  })
}

export async function down (knex: Knex): Promise<void> {
  await knex.schema.alterTable('audit_log', (t) => {
    t.dropIndex(['action', 'id'])
  })
  await knex.schema.alterTable('users', (t) => {
    t.dropColumn('sessions_revoked_at')
    t.dropColumn('pitch_view')
    t.dropColumn('instrument')
  })
}

import type { Knex } from 'knex'

// An edit that changes what an assignee was told (due date, instructions, takes allowed, title,
// their part) is mailed to them once: `changed_at` is the last such change they have not heard
// of, `changed_notified_at` when the message about it was claimed (sent once, like the notice).
export async function up (knex: Knex): Promise<void> {
  await knex.schema.alterTable('assignment_assignees', (t) => {
    t.text('changed_at')
    t.text('changed_notified_at')
  })
}

export async function down (knex: Knex): Promise<void> {
  await knex.schema.alterTable('assignment_assignees', (t) => {
    t.dropColumn('changed_notified_at')
    t.dropColumn('changed_at')
  })
}

import type { Knex } from 'knex'

// Assignments reach sections and/or single players, each with the part they record; every
// assignee is a row of its own that remembers when the notice and the reminder were mailed, so
// a restart never mails twice. An assignment may limit the attempts (takes) each player sends.
// Existing assignments (one section, or the whole ensemble, per row) get their targets and
// assignees here from today's memberships; they count as already notified.

const now = (knex: Knex) => knex.raw("(strftime('%Y-%m-%dT%H:%M:%fZ', 'now'))")

/** The part named like the section, else the only part (frozen copy of the rule at this migration). */
function legacyPart (parts: string[], assignmentPart: string | null, sectionName: string | null): string | null {
  if (assignmentPart) return assignmentPart
  const match = sectionName ? parts.find(p => p.toLowerCase() === sectionName.toLowerCase()) : undefined
  if (match) return match
  return parts.length === 1 ? parts[0]! : null
}

export async function up (knex: Knex): Promise<void> {
  await knex.schema.alterTable('assignments', (t) => {
    t.integer('attempts') // takes each assignee may send; null = no limit
  })

  // What the director chose: a section (user_id null), a player (section_id null), or, for
  // assignments made before this migration without a section, the whole ensemble (both null).
  await knex.schema.createTable('assignment_targets', (t) => {
    t.increments('id')
    t.integer('assignment_id').notNullable().references('assignments.id').onDelete('CASCADE')
    t.integer('section_id').references('sections.id').onDelete('CASCADE')
    t.integer('user_id').references('users.id').onDelete('CASCADE')
    t.string('part', 60) // null = the part named like the section
    t.index(['assignment_id'])
  })

  await knex.schema.createTable('assignment_assignees', (t) => {
    t.increments('id')
    t.integer('assignment_id').notNullable().references('assignments.id').onDelete('CASCADE')
    t.integer('user_id').notNullable().references('users.id').onDelete('CASCADE')
    t.integer('section_id').references('sections.id').onDelete('SET NULL') // the section they were assigned through
    t.string('part', 60)
    t.string('notified_at') // the assignment notice went out (or was claimed for sending)
    t.string('reminded_at') // the reminder went out (or was claimed for sending)
    t.string('created_at').notNullable().defaultTo(now(knex))
    t.unique(['assignment_id', 'user_id'])
    t.index(['user_id'])
  })

  const rows = await knex('assignments as a').leftJoin('sections as s', 's.id', 'a.section_id')
    .select('a.id', 'a.ensemble_id', 'a.drill_id', 'a.section_id', 'a.part', 'a.created_at', 's.name as section_name')
  for (const a of rows) {
    await knex('assignment_targets').insert({ assignment_id: a.id, section_id: a.section_id ?? null, user_id: null, part: a.part ?? null })
    const parts = (await knex('drill_parts').where({ drill_id: a.drill_id }).orderBy('position').select('name')).map((p: { name: string }) => p.name)
    const members = await knex('memberships as m').leftJoin('sections as s', 's.id', 'm.section_id')
      .where('m.ensemble_id', a.ensemble_id).whereIn('m.role', ['player', 'section_leader'])
      .modify((q) => { if (a.section_id != null) q.where('m.section_id', a.section_id) })
      .select('m.user_id', 'm.section_id', 's.name as section_name')
    for (const m of members) {
      await knex('assignment_assignees').insert({
        assignment_id: a.id, user_id: m.user_id, section_id: m.section_id ?? null,
        part: legacyPart(parts, a.part ?? null, m.section_name ?? null),
        notified_at: a.created_at, created_at: a.created_at,
      })
    }
  }
}

export async function down (knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('assignment_assignees')
  await knex.schema.dropTableIfExists('assignment_targets')
  await knex.schema.alterTable('assignments', (t) => { t.dropColumn('attempts') })
}

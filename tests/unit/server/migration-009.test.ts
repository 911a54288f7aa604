// Migration 009 on a database that already holds assignments: each one keeps reaching the people
// it reached before (its section, or the whole ensemble), counts as already notified, and the
// step back removes only what 009 added.
import { afterEach, beforeEach, describe, expect, it } from 'vitest'
import type { Knex } from 'knex'
import { createKnex } from '../../../server/database/knex'
import { migrationSource } from '../../../server/database/migrations'

let db: Knex
beforeEach(() => { db = createKnex(':memory:') })
afterEach(async () => { await db.destroy() })

describe('migration 009', () => {
  it('gives existing assignments their targets and assignees', async () => {
    await db.migrate.up({ migrationSource, name: '001_people_and_ensembles.ts' })
    for (let i = 0; i < 7; i++) await db.migrate.up({ migrationSource }) // up to 008
    const users = await db('users').insert([{ email: 'a@example.org', name: 'A' }, { email: 'b@example.org', name: 'B' }, { email: 'd@example.org', name: 'D' }]).returning('id')
    const [e] = await db('ensembles').insert({ name: 'Choir', kind: 'choir' }).returning('id')
    const [alto, tenor] = await db('sections').insert([{ ensemble_id: e.id, name: 'Alto', position: 0 }, { ensemble_id: e.id, name: 'Tenor', position: 1 }]).returning('id')
    await db('memberships').insert([
      { ensemble_id: e.id, user_id: users[0].id, role: 'player', section_id: alto.id },
      { ensemble_id: e.id, user_id: users[1].id, role: 'section_leader', section_id: tenor.id },
      { ensemble_id: e.id, user_id: users[2].id, role: 'director', section_id: null },
    ])
    const [d] = await db('drills').insert({ ensemble_id: e.id, title: 'D', key_name: 'C major', tempo: 60, a4: 440, system_name: 'equal', tolerance: 10, document: '{}' }).returning('id')
    await db('drill_parts').insert([{ drill_id: d.id, position: 0, name: 'Alto' }, { drill_id: d.id, position: 1, name: 'Tenor' }])
    const [onlyAltos, everyone] = await db('assignments').insert([
      { ensemble_id: e.id, drill_id: d.id, section_id: alto.id, due_at: '2030-01-01T00:00:00Z', created_at: '2029-12-01T00:00:00.000Z' },
      { ensemble_id: e.id, drill_id: d.id, section_id: null, due_at: '2030-01-01T00:00:00Z', created_at: '2029-12-02T00:00:00.000Z' },
    ]).returning('id')
    await db('takes').insert({ ensemble_id: e.id, drill_id: d.id, user_id: users[0].id, assignment_id: onlyAltos.id, part: 'Alto', object_key: 'k1' })

    await db.migrate.up({ migrationSource }) // 009, the next after 008
    expect(await db.schema.hasTable('assignment_assignees')).toBe(true)
    const rows = async (id: number) => db('assignment_assignees').where({ assignment_id: id }).orderBy('user_id').select('user_id', 'part', 'notified_at', 'reminded_at')
    expect(await rows(onlyAltos.id)).toEqual([{ user_id: users[0].id, part: 'Alto', notified_at: '2029-12-01T00:00:00.000Z', reminded_at: null }])
    // The whole ensemble: players and section leaders, each with the part named like their section; not the director.
    expect((await rows(everyone.id)).map(r => [r.user_id, r.part])).toEqual([[users[0].id, 'Alto'], [users[1].id, 'Tenor']])
    expect(await db('assignment_targets').where({ assignment_id: everyone.id }).select('section_id', 'user_id')).toEqual([{ section_id: null, user_id: null }])
    expect(await db('assignments').where({ id: onlyAltos.id }).first('attempts')).toEqual({ attempts: null })

    await db.migrate.down({ migrationSource })
    expect(await db.schema.hasTable('assignment_assignees')).toBe(false)
    expect(await db.schema.hasColumn('assignments', 'attempts')).toBe(false)
    expect(await db('assignments').count({ n: '*' })).toEqual([{ n: 2 }])
    expect(await db('takes').count({ n: '*' })).toEqual([{ n: 1 }])
  })
})

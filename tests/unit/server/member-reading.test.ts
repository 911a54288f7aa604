// A membership's concert/written setting and the account default it falls back to; migration 011
// on a database that already holds members; the member list a section leader sees.
import { afterEach, beforeEach, describe, expect, it } from 'vitest'
import type { Knex } from 'knex'
import { createKnex } from '../../../server/database/knex'
import { migrateLatest, migrationSource } from '../../../server/database/migrations'
import { listMembers, updateMember } from '../../../server/utils/members'
import { updateProfile } from '../../../server/utils/profile'

let db: Knex
beforeEach(() => { db = createKnex(':memory:') })
afterEach(async () => { await db.destroy() })

const q = { sort: 'name' as const, dir: 'asc' as const, page: 1, pageSize: 25, q: undefined, role: undefined, sectionId: undefined }

async function people (): Promise<{ ensembleId: number, users: Record<string, number>, sections: Record<string, number> }> {
  const users: Record<string, number> = {}
  for (const [key, name, view] of [['dir', 'Dana Director', 'concert'], ['horn', 'Hal Horn', 'written'], ['alto', 'Ada Alto', 'concert'], ['lead', 'Lee Leader', 'concert']] as const) {
    const [u] = await db('users').insert({ email: `${key}@example.org`, name, pitch_view: view }).returning('id')
    users[key] = u.id
  }
  const [e] = await db('ensembles').insert({ name: 'E', kind: 'mixed' }).returning('id')
  const sections: Record<string, number> = {}
  for (const [i, name] of ['Horns', 'Altos'].entries()) {
    const [s] = await db('sections').insert({ ensemble_id: e.id, name, position: i }).returning('id')
    sections[name] = s.id
  }
  return { ensembleId: e.id, users, sections }
}

describe('migration 011 on a database that holds members', () => {
  it('keeps what every member reads: a setting equal to the account default becomes unset, a different one stays', async () => {
    // Up to 008, the schema before this change (the reading column is NOT NULL, default written).
    for (let i = 0; i < 8; i++) await db.migrate.up({ migrationSource })
    const { ensembleId, users, sections } = await people()
    await db('memberships').insert({ ensemble_id: ensembleId, user_id: users.dir, role: 'director' }) // default 'written', account says concert
    await db('memberships').insert([
      { ensemble_id: ensembleId, user_id: users.horn, role: 'player', section_id: sections.Horns, reads: 'written' }, // same as the account
      { ensemble_id: ensembleId, user_id: users.alto, role: 'player', section_id: sections.Altos, reads: 'concert' }, // same as the account
    ])
    const before = await db('memberships').orderBy('user_id').select('user_id', 'reads')
    await migrateLatest(db)
    const rows = await db('memberships').orderBy('user_id').select('user_id', 'reads')
    expect(rows.map(r => r.reads)).toEqual(['written', null, null])
    const page = await listMembers(db, ensembleId, q, { withEmail: true })
    // What each person reads is what they read before the migration.
    for (const b of before) expect(page.items.find(m => m.userId === b.user_id)!.reads).toBe(b.reads)
    expect(page.items.find(m => m.userId === users.horn)!.readsFromAccount).toBe(true)
    expect(page.items.find(m => m.userId === users.dir)!.readsFromAccount).toBe(false)
    // The column still refuses anything but the two readings (transposing-instrument practice
    // knows concert and written pitch only: common practice).
    await expect(db('memberships').where({ user_id: users.alto }).update({ reads: 'sounding' })).rejects.toThrow(/CHECK/)
    await db.migrate.rollback({ migrationSource })
    const back = await db('memberships').orderBy('user_id').select('user_id', 'reads')
    expect(back).toEqual(before)
  })
})

describe('a membership without its own reading', () => {
  it('follows the account default, also after the account changes it; a set reading does not', async () => {
    await migrateLatest(db)
    const { ensembleId, users, sections } = await people()
    await db('memberships').insert([
      { ensemble_id: ensembleId, user_id: users.dir, role: 'director' },
      { ensemble_id: ensembleId, user_id: users.horn, role: 'player', section_id: sections.Horns },
    ])
    const horn = async () => (await listMembers(db, ensembleId, q, { withEmail: true })).items.find(m => m.userId === users.horn)!
    expect(await horn()).toMatchObject({ reads: 'written', readsFromAccount: true })
    await updateProfile(db, users.horn!, { pitchView: 'concert' }, null)
    expect(await horn()).toMatchObject({ reads: 'concert', readsFromAccount: true })
    const actor = { id: users.dir!, ip: null }
    const set = await updateMember(db, ensembleId, users.horn!, actor, { reads: 'written' })
    expect(set.ok && set.member).toMatchObject({ reads: 'written', readsFromAccount: false })
    await updateProfile(db, users.horn!, { pitchView: 'concert' }, null)
    expect(await horn()).toMatchObject({ reads: 'written', readsFromAccount: false })
    const unset = await updateMember(db, ensembleId, users.horn!, actor, { reads: null })
    expect(unset.ok && unset.member).toMatchObject({ reads: 'concert', readsFromAccount: true })
  })
})

describe('the member list of a section leader', () => {
  it('holds their own section only, without addresses', async () => {
    await migrateLatest(db)
    const { ensembleId, users, sections } = await people()
    await db('memberships').insert([
      { ensemble_id: ensembleId, user_id: users.dir, role: 'director' },
      { ensemble_id: ensembleId, user_id: users.horn, role: 'player', section_id: sections.Horns },
      { ensemble_id: ensembleId, user_id: users.alto, role: 'player', section_id: sections.Altos },
      { ensemble_id: ensembleId, user_id: users.lead, role: 'section_leader', section_id: sections.Altos },
    ])
    // The rule: section leaders see their section; only directors and site admins see addresses.
    const page = await listMembers(db, ensembleId, q, { withEmail: false, onlySection: { sectionId: sections.Altos!, userId: users.lead! } })
    expect(page.items.map(m => m.name)).toEqual(['Ada Alto', 'Lee Leader'])
    expect(page.total).toBe(2)
    expect(page.onlySection).toEqual({ sectionId: sections.Altos, section: 'Altos' })
    expect(page.items.every(m => !('email' in m))).toBe(true)
    // A search cannot reach past the section.
    expect((await listMembers(db, ensembleId, { ...q, q: 'Hal' }, { withEmail: false, onlySection: { sectionId: sections.Altos!, userId: users.lead! } })).total).toBe(0)
    // A leader without a section sees only themselves.
    await db('memberships').where({ user_id: users.lead }).update({ section_id: null })
    const alone = await listMembers(db, ensembleId, q, { withEmail: false, onlySection: { sectionId: null, userId: users.lead! } })
    expect(alone.items.map(m => m.name)).toEqual(['Lee Leader'])
    // Everyone else: the whole ensemble.
    expect((await listMembers(db, ensembleId, q, { withEmail: false })).onlySection).toBeNull()
  })
})

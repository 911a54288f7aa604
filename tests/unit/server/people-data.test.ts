// The ensemble, section, member and invitation data functions against an in-memory database.
import { afterEach, beforeEach, describe, expect, it } from 'vitest'
import type { Knex } from 'knex'
import { createKnex } from '../../../server/database/knex'
import { migrateLatest } from '../../../server/database/migrations'
import { mergeSections, removeSection, reorderSections, createSection, updateSection } from '../../../server/utils/sections'
import { listMembers, removeMember, updateMember } from '../../../server/utils/members'
import { acceptInvitation, inviteToEnsemble, findInvitationByToken, resendInvitation } from '../../../server/utils/invitations'
import { mergeSystem, storedSystem } from '../../../server/utils/ensemble-settings'
import { hashToken } from '../../../server/utils/accounts'

let db: Knex
let ensembleId: number
const actor = { id: 0, ip: '127.0.0.1' }
const users: Record<string, number> = {}
const sections: Record<string, number> = {}

beforeEach(async () => {
  db = createKnex(':memory:')
  await migrateLatest(db)
  for (const [key, name] of [['dir', 'Dee Rector'], ['p1', 'ann player'], ['p2', 'Bob Player'], ['p3', 'Cy Player']]) {
    const [u] = await db('users').insert({ email: `${key}@example.org`, name }).returning('id')
    users[key!] = u.id
  }
  actor.id = users.dir!
  const [e] = await db('ensembles').insert({ name: 'E', kind: 'choir' }).returning('id')
  ensembleId = e.id
  for (const [i, name] of ['Soprano', 'Alto', 'Tenor'].entries()) {
    const [s] = await db('sections').insert({ ensemble_id: ensembleId, name, position: i }).returning('id')
    sections[name] = s.id
  }
  await db('memberships').insert([
    { ensemble_id: ensembleId, user_id: users.dir, role: 'director' },
    { ensemble_id: ensembleId, user_id: users.p1, role: 'player', section_id: sections.Soprano },
    { ensemble_id: ensembleId, user_id: users.p2, role: 'player', section_id: sections.Alto },
    { ensemble_id: ensembleId, user_id: users.p3, role: 'section_leader', section_id: sections.Alto },
  ])
})
afterEach(async () => { await db.destroy() })

const audit = async (action: string) => (await db('audit_log').where({ action }).orderBy('id')).map(r => ({ ...r, data: JSON.parse(r.data) }))

describe('sections', () => {
  it('refuses a name already used in another case, and audits a rename with before and after', async () => {
    expect(await createSection(db, ensembleId, actor, { name: 'soprano' })).toEqual({ ok: false, code: 'section_name_taken' })
    expect(await updateSection(db, ensembleId, sections.Tenor!, actor, { name: 'ALTO' })).toEqual({ ok: false, code: 'section_name_taken' })
    const r = await updateSection(db, ensembleId, sections.Tenor!, actor, { name: 'Tenor 1' })
    expect(r.ok && r.section.name).toBe('Tenor 1')
    expect((await audit('section.updated'))[0]!.data).toEqual({ before: { name: 'Tenor', position: 2, instrument: null }, after: { name: 'Tenor 1', position: 2, instrument: null } })
  })

  it("moves members and the section's assignments on merge and on removal, so none is left without a section", async () => {
    const [d] = await db('drills').insert({ ensemble_id: ensembleId, title: 'D', key_name: 'C major', tempo: 60, a4: 440, system_name: 'equal', tolerance: 10, document: '{}' }).returning('id')
    await db('assignments').insert({ ensemble_id: ensembleId, drill_id: d.id, section_id: sections.Alto, title: 'Altos only' })
    // Assignments hold their section with RESTRICT: a plain delete would fail, so removal needs a destination.
    expect(await removeSection(db, ensembleId, sections.Alto!, actor, undefined)).toEqual({ ok: false, code: 'move_to_required' })
    const merged = await mergeSections(db, ensembleId, sections.Alto!, sections.Soprano!, actor, 'Upper voices')
    expect(merged.ok && merged.section).toMatchObject({ name: 'Upper voices', memberCount: 3 })
    expect(await db('assignments').pluck('section_id')).toEqual([sections.Soprano])
    expect(await db('sections').where({ id: sections.Alto }).first()).toBeUndefined()
    // An empty section without assignments goes without a destination.
    expect(await removeSection(db, ensembleId, sections.Tenor!, actor, undefined)).toEqual({ ok: true })
    expect(await db('memberships').whereNull('section_id').whereNot({ role: 'director' }).count({ n: '*' })).toEqual([{ n: 0 }])
    expect(await mergeSections(db, ensembleId, sections.Soprano!, sections.Soprano!, actor)).toEqual({ ok: false, code: 'same_section' })
  })

  it('reorders only with every section listed once', async () => {
    expect(await reorderSections(db, ensembleId, actor, [sections.Tenor!, sections.Soprano!])).toEqual({ ok: false, code: 'bad_order' })
    expect(await reorderSections(db, ensembleId, actor, [sections.Tenor!, sections.Soprano!, sections.Soprano!])).toEqual({ ok: false, code: 'bad_order' })
    const r = await reorderSections(db, ensembleId, actor, [sections.Tenor!, sections.Alto!, sections.Soprano!])
    expect(r.ok && r.sections.map(s => [s.name, s.position])).toEqual([['Tenor', 0], ['Alto', 1], ['Soprano', 2]])
  })
})

describe('members', () => {
  const q = { sort: 'name' as const, dir: 'asc' as const, page: 1, pageSize: 25, q: undefined, role: undefined, sectionId: undefined }

  it('sorts names without regard to case and keeps addresses for directors only', async () => {
    const page = await listMembers(db, ensembleId, q, { withEmail: false })
    // Case-insensitive order, common practice for a roster ("ann" between nothing and "Bob").
    expect(page.items.map(m => m.name)).toEqual(['ann player', 'Bob Player', 'Cy Player', 'Dee Rector'])
    expect(page.items.every(m => !('email' in m))).toBe(true)
    expect((await listMembers(db, ensembleId, { ...q, q: 'p1@' }, { withEmail: false })).total).toBe(0)
    expect((await listMembers(db, ensembleId, { ...q, q: 'p1@' }, { withEmail: true })).items.map(m => m.email)).toEqual(['p1@example.org'])
    // LIKE wildcards typed by a user match themselves only.
    expect((await listMembers(db, ensembleId, { ...q, q: '%' }, { withEmail: true })).total).toBe(0)
    expect((await listMembers(db, ensembleId, { ...q, sort: 'role' }, { withEmail: true })).items.map(m => m.role)).toEqual(['director', 'section_leader', 'player', 'player'])
    expect((await listMembers(db, ensembleId, { ...q, sectionId: 'none' }, { withEmail: true })).items.map(m => m.role)).toEqual(['director'])
  })

  it('never removes or demotes the last director', async () => {
    expect(await updateMember(db, ensembleId, users.dir!, actor, { role: 'player' })).toEqual({ ok: false, code: 'last_director' })
    expect(await removeMember(db, ensembleId, users.dir!, actor)).toEqual({ ok: false, code: 'last_director' })
    expect(await updateMember(db, ensembleId, users.p1!, actor, { sectionId: 9999 })).toEqual({ ok: false, code: 'section_not_found' })
    const r = await updateMember(db, ensembleId, users.p1!, actor, { role: 'director' })
    expect(r.ok && r.member.role).toBe('director')
    expect((await updateMember(db, ensembleId, users.dir!, actor, { role: 'player' })).ok).toBe(true)
    expect((await audit('member.role_changed')).map(a => a.data)).toEqual([
      { before: { role: 'player' }, after: { role: 'director' } },
      { before: { role: 'director' }, after: { role: 'player' } },
    ])
  })
})

describe('invitations', () => {
  it('stores the token as its SHA-256 hash and spends it on acceptance', async () => {
    const r = await inviteToEnsemble(db, ensembleId, actor, { email: 'New@Example.org ', role: 'player', sectionId: sections.Tenor! }, 7 * 86400e3)
    expect(r.ok).toBe(true)
    if (!r.ok) return
    const row = await db('invitations').where({ id: r.invitation.id }).first()
    // FIPS 180-4 SHA-256 of "abc" is ba7816bf…15ad: the helper is plain SHA-256 in hex.
    expect(hashToken('abc')).toBe('ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad')
    expect(row.token_hash).toBe(hashToken(r.invitation.token))
    expect(JSON.stringify(row)).not.toContain(r.invitation.token)
    expect(row.email).toBe('new@example.org')
    const found = await findInvitationByToken(db, r.invitation.token)
    expect(found?.status).toBe('open')
    expect(found?.preview).toEqual({ ensemble: 'E', role: 'player', section: 'Tenor', email: 'new@example.org', hasAccount: false })
    const acc = await acceptInvitation(db, r.invitation.id, { name: 'New Person', passwordHash: 'hash' }, null)
    expect(acc.ok).toBe(true)
    expect(await acceptInvitation(db, r.invitation.id, { name: 'Again', passwordHash: 'hash' }, null)).toEqual({ ok: false, code: 'gone' })
    expect((await findInvitationByToken(db, r.invitation.token))?.status).toBe('accepted')
    expect(await inviteToEnsemble(db, ensembleId, actor, { email: 'new@example.org', role: 'player', sectionId: null }, 1000)).toEqual({ ok: false, code: 'already_member' })
  })

  it('replaces an open invitation to the same address, and a resend kills the old link', async () => {
    const a = await inviteToEnsemble(db, ensembleId, actor, { email: 'x@example.org', role: 'player', sectionId: null }, 86400e3)
    const b = await inviteToEnsemble(db, ensembleId, actor, { email: 'x@example.org', role: 'section_leader', sectionId: null }, 86400e3)
    if (!a.ok || !b.ok) throw new Error('not created')
    expect((await findInvitationByToken(db, a.invitation.token))?.status).toBe('revoked')
    const again = await resendInvitation(db, ensembleId, b.invitation.id, actor, 86400e3)
    if (!again.ok) throw new Error('not resent')
    expect(await findInvitationByToken(db, b.invitation.token)).toBeNull()
    expect((await findInvitationByToken(db, again.invitation.token))?.status).toBe('open')
    expect(await resendInvitation(db, ensembleId, a.invitation.id, actor, 1000)).toEqual({ ok: false, code: 'invitation_closed' })
  })
})

describe('default target system', () => {
  it('keeps options when only they change and drops them when the system changes', () => {
    const current = storedSystem(JSON.stringify({ name: 'meantone', fraction: '1/6' }))
    const same = mergeSystem(current, { systemOptions: { tonic: 'Eb' } })
    expect(same.ok && same.system).toMatchObject({ name: 'meantone', fraction: '1/6', tonic: 'Eb' })
    const other = mergeSystem(current, { system: 'pythagorean' })
    expect(other.ok && other.system.fraction).toBe('1/4') // back to the schema's default
    const bad = mergeSystem(current, { system: 'scala' })
    expect(!bad.ok && bad.issues[0]!.path).toEqual(['systemOptions', 'scala'])
    expect(storedSystem('not json').name).toBe('equal')
  })
})

// Data functions of the account and admin areas on a throwaway in-memory database.
import { createHash } from 'node:crypto'
import { afterEach, beforeEach, describe, expect, it } from 'vitest'
import type { Knex } from 'knex'
import { createKnex } from '../../../server/database/knex'
import { migrateLatest } from '../../../server/database/migrations'
import { changeUser, listUsers } from '../../../server/utils/admin-users'
import { createEnsembleWithDirector, listAdminEnsembles, setEnsembleArchived } from '../../../server/utils/admin-ensembles'
import { listAuditPage, writeAudit } from '../../../server/utils/audit'
import { hashToken } from '../../../server/utils/accounts'
import { findProfile, updateProfile } from '../../../server/utils/profile'
import { ensembleInvitationMail, invitationLink } from '../../../server/utils/invitation-mail'

let db: Knex
/** Invitations stay open for 7 days (the default). */
const WEEK = 7 * 86_400_000
let adminId: number
beforeEach(async () => {
  db = createKnex(':memory:')
  await migrateLatest(db)
  // Invented people for these checks only.
  const rows = [
    { email: 'admin@example.org', name: 'Ada Admin', site_role: 'admin' },
    ...Array.from({ length: 11 }, (_, i) => ({ email: `p${String(i).padStart(2, '0')}@example.org`, name: `Person ${String(i).padStart(2, '0')}`, site_role: null })),
    { email: 'under_score@example.org', name: '100% Percent', site_role: null },
  ]
  await db('users').insert(rows)
  adminId = (await db('users').where({ email: 'admin@example.org' }).first('id')).id
})
afterEach(async () => { await db.destroy() })

describe('hashToken', () => {
  // FIPS 180-4 / its example set: SHA-256("abc") and SHA-256("") (published test vectors).
  it.each([
    ['abc', 'ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad'],
    ['', 'e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855'],
  ])('hashes %j as SHA-256', (text, hex) => {
    expect(hashToken(text)).toBe(hex)
  })
})

describe('listUsers', () => {
  const all = { status: 'all' as const, page: 1, pageSize: 25 }
  it('pages by name without gaps or repeats, and counts every match', async () => {
    const first = await listUsers(db, { ...all, pageSize: 5 })
    const second = await listUsers(db, { ...all, pageSize: 5, page: 2 })
    const third = await listUsers(db, { ...all, pageSize: 5, page: 3 })
    expect(first.total).toBe(13)
    const names = [...first.items, ...second.items, ...third.items].map(u => u.name)
    expect(names).toHaveLength(13)
    expect(new Set(names).size).toBe(13)
    expect(names).toEqual([...names].sort((a, b) => a.toLowerCase().localeCompare(b.toLowerCase())))
  })

  it('treats % and _ in a search as plain characters', async () => {
    expect((await listUsers(db, { ...all, q: '100%' })).items.map(u => u.email)).toEqual(['under_score@example.org'])
    expect((await listUsers(db, { ...all, q: 'under_s' })).items.map(u => u.email)).toEqual(['under_score@example.org'])
    expect((await listUsers(db, { ...all, q: '_' })).total).toBe(1)
    expect((await listUsers(db, { ...all, q: 'PERSON 0' })).total).toBe(10)
  })
})

describe('changeUser', () => {
  it('refuses the admin\'s own account, answers null for no one, and audits real changes only', async () => {
    const p = (await db('users').where({ email: 'p00@example.org' }).first('id')).id
    expect(await changeUser(db, adminId, adminId, { disabled: true }, null)).toEqual({ ok: false, code: 'own_account' })
    expect(await changeUser(db, adminId, 99999, { disabled: true }, null)).toBeNull()
    const done = await changeUser(db, adminId, p, { disabled: true }, '127.0.0.1')
    expect(done).toMatchObject({ ok: true, user: { id: p, disabled: true } })
    await changeUser(db, adminId, p, { disabled: true }, null) // already disabled: no second row
    const row = await db('users').where({ id: p }).first()
    expect(row.sessions_revoked_at).toBe(row.disabled_at)
    const audit = await listAuditPage(db, { action: 'user', page: 1, pageSize: 10 })
    expect(audit.items).toHaveLength(1)
    expect(audit.items[0]).toMatchObject({ action: 'user.disabled', actorId: adminId, actor: 'Ada Admin', before: { disabled: false }, after: { disabled: true }, target: { type: 'user', id: p, label: 'Person 00' } })
  })
})

describe('ensembles', () => {
  it('creates one with a director invitation whose token is stored only as its SHA-256', async () => {
    const { ensemble, invitation } = await createEnsembleWithDirector(db, adminId, { name: 'Tidewater Singers', kind: 'choir', directorEmail: 'lead@example.org' }, null, WEEK)
    expect(ensemble).toMatchObject({ name: 'Tidewater Singers', kind: 'choir', archived: false, directors: [], pendingDirectorInvitations: ['lead@example.org'] })
    const row = await db('invitations').where({ id: invitation.id }).first()
    // node:crypto as the reference implementation of SHA-256.
    expect(row.token_hash).toBe(createHash('sha256').update(invitation.token).digest('hex'))
    expect(row.role).toBe('director')
    const days = (Date.parse(row.expires_at) - Date.now()) / 86400_000
    expect(days).toBeGreaterThan(6.99)
    expect(days).toBeLessThanOrEqual(7)
    const link = invitationLink('https://drift.example.org/', invitation.token)
    expect(link).toBe(`https://drift.example.org/invitations/${invitation.token}`)
    const mail = ensembleInvitationMail('lead@example.org', { name: null, ensemble: 'Tidewater Singers', inviter: 'Ada Admin', role: 'director', section: null, link, expiresAt: invitation.expiresAt })
    expect([...`${mail.text} ${mail.html ?? ''}`.matchAll(/https?:\/\/[^\s"<>]+/g)].map(m => m[0])).toEqual([link])
    expect(mail.text).toContain('Ada Admin invites you to join Tidewater Singers on Driftline as a director')
    // The invitation and its audit row are one change; the audit row never holds the token.
    const audit = await db('audit_log').where({ action: 'invitation.created', subject_id: invitation.id }).first()
    expect(audit).toBeTruthy()
    expect(JSON.stringify(audit)).not.toContain(invitation.token)
  })

  it('archives and restores, listing open ones first', async () => {
    const a = (await createEnsembleWithDirector(db, adminId, { name: 'Alpha Band', kind: 'choir', directorEmail: 'a@example.org' }, null, WEEK)).ensemble
    await createEnsembleWithDirector(db, adminId, { name: 'Beta Band', kind: 'choir', directorEmail: 'b@example.org' }, null, WEEK)
    expect((await setEnsembleArchived(db, adminId, a.id, true, null))!.archived).toBe(true)
    const list = await listAdminEnsembles(db, { archived: 'all', page: 1, pageSize: 25 })
    expect(list.items.map(e => e.name)).toEqual(['Beta Band', 'Alpha Band'])
    expect((await listAdminEnsembles(db, { archived: 'archived', page: 1, pageSize: 25 })).items.map(e => e.name)).toEqual(['Alpha Band'])
    expect(await setEnsembleArchived(db, adminId, 9999, true, null)).toBeNull()
  })
})

describe('audit log', () => {
  it('filters a family by its dot, so "user" never matches "username.x"', async () => {
    for (const action of ['user.disabled', 'user.restored', 'username.changed', 'users', 'ensemble.created']) await writeAudit(db, { action })
    const fam = await listAuditPage(db, { action: 'user', page: 1, pageSize: 10 })
    expect(fam.items.map(i => i.action).sort()).toEqual(['user.disabled', 'user.restored'])
    expect((await listAuditPage(db, { action: 'user.disabled', page: 1, pageSize: 10 })).total).toBe(1)
    const page2 = await listAuditPage(db, { page: 2, pageSize: 2 })
    expect(page2.total).toBe(5)
    expect(page2.items.map(i => i.action)).toEqual(['username.changed', 'user.restored'])
  })

  it('keeps older rows that carry plain data readable, and survives a broken data column', async () => {
    await writeAudit(db, { action: 'drill.import', data: { title: 'Chorale' } })
    await db('audit_log').insert({ action: 'legacy.row', data: '{not json' })
    const { items } = await listAuditPage(db, { page: 1, pageSize: 10 })
    expect(items.find(i => i.action === 'drill.import')).toMatchObject({ before: null, after: { title: 'Chorale' } })
    expect(items.find(i => i.action === 'legacy.row')).toMatchObject({ before: null, after: null, target: null })
  })
})

describe('profile', () => {
  it('saves only what changed and audits it with before and after', async () => {
    const id = (await db('users').where({ email: 'p01@example.org' }).first('id')).id
    expect(await findProfile(db, id)).toMatchObject({ instrument: null, pitchView: 'concert' })
    const p = await updateProfile(db, id, { name: 'Person 01', instrument: 'horn-f', pitchView: 'written' }, null)
    expect(p).toMatchObject({ name: 'Person 01', instrument: 'horn-f', pitchView: 'written' })
    const { items } = await listAuditPage(db, { action: 'account', page: 1, pageSize: 10 })
    expect(items).toHaveLength(1)
    expect(items[0]).toMatchObject({ before: { instrument: null, pitchView: 'concert' }, after: { instrument: 'horn-f', pitchView: 'written' } })
    await updateProfile(db, id, { pitchView: 'written' }, null)
    expect((await listAuditPage(db, { action: 'account', page: 1, pageSize: 10 })).total).toBe(1)
    expect(await updateProfile(db, 99999, { pitchView: 'written' }, null)).toBeNull()
  })
})

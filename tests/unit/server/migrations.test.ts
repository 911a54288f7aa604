import { mkdtempSync, readdirSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterEach, beforeEach, describe, expect, it } from 'vitest'
import type { Knex } from 'knex'
import { createKnex } from '../../../server/database/knex'
import { MIGRATIONS, migrateLatest, migrationSource } from '../../../server/database/migrations'

const DIR = join(import.meta.dirname, '../../../migrations')
const DOMAIN_TABLES = [
  'users', 'ensembles', 'sections', 'memberships', 'invitations', 'password_resets', 'revoked_sessions',
  'drills', 'drill_versions', 'drill_parts', 'drill_chords', 'drill_notes', 'assignments',
  'takes', 'analyses', 'hold_results', 'reviews', 'review_notes', 'jobs', 'audit_log',
]

let db: Knex
beforeEach(() => { db = createKnex(':memory:') })
afterEach(async () => { await db.destroy() })

const tables = async () => (await db.raw("select name from sqlite_master where type = 'table' and name not like 'knex_%' and name <> 'sqlite_sequence'") as { name: string }[]).map(r => r.name).sort()

describe('migrations', () => {
  it('lists every file of migrations/ under its file name, so the CLI and the server share one history', () => {
    const files = readdirSync(DIR).filter(f => f.endsWith('.ts')).sort()
    expect(Object.keys(MIGRATIONS).sort()).toEqual(files)
  })

  it('creates the whole domain and rolls it all back', async () => {
    const ran = await migrateLatest(db)
    expect(ran).toEqual(Object.keys(MIGRATIONS).sort())
    expect(await tables()).toEqual([...DOMAIN_TABLES].sort())
    expect(await migrateLatest(db)).toEqual([]) // idempotent
    await db.migrate.rollback({ migrationSource }, true)
    expect(await tables()).toEqual([])
  })

  it('turns foreign keys on, and a file gets WAL, a busy timeout and its folder created', async () => {
    const fk = await db.raw('pragma foreign_keys') as { foreign_keys: number }[]
    expect(fk[0]!.foreign_keys).toBe(1)
    await migrateLatest(db)
    await expect(db('memberships').insert({ ensemble_id: 999, user_id: 999, role: 'player' })).rejects.toThrow(/FOREIGN KEY/)

    const dir = mkdtempSync(join(tmpdir(), 'driftline-db-'))
    const file = createKnex(join(dir, 'nested', 'folder', 'db.sqlite'))
    try {
      expect((await file.raw('pragma journal_mode') as { journal_mode: string }[])[0]!.journal_mode).toBe('wal')
      expect((await file.raw('pragma busy_timeout') as { timeout: number }[])[0]!.timeout).toBe(5000)
    } finally {
      await file.destroy()
      rmSync(dir, { recursive: true, force: true })
    }
  })

  it('enforces the domain rules in the schema', async () => {
    await migrateLatest(db)
    const [u] = await db('users').insert({ email: 'p@example.org', name: 'P' }).returning('id')
    const [e] = await db('ensembles').insert({ name: 'E' }).returning('id')
    await expect(db('memberships').insert({ ensemble_id: e.id, user_id: u.id, role: 'conductor' })).rejects.toThrow(/CHECK/)
    await db('memberships').insert({ ensemble_id: e.id, user_id: u.id, role: 'player' })
    await expect(db('memberships').insert({ ensemble_id: e.id, user_id: u.id, role: 'director' })).rejects.toThrow(/UNIQUE/)
    const [d] = await db('drills').insert({ ensemble_id: e.id, title: 'D', key_name: 'C major', tempo: 60, a4: 440, system_name: 'equal', tolerance: 10, document: '{}' }).returning('id')
    const take = (key: string, idem: string | null) => ({ ensemble_id: e.id, drill_id: d.id, user_id: u.id, part: 'S', object_key: key, idempotency_key: idem })
    await db('takes').insert(take('k1', 'form-1'))
    await expect(db('takes').insert(take('k2', 'form-1'))).rejects.toThrow(/UNIQUE/) // a second submit of the same form
    await db('takes').insert(take('k3', null))
    await db('takes').insert(take('k4', null)) // takes without a key never collide
    await expect(db('takes').insert(take('k3', 'form-2'))).rejects.toThrow(/UNIQUE/) // object keys are unique
    const [t] = await db('takes').where({ object_key: 'k1' }).select('id')
    const analysis = (current: boolean) => ({ take_id: t.id, system: '{}', system_name: 'equal', a4: 440, tolerance: 10, is_current: current })
    await db('analyses').insert(analysis(true))
    await db('analyses').insert(analysis(false))
    await expect(db('analyses').insert(analysis(true))).rejects.toThrow(/UNIQUE/) // one current analysis per take
    await expect(db('ensembles').where({ id: e.id }).delete()).rejects.toThrow(/FOREIGN KEY/) // takes are never lost by cascade
  })

  it('rebuilds ensembles with the new kinds and keeps every row that points at them', async () => {
    await db.migrate.up({ migrationSource, name: '001_people_and_ensembles.ts' })
    for (let i = 0; i < 4; i++) await db.migrate.up({ migrationSource })
    const [u] = await db('users').insert({ email: 'd@example.org', name: 'D' }).returning('id')
    const rows = await db('ensembles').insert([{ name: 'Choir', kind: 'choir' }, { name: 'Band', kind: 'band' }, { name: 'Other', kind: 'ensemble' }]).returning('id')
    const [s] = await db('sections').insert({ ensemble_id: rows[1].id, name: 'Cornet' }).returning('id')
    await db('memberships').insert({ ensemble_id: rows[1].id, user_id: u.id, role: 'director', section_id: s.id })
    expect(await migrateLatest(db)).toContain('006_people_settings.ts')
    expect(await db('ensembles').orderBy('id').pluck('kind')).toEqual(['choir', 'brass_band', 'mixed'])
    expect(await db('memberships').where({ ensemble_id: rows[1].id }).first()).toMatchObject({ user_id: u.id, section_id: s.id, reads: 'written', instrument: null })
    expect((await db.raw('pragma foreign_keys') as { foreign_keys: number }[])[0]!.foreign_keys).toBe(1)
    await expect(db('ensembles').insert({ name: 'X', kind: 'band' })).rejects.toThrow(/CHECK/)
    // Deleting the ensemble still cascades to its sections (the references survived the rebuild).
    await db('memberships').delete()
    await db('ensembles').where({ id: rows[1].id }).delete()
    expect(await db('sections').count({ n: '*' })).toEqual([{ n: 0 }])
  })
  it('adds drill versions to a database that already holds drills with takes, and takes them out again', async () => {
    await db.migrate.up({ migrationSource, name: '001_people_and_ensembles.ts' })
    for (let i = 0; i < 6; i++) await db.migrate.up({ migrationSource })
    const [u] = await db('users').insert({ email: 'p@example.org', name: 'P' }).returning('id')
    const [e] = await db('ensembles').insert({ name: 'Choir', kind: 'choir' }).returning('id')
    const [d] = await db('drills').insert({ ensemble_id: e.id, title: 'D', key_name: 'C major', tempo: 60, a4: 440, system_name: 'equal', tolerance: 10, document: '{"title":"D"}', version: 2 }).returning('id')
    await db('takes').insert({ ensemble_id: e.id, drill_id: d.id, user_id: u.id, part: 'S', object_key: 'k1' })
    expect(await migrateLatest(db)).toContain('008_drill_versions.ts')
    expect(await db('drill_versions').where({ drill_id: d.id }).first()).toMatchObject({ version: 2, document: '{"title":"D"}' })
    expect(await db('drills').where({ id: d.id }).first()).toMatchObject({ copied_from: null })
    expect((await db.raw('pragma foreign_keys') as { foreign_keys: number }[])[0]!.foreign_keys).toBe(1)
    await db.migrate.down({ migrationSource, name: '008_drill_versions.ts' })
    expect(await db.schema.hasTable('drill_versions')).toBe(false)
    expect(await db.schema.hasColumn('drills', 'copied_from')).toBe(false)
    expect(await db('takes').count({ n: '*' })).toEqual([{ n: 1 }])
  })
})

// Assignments through the built app: create, refuse bad input (naming the field, saving and
// mailing nothing), the player's list and status, takes linked with their attempts counted, the
// completion view, and the mail: one notice per assignee, one reminder a day before the due date
// however often the sweep runs, across a restart. Time is moved by rewriting the stored dates.
import { mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import Database from 'better-sqlite3'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { startApp, type App } from './harness'
import { dbQuery, ensembleId, importDrill, postTake, triadDrill, triadTake, waitForTake } from './takes-helpers'

const dir = mkdtempSync(join(tmpdir(), 'driftline-assign-'))
const env = { NUXT_ASSIGNMENTS_POLL_MS: '200', NUXT_ASSIGNMENTS_REMINDER_EVERY_S: '1' }
let app: App
const c = {} as Record<'director' | 'june' | 'rosa' | 'priya' | 'felix' | 'daniel' | 'admin' | 'brassDirector', string>
const ids = { choir: 0, brass: 0, alto: 0, tenor: 0, brassSection: 0, drill: 0, brassDrill: 0, june: 0, hugo: 0 }
const ALTOS = ['june.whitaker@example.org', 'rosa.delgado@example.org', 'priya.natarajan@example.org']

type Json = Record<string, any>
const json = (cookie: string, method: string, path: string, body?: unknown) => app.fetch(path, {
  method, cookie, ...(body === undefined ? {} : { headers: { 'content-type': 'application/json' }, body: JSON.stringify(body) }),
})
const read = async (r: Response) => ({ status: r.status, body: await r.json() as Json })
const inHours = (h: number) => new Date(Date.now() + h * 3600_000).toISOString()
const sleep = (ms: number) => new Promise(r => setTimeout(r, ms))
async function mails (): Promise<{ id: string, to: string, subject: string }[]> {
  return await (await app.fetch('/api/dev/mail', { cookie: c.admin })).json() as never
}
const to = (list: { to: string }[], email: string) => list.filter(m => m.to.toLowerCase().includes(email))
async function until<T> (what: string, fn: () => Promise<T | null | undefined | false>, ms = 20_000): Promise<T> {
  const end = Date.now() + ms
  for (;;) {
    const v = await fn()
    if (v) return v
    if (Date.now() > end) throw new Error(`timed out waiting for ${what}`)
    await sleep(150)
  }
}
/** Writes to the app's database (the test moves time by moving stored dates). */
function dbWrite (sql: string, ...params: unknown[]) {
  const db = new Database(join(dir, 'driftline.sqlite'))
  db.pragma('busy_timeout = 5000')
  try { db.prepare(sql).run(...params) } finally { db.close() }
}
const reminderRuns = () => Number(dbQuery(app, "select count(*) as n from jobs where kind = 'assignment_reminders' and status = 'done'")[0].n)
async function login () {
  c.director = await app.login('helena.marsh@example.org')
  c.june = await app.login('june.whitaker@example.org')
  c.rosa = await app.login('rosa.delgado@example.org')
  c.priya = await app.login('priya.natarajan@example.org')
  c.felix = await app.login('felix.ward@example.org')
  c.daniel = await app.login('daniel.okoro@example.org')
  c.admin = await app.login('admin@example.org')
  c.brassDirector = await app.login('owen.pryce@example.org')
}

beforeAll(async () => {
  app = await startApp({ dir, env })
  await login()
  ids.choir = await ensembleId(app, c.director, /Choir/)
  ids.brass = await ensembleId(app, c.brassDirector, /Brass/)
  const sec = (e: number, name: string) => dbQuery(app, 'select id from sections where ensemble_id = ? and name = ?', e, name)[0].id as number
  ids.alto = sec(ids.choir, 'Alto')
  ids.tenor = sec(ids.choir, 'Tenor')
  ids.brassSection = sec(ids.brass, 'Cornet')
  ids.hugo = dbQuery(app, "select id from users where email = 'hugo.varga@example.org'")[0].id
  ids.june = dbQuery(app, "select id from users where email = 'june.whitaker@example.org'")[0].id
  ids.drill = await importDrill(app, c.director, ids.choir, triadDrill('Assigned triad'))
  ids.brassDrill = await importDrill(app, c.brassDirector, ids.brass, triadDrill('Brass triad'))
}, 120_000)
afterAll(async () => {
  await app?.stop()
  rmSync(dir, { recursive: true, force: true })
})

const create = (body: Json, cookie = c.director) => json(cookie, 'POST', `/api/ensembles/${ids.choir}/assignments`, body)
const valid = (o: Json = {}) => ({ drillId: ids.drill, sectionIds: [ids.alto], userIds: [], dueAt: inHours(72), instructions: 'Hold each note steady.', attempts: null, ...o })
let altos = 0

describe('creating an assignment', () => {
  it('answers 201 { id, assignees } and mails each assignee once, naming drill, part and due date', async () => {
    const dueAt = inHours(72)
    const r = await read(await create(valid({ dueAt })))
    expect(r.status).toBe(201)
    expect(r.body).toEqual({ id: expect.any(Number), assignees: 3 }) // the Alto section: two players and their leader
    altos = r.body.id
    const list = await until('three notices', async () => { const l = (await mails()).filter(m => m.subject.includes('Assigned triad')); return l.length >= 3 && l })
    await sleep(1500) // a second look: nothing more arrives
    const notices = (await mails()).filter(m => m.subject.startsWith('New assignment') && m.subject.includes('Assigned triad'))
    expect(notices).toHaveLength(3)
    for (const email of ALTOS) expect(to(notices, email), email).toHaveLength(1)
    const full = await (await app.fetch(`/api/dev/mail/${list[0]!.id}`, { cookie: c.admin })).json() as Json
    expect(full.text).toContain('Drill: Assigned triad')
    expect(full.text).toContain('Your part: Soprano') // the drill's only part
    // The due date as IMF-fixdate (RFC 9110 §5.6.7), minutes only.
    expect(full.text).toContain(new Date(dueAt).toUTCString().replace(/:\d\d GMT$/, ' UTC'))
  })

  it.each([
    ['a due date in the past', () => valid({ dueAt: inHours(-1) }), 400, 'due_in_past', 'dueAt'],
    ['no section and no player', () => valid({ sectionIds: [], userIds: [] }), 400, 'no_assignees', 'sectionIds'],
    ['a section of another ensemble', () => valid({ sectionIds: [ids.alto, ids.brassSection] }), 404, 'section_not_found', 'sectionIds'],
    ['a player of another ensemble', () => valid({ userIds: [ids.hugo] }), 404, 'user_not_found', 'userIds'],
    ['a drill of another ensemble', () => valid({ drillId: ids.brassDrill }), 404, 'drill_not_found', 'drillId'],
    ['a part the drill lacks', () => valid({ sectionParts: { [ids.alto]: 'Kazoo' } }), 400, 'unknown_part', 'sectionParts'],
  ])('refuses %s, naming the field, saving and mailing nothing', async (_l, body, status, code, field) => {
    const before = [dbQuery(app, 'select count(*) as n from assignments')[0].n, (await mails()).length]
    const r = await read(await create(body()))
    expect(r.status).toBe(status)
    expect(r.body.data).toMatchObject({ code, field })
    expect(r.body.message).not.toMatch(/undefined|object Object/)
    await sleep(400)
    expect([dbQuery(app, 'select count(*) as n from assignments')[0].n, (await mails()).length]).toEqual(before)
  })

  it('refuses a malformed body with the zod issues, and a player with 403 before reading it', async () => {
    const bad = await read(await create({ drillId: 'x', sectionIds: 'all', dueAt: 'Thursday' }))
    expect(bad.status).toBe(400)
    expect(bad.body.data.code).toBe('invalid_input')
    expect([...new Set(bad.body.data.issues.map((i: Json) => i.path[0]))].sort()).toEqual(['drillId', 'dueAt', 'sectionIds'])
    expect((await create(valid(), c.june)).status).toBe(403)
  })
})

describe('the player and their takes', () => {
  it('lists it for the player as due, with the part and no take yet', async () => {
    const list = await read(await app.fetch('/api/assignments', { cookie: c.june }))
    expect(list.status).toBe(200)
    expect(list.body.find((a: Json) => a.id === altos)).toMatchObject({ drillId: ids.drill, drill: 'Assigned triad', part: 'Soprano', status: 'due', latestTakeId: null })
    // A tenor is not an assignee.
    expect((await read(await app.fetch('/api/assignments', { cookie: c.daniel }))).body.some((a: Json) => a.id === altos)).toBe(false)
  })

  it('links a take to the assignment; someone else\'s assignment answers 404', async () => {
    const audio = triadTake([0, 0, 0]).wav
    const t = await postTake(app, c.june, { drillId: ids.drill, part: 'Soprano', audio, assignmentId: altos })
    expect(t.status).toBe(202)
    expect(dbQuery(app, 'select assignment_id from takes where id = ?', t.body.id)[0].assignment_id).toBe(altos)
    const other = await postTake(app, c.daniel, { drillId: ids.drill, part: 'Soprano', audio, assignmentId: altos })
    expect(other.status).toBe(404)
    expect(other.body.data.code).toBe('assignment_not_found')
    await waitForTake(app, c.june, t.body.id)
    const mine = (await read(await app.fetch('/api/assignments', { cookie: c.june }))).body.find((a: Json) => a.id === altos)
    expect(mine).toMatchObject({ status: 'submitted', latestTakeId: t.body.id })
  }, 120_000)

  it('counts attempts: the second take of a one-attempt assignment is a clear 409', async () => {
    const one = (await read(await create(valid({ sectionIds: [], userIds: [ids.june], attempts: 1 })))).body.id
    const audio = triadTake([0, 0, 0]).wav
    expect((await postTake(app, c.june, { drillId: ids.drill, part: 'Soprano', audio, assignmentId: one })).status).toBe(202)
    const again = await postTake(app, c.june, { drillId: ids.drill, part: 'Soprano', audio, assignmentId: one })
    expect(again.status).toBe(409)
    expect(again.body.data).toMatchObject({ code: 'attempts_used', attempts: 1, used: 1 })
    expect(dbQuery(app, 'select count(*) as n from takes where assignment_id = ?', one)[0].n).toBe(1)
  })
})

describe('the director\'s views', () => {
  it('shows completion per player: director all, section leader their section, player 403', async () => {
    const path = `/api/ensembles/${ids.choir}/assignments/${altos}/progress`
    const p = await read(await app.fetch(path, { cookie: c.director }))
    expect(p.status).toBe(200)
    expect(p.body.players).toHaveLength(3)
    const june = p.body.players.find((x: Json) => x.userId === ids.june)
    expect(june).toMatchObject({ name: expect.any(String), section: 'Alto', submitted: true, latestTakeId: expect.any(Number) })
    expect(typeof june.meanAbsCents).toBe('number')
    expect(june.meanAbsCents).toBeLessThan(10) // sung on the equal-tempered pitches (the synthesiser's truth)
    expect(p.body.players.filter((x: Json) => !x.submitted)).toHaveLength(2)
    expect((await read(await app.fetch(path, { cookie: c.priya }))).body.players).toHaveLength(3)
    expect((await read(await app.fetch(path, { cookie: c.felix }))).body.players).toEqual([])
    expect((await app.fetch(path, { cookie: c.june })).status).toBe(403)
    expect((await app.fetch(`/api/ensembles/${ids.brass}/assignments/${altos}/progress`, { cookie: c.brassDirector })).status).toBe(404)
  })

  it('lists, edits and archives', async () => {
    const list = await read(await app.fetch(`/api/ensembles/${ids.choir}/assignments`, { cookie: c.director }))
    expect(list.body.items.find((a: Json) => a.id === altos)).toMatchObject({ assignees: 3, submitted: 1, targets: [{ sectionId: ids.alto, sectionName: 'Alto' }] })
    const edit = await read(await json(c.director, 'PATCH', `/api/ensembles/${ids.choir}/assignments/${altos}`, { instructions: 'Hold each note for four beats.' }))
    expect(edit.status).toBe(200)
    expect(edit.body.instructions).toBe('Hold each note for four beats.')
    expect((await json(c.director, 'PATCH', `/api/ensembles/${ids.choir}/assignments/${altos}`, { dueAt: inHours(-3) })).status).toBe(400)
    // Those already told hear of the change once, with the assignment as it now stands.
    const changed = async () => (await mails()).filter(m => m.subject.startsWith('Changed: Assigned triad'))
    await until('three change messages', async () => (await changed()).length >= 3)
    for (const email of ALTOS) expect(to(await changed(), email), email).toHaveLength(1)
    const message = await (await app.fetch(`/api/dev/mail/${(await changed())[0]!.id}`, { cookie: c.admin })).json() as Json
    expect(JSON.stringify(message)).toContain('Hold each note for four beats.')
    // Saving the same text again changes nothing and mails nobody; a later due date mails once more.
    expect((await json(c.director, 'PATCH', `/api/ensembles/${ids.choir}/assignments/${altos}`, { instructions: 'Hold each note for four beats.' })).status).toBe(200)
    expect((await json(c.director, 'PATCH', `/api/ensembles/${ids.choir}/assignments/${altos}`, { dueAt: inHours(96) })).status).toBe(200)
    await until('three more change messages', async () => (await changed()).length >= 6)
    await sleep(1000) // a few more runs of the mail job: nothing goes twice
    expect(await changed()).toHaveLength(6)
    for (const email of ALTOS) expect(to(await changed(), email), email).toHaveLength(2)
    const spare = (await read(await create(valid({ sectionIds: [ids.tenor] })))).body.id
    expect((await json(c.director, 'PATCH', `/api/ensembles/${ids.choir}/assignments/${spare}`, { archived: true })).status).toBe(200)
    expect((await read(await app.fetch('/api/assignments', { cookie: c.daniel }))).body.some((a: Json) => a.id === spare)).toBe(false)
    // An archived assignment takes no more takes: a clear 409, and no take is stored.
    const late = await postTake(app, c.daniel, { drillId: ids.drill, part: 'Soprano', audio: triadTake([0, 0, 0]).wav, assignmentId: spare })
    expect(late.status).toBe(409)
    expect(late.body.data.code).toBe('assignment_archived')
    expect(dbQuery(app, 'select count(*) as n from takes where assignment_id = ?', spare)[0].n).toBe(0)
  })
})

describe('reminders', () => {
  it('mails each assignee who has not sent a take once, however often the sweep runs, also after a restart', async () => {
    // A day less a few hours before the due date, notified three days ago.
    dbWrite('update assignments set due_at = ? where id = ?', inHours(20), altos)
    dbWrite('update assignment_assignees set notified_at = ? where assignment_id = ?', inHours(-72), altos)
    const reminders = async () => (await mails()).filter(m => m.subject.startsWith('Reminder') && m.subject.includes('Assigned triad'))
    await until('two reminders', async () => (await reminders()).length >= 2)
    const runs = reminderRuns()
    await until('two more sweeps', async () => reminderRuns() >= runs + 2)
    let sent = await reminders()
    expect(sent).toHaveLength(2)
    expect(to(sent, 'june.whitaker@example.org')).toHaveLength(0) // her take is in
    expect(to(sent, 'rosa.delgado@example.org')).toHaveLength(1)
    expect(to(sent, 'priya.natarajan@example.org')).toHaveLength(1)

    // After a restart nothing already sent goes again, and the sweep still runs: a new assignment
    // entering its last day is reminded.
    await app.stop()
    app = await startApp({ dir, env })
    await login()
    const again = (await read(await create(valid({ sectionIds: [ids.tenor], dueAt: inHours(50) })))).body.id
    await until('tenor notices', async () => (await mails()).filter(m => m.subject.startsWith('New assignment')).length > 0 && dbQuery(app, 'select count(*) as n from assignment_assignees where assignment_id = ? and notified_at is null', again)[0].n === 0)
    dbWrite('update assignments set due_at = ? where id = ?', inHours(10), again)
    dbWrite('update assignment_assignees set notified_at = ? where assignment_id = ?', inHours(-72), again)
    const tenorReminders = async () => (await reminders()).length - 2
    await until('tenor reminders after the restart', async () => (await tenorReminders()) > 0)
    const after = reminderRuns()
    await until('two more sweeps after the restart', async () => reminderRuns() >= after + 2)
    sent = await reminders()
    expect(to(sent, 'rosa.delgado@example.org')).toHaveLength(1)
    expect(to(sent, 'priya.natarajan@example.org')).toHaveLength(1)
    const tenorCount = dbQuery(app, 'select count(*) as n from assignment_assignees where assignment_id = ?', again)[0].n
    expect(sent.length).toBe(2 + tenorCount)
    // One sweep is scheduled at a time, restart or not.
    expect(dbQuery(app, "select count(*) as n from jobs where kind = 'assignment_reminders' and status in ('queued', 'running')")[0].n).toBe(1)
  }, 120_000)
})

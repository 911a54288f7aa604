// Assignment writes, notices and reminders against a real (in-memory) SQLite database with the
// demo scenario: who is reached, what is refused (with the field named), and that no run, however
// often repeated, mails one person twice. The mail transport is a recorder here.
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Knex } from 'knex'
import { createKnex } from '../../../server/database/knex'
import { migrateLatest } from '../../../server/database/migrations'
import { seedDemoIfEmpty } from '../../../seeds/demo/index'
import { createAssignment, updateAssignment } from '../../../server/utils/assignments'
import { sendAssignmentNotices, sendDueReminders } from '../../../server/utils/assignment-mail'
import { assignmentProgress, listMyAssignments } from '../../../server/utils/assignment-views'
import type { OutgoingMail } from '../../../server/utils/mail'

let db: Knex
const now = new Date('2026-03-10T12:00:00Z')
const ids = { choir: 0, brass: 0, alto: 0, tenor: 0, brassSection: 0, drill: 0, brassDrill: 0, director: 0, june: 0, hugo: 0 }

beforeAll(async () => {
  db = createKnex(':memory:')
  await migrateLatest(db)
  await seedDemoIfEmpty(db, { hashPassword: async p => `plain:${p}`, put: async () => {}, now })
  const e = await db('ensembles').select('id', 'name')
  ids.choir = e.find(x => /Choir/.test(x.name))!.id
  ids.brass = e.find(x => /Brass/.test(x.name))!.id
  ids.alto = (await db('sections').where({ ensemble_id: ids.choir, name: 'Alto' }).first('id')).id
  ids.tenor = (await db('sections').where({ ensemble_id: ids.choir, name: 'Tenor' }).first('id')).id
  ids.brassSection = (await db('sections').where({ ensemble_id: ids.brass }).first('id')).id
  const drills = await db('drills').select('id', 'ensemble_id')
  ids.drill = (await db('drills as d').where('d.ensemble_id', ids.choir)
    .whereExists(db('drill_parts as p').whereRaw('p.drill_id = d.id').where('p.name', 'Alto').select(db.raw('1'))).first('d.id')).id
  ids.brassDrill = drills.find(d => d.ensemble_id === ids.brass)!.id
  ids.director = (await db('memberships').where({ ensemble_id: ids.choir, role: 'director' }).first('user_id')).user_id
  ids.june = (await db('users').where({ email: 'june.whitaker@example.org' }).first('id')).id
  ids.hugo = (await db('users').where({ email: 'hugo.varga@example.org' }).first('id')).id
}, 60_000)
afterAll(async () => { await db?.destroy() })

const due = (hours: number, from = now) => new Date(from.getTime() + hours * 3600_000).toISOString()
const body = (o: Record<string, unknown> = {}) => ({ drillId: ids.drill, sectionIds: [ids.alto], userIds: [], sectionParts: {}, userParts: {}, dueAt: due(72), instructions: '', attempts: null, ...o }) as any
const count = async (table: string) => Number((await db(table).count({ n: '*' }).first())!.n)

describe('creating an assignment', () => {
  it('reaches every member of the chosen section, each with the part named like the section', async () => {
    const altos = await db('memberships').where({ ensemble_id: ids.choir, section_id: ids.alto }).whereIn('role', ['player', 'section_leader']).pluck('user_id')
    const r = await createAssignment(db, ids.choir, ids.director, body(), now)
    expect(r).toMatchObject({ ok: true, assignees: altos.length })
    const rows = await db('assignment_assignees').where({ assignment_id: (r as any).id })
    expect(rows.map(x => x.user_id).sort()).toEqual([...altos].sort())
    expect(new Set(rows.map(x => x.part))).toEqual(new Set(['Alto']))
    expect(await db('jobs').where({ kind: 'assignment_notice' }).count({ n: '*' }).first()).toEqual({ n: 1 })
  })

  it('lets a chosen player record another part than their section', async () => {
    const r = await createAssignment(db, ids.choir, ids.director, body({ sectionIds: [], userIds: [ids.june], userParts: { [ids.june]: 'tenor' } }), now)
    expect(r.ok).toBe(true)
    expect(await db('assignment_assignees').where({ assignment_id: (r as any).id }).first('part')).toEqual({ part: 'Tenor' })
  })

  it.each([
    ['a due date in the past', () => body({ dueAt: due(-1) }), { code: 'due_in_past', field: 'dueAt' }],
    ['neither sections nor players', () => body({ sectionIds: [] }), { code: 'no_assignees', field: 'sectionIds' }],
    ['a section of another ensemble', () => body({ sectionIds: [ids.alto, ids.brassSection] }), { code: 'section_not_found', field: 'sectionIds' }],
    ['a player of another ensemble', () => body({ userIds: [ids.hugo] }), { code: 'user_not_found', field: 'userIds' }],
    ['a drill of another ensemble', () => body({ drillId: ids.brassDrill }), { code: 'drill_not_found', field: 'drillId' }],
    ['a part the drill does not have', () => body({ sectionParts: { [ids.alto]: 'Kazoo' } }), { code: 'unknown_part', field: 'sectionParts' }],
    ['a part for a section not chosen', () => body({ sectionParts: { [ids.tenor]: 'Alto' } }), { code: 'unknown_target', field: 'sectionParts' }],
  ])('refuses %s, naming the field, and saves nothing', async (_label, make, want) => {
    const before = [await count('assignments'), await count('assignment_assignees'), await count('jobs')]
    expect(await createAssignment(db, ids.choir, ids.director, make(), now)).toMatchObject({ ok: false, ...want })
    expect([await count('assignments'), await count('assignment_assignees'), await count('jobs')]).toEqual(before)
  })
})

describe('mail', () => {
  it('sends one notice per assignee naming drill, part and due date, and never again', async () => {
    const r = await createAssignment(db, ids.choir, ids.director, body({ dueAt: '2026-03-14T18:00:00Z' }), now) as { id: number, assignees: number }
    const sent: OutgoingMail[] = []
    const send = async (m: OutgoingMail) => { sent.push(m) }
    expect(await sendAssignmentNotices(db, r.id, send, 'http://localhost:3000', now)).toBe(r.assignees)
    expect(await sendAssignmentNotices(db, r.id, send, 'http://localhost:3000', now)).toBe(0)
    expect(sent).toHaveLength(r.assignees)
    expect(new Set(sent.map(m => m.to)).size).toBe(r.assignees)
    const drill = (await db('drills').where({ id: ids.drill }).first('title')).title
    for (const m of sent) {
      expect(m.text).toContain(drill)
      expect(m.text).toContain('Your part: Alto')
      // RFC 7231 §7.1.1.1 IMF-fixdate wording (as Date#toUTCString writes it), minutes kept
      expect(m.text).toContain('Sat, 14 Mar 2026 18:00 UTC')
    }
  })

  it('a failed send gives the claim back, and the next run sends it', async () => {
    const r = await createAssignment(db, ids.choir, ids.director, body(), now) as { id: number, assignees: number }
    await expect(sendAssignmentNotices(db, r.id, async () => { throw new Error('smtp down') }, 'http://x', now)).rejects.toThrow('smtp down')
    const sent: OutgoingMail[] = []
    expect(await sendAssignmentNotices(db, r.id, async (m) => { sent.push(m) }, 'http://x', now)).toBe(r.assignees)
  })

  it('reminds each assignee once, a day before, and not those who sent a take', async () => {
    const r = await createAssignment(db, ids.choir, ids.director, body({ dueAt: due(60) }), now) as { id: number, assignees: number }
    const sink: OutgoingMail[] = []
    const send = async (m: OutgoingMail) => { sink.push(m) }
    await sendAssignmentNotices(db, r.id, send, 'http://x', now)
    sink.length = 0
    const [first] = await db('assignment_assignees').where({ assignment_id: r.id }).orderBy('id').select('user_id')
    await db('takes').insert({ ensemble_id: ids.choir, drill_id: ids.drill, user_id: first.user_id, assignment_id: r.id, part: 'Alto', object_key: `k-${r.id}`, status: 'queued' })
    const mine = (m: OutgoingMail) => m.subject.startsWith('Reminder')
    expect(await sendDueReminders(db, send, 'http://x', new Date(now.getTime() + 35 * 3600_000))).toBe(0) // 25 h before: too early
    const inWindow = new Date(now.getTime() + 40 * 3600_000)
    const firstRun = await sendDueReminders(db, send, 'http://x', inWindow)
    const secondRun = await sendDueReminders(db, send, 'http://x', new Date(inWindow.getTime() + 3600_000))
    const reminded = await db('assignment_assignees').where({ assignment_id: r.id }).whereNotNull('reminded_at').pluck('user_id')
    expect(reminded).not.toContain(first.user_id)
    expect(reminded).toHaveLength(r.assignees - 1)
    expect(secondRun).toBe(0)
    expect(sink.filter(mine).length).toBe(firstRun)
    expect(new Set(sink.filter(mine).map(m => m.to)).size).toBe(sink.filter(mine).length)
  })
})

describe('moving the due date', () => {
  it('later: the reminder goes out again for the new date; earlier: nothing is cleared', async () => {
    const r = await createAssignment(db, ids.choir, ids.director, body({ sectionIds: [], userIds: [ids.june], dueAt: due(60) }), now) as { id: number }
    await db('assignment_assignees').where({ assignment_id: r.id }).update({ notified_at: now.toISOString(), reminded_at: due(40) })
    await updateAssignment(db, ids.choir, r.id, ids.director, { dueAt: due(50) } as any, now)
    expect(await db('assignment_assignees').where({ assignment_id: r.id }).first('reminded_at')).toEqual({ reminded_at: due(40) })
    await updateAssignment(db, ids.choir, r.id, ids.director, { dueAt: due(120) } as any, now)
    expect(await db('assignment_assignees').where({ assignment_id: r.id }).first('reminded_at')).toEqual({ reminded_at: null })
  })
})

describe('reading', () => {
  it('a player sees the assignment as due, then overdue, then submitted; the director sees the take', async () => {
    const r = await createAssignment(db, ids.choir, ids.director, body({ sectionIds: [], userIds: [ids.june], dueAt: due(24) }), now) as { id: number }
    const find = async (at: Date) => (await listMyAssignments(db, ids.june, at)).find(a => a.id === r.id)!
    expect(await find(now)).toMatchObject({ status: 'due', part: 'Alto', latestTakeId: null })
    expect((await find(new Date(now.getTime() + 25 * 3600_000))).status).toBe('overdue')
    const [t] = await db('takes').insert({ ensemble_id: ids.choir, drill_id: ids.drill, user_id: ids.june, assignment_id: r.id, part: 'Alto', object_key: `j-${r.id}`, status: 'queued' }).returning('id')
    expect(await find(now)).toMatchObject({ status: 'submitted', latestTakeId: t.id, attemptsUsed: 1 })
    const p = await assignmentProgress(db, ids.choir, r.id, undefined, now)
    expect(p!.players).toEqual([expect.objectContaining({ userId: ids.june, submitted: true, latestTakeId: t.id, meanAbsCents: null })])
    // A section leader of another section sees none of them; of the Alto section, June.
    expect((await assignmentProgress(db, ids.choir, r.id, ids.tenor, now))!.players).toEqual([])
    expect((await assignmentProgress(db, ids.choir, r.id, ids.alto, now))!.players).toHaveLength(1)
    expect(await assignmentProgress(db, ids.brass, r.id, undefined, now)).toBeNull() // another ensemble's
  })

  it('an edit reaching new people notifies only them; archiving hides it from the player', async () => {
    const r = await createAssignment(db, ids.choir, ids.director, body({ sectionIds: [], userIds: [ids.june] }), now) as { id: number }
    await sendAssignmentNotices(db, r.id, async () => {}, 'http://x', now)
    const u = await updateAssignment(db, ids.choir, r.id, ids.director, { sectionIds: [ids.tenor] } as any, now)
    expect(u.ok).toBe(true)
    const sent: OutgoingMail[] = []
    const tenors = await db('assignment_assignees').where({ assignment_id: r.id, section_id: ids.tenor }).count({ n: '*' }).first()
    expect(await sendAssignmentNotices(db, r.id, async (m) => { sent.push(m) }, 'http://x', now)).toBe(Number(tenors!.n))
    expect(await updateAssignment(db, ids.choir, r.id, ids.director, { dueAt: due(-2) } as any, now)).toMatchObject({ ok: false, code: 'due_in_past', field: 'dueAt' })
    await updateAssignment(db, ids.choir, r.id, ids.director, { archived: true } as any, now)
    expect((await listMyAssignments(db, ids.june, now)).some(a => a.id === r.id)).toBe(false)
  })
})

describe('members who join a section after it was assigned', () => {
  it('get its open assignments with the section\'s part and a notice of their own, once', async () => {
    const { updateMember } = await import('../../../server/utils/members')
    const future = new Date(Date.now() + 72 * 3600_000).toISOString()
    const r = await createAssignment(db, ids.choir, ids.director, body({ dueAt: future }), now)
    expect(r.ok).toBe(true)
    const id = (r as any).id as number
    const tenor = (await db('memberships').where({ ensemble_id: ids.choir, section_id: ids.tenor, role: 'player' }).first('user_id')).user_id
    expect(await db('assignment_assignees').where({ assignment_id: id, user_id: tenor }).first()).toBeUndefined()
    const jobs = await count('jobs')
    const moved = await updateMember(db, ids.choir, tenor, { id: ids.director, ip: null } as any, { sectionId: ids.alto } as any)
    expect(moved.ok).toBe(true)
    expect(await db('assignment_assignees').where({ assignment_id: id, user_id: tenor }).first('part', 'notified_at')).toEqual({ part: 'Alto', notified_at: null })
    expect(await count('jobs')).toBe(jobs + 1)
    // A second change (the role) does not add them twice.
    await updateMember(db, ids.choir, tenor, { id: ids.director, ip: null } as any, { role: 'section_leader' } as any)
    expect(await db('assignment_assignees').where({ assignment_id: id, user_id: tenor }).count({ n: '*' }).first()).toEqual({ n: 1 })
  })
})

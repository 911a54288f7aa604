// POST /api/takes/:id/reviews, GET /api/reviews/queue and the reviews on GET /api/takes/:id,
// against the built app with the demo ensembles. Who may review follows the product's role
// table (a section leader reviews their own section, a director every section) and HTTP
// semantics (RFC 9110 §15.5: 401 without a session, 403 for a role that may not, 404 for an
// ensemble the caller is not in, 409 for a take whose state forbids it, 400 for input the caller
// can fix). Expected values are worked out here from the take's own report and from the
// database rows, never from the server's queue query.
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { startApp, type App } from './harness'
import { dbQuery, retryStaleSockets, waitForTake } from './takes-helpers'
import { errorOf, json, latestMailTo, mailCount, withDb } from './people-helpers'

const PLAYER = 'clara.lindqvist@example.org' // Soprano, Driftwood Bay
const OTHER_PLAYER = 'maya.chen@example.org' // Soprano, Driftwood Bay
const LEADER = 'aisha.bello@example.org' // leads the Sopranos
const OTHER_LEADER = 'priya.natarajan@example.org' // leads the Altos
const DIRECTOR = 'helena.marsh@example.org'
const ELSEWHERE = 'lena.fischer@example.org' // a section leader of the brass band only
const ADMIN = 'admin@example.org'

let app: App
const c: Record<string, string> = {}
let takeId = 0
let report: { take: { durationS: number }, holds: Array<{ startS: number, endS: number }> }

interface Review { id: number, reviewer: { id: number, name: string }, verdict: string, summary: string | null, notes: Array<{ id: number, atS: number | null, holdIndex: number | null, body: string }>, at: string, mine: boolean }

const post = (id: number, body: unknown, cookie: string) => app.fetch(`/api/takes/${id}/reviews`, json('POST', body, cookie))
const getTake = async (id: number, cookie = c.player!) => (await app.fetch(`/api/takes/${id}`, { cookie })).json() as Promise<{ reviews: Review[], canReview: boolean, status: string }>
const queue = async (query: string, cookie: string) => app.fetch(`/api/reviews/queue${query}`, { cookie })
const reviewRows = (id: number) => dbQuery<{ id: number, reviewer_id: number }>(app, 'select id, reviewer_id from reviews where take_id = ?', id)

/**
 * The hold under a moment, worked out from the report's hold list: a hold sounds from its start
 * up to (not including) its end; a moment in no hold belongs to none.
 */
function expectedHold(atS: number): number | null {
  let found: number | null = null
  report.holds.forEach((h, i) => { if (atS >= h.startS && atS < h.endS) found = i })
  return found
}

beforeAll(async () => {
  app = retryStaleSockets(await startApp())
  for (const [k, email] of Object.entries({ player: PLAYER, otherPlayer: OTHER_PLAYER, leader: LEADER, otherLeader: OTHER_LEADER, director: DIRECTOR, elsewhere: ELSEWHERE, admin: ADMIN })) {
    c[k] = await app.login(email)
  }
  const mine = await (await app.fetch('/api/takes?player=me', { cookie: c.player })).json() as { items: Array<{ id: number }> }
  takeId = mine.items[0]!.id
  const t = await waitForTake(app, c.player!, takeId, 180_000)
  expect(t.status).toBe('analysed')
  report = t.report
}, 240_000)
afterAll(async () => { await app?.stop() })

describe('POST /api/takes/:id/reviews: who may review', () => {
  it('answers 401 without a session', async () => {
    expect((await post(takeId, { verdict: 'approved' }, '')).status).toBe(401)
  })

  it('refuses the player (403), another player of the ensemble (403) and the leader of another section (403)', async () => {
    const own = await errorOf(await post(takeId, { verdict: 'approved' }, c.player!))
    expect([own.status, own.data.code]).toEqual([403, 'own_take'])
    const other = await errorOf(await post(takeId, { verdict: 'approved' }, c.otherPlayer!))
    expect([other.status, other.data.code]).toEqual([403, 'forbidden'])
    const leader = await errorOf(await post(takeId, { verdict: 'approved' }, c.otherLeader!))
    expect([leader.status, leader.data.code]).toEqual([403, 'other_section'])
    expect(reviewRows(takeId)).toEqual([])
  })

  it('answers 404 to a member of another ensemble and for a take that does not exist', async () => {
    expect((await post(takeId, { verdict: 'approved' }, c.elsewhere!)).status).toBe(404)
    expect((await post(999_999, { verdict: 'approved' }, c.leader!)).status).toBe(404)
    expect((await post(0, { verdict: 'approved' }, c.leader!)).status).toBe(400)
  })
})

describe('POST /api/takes/:id/reviews: bad input saves nothing', () => {
  it('names an empty note (400) and stores none of the review', async () => {
    const r = await errorOf(await post(takeId, { verdict: 'approved', notes: [{ atS: 1, body: 'Good start' }, { body: '   ' }] }, c.leader!))
    expect(r.status).toBe(400)
    expect(r.data.code).toBe('empty_note')
    expect(r.data.noteIndex).toBe(1)
    expect(r.message).toBe('Note 2 is empty')
    expect(reviewRows(takeId)).toEqual([])
  })

  it('names a note pinned after the end of the take (400)', async () => {
    const late = report.take.durationS + 3
    const r = await errorOf(await post(takeId, { verdict: 'needs_work', notes: [{ body: 'Whole take' }, { atS: 1, body: 'fine' }, { atS: late, body: 'Too late' }] }, c.leader!))
    expect(r.status).toBe(400)
    expect(r.data.code).toBe('note_outside_take')
    expect(r.data.noteIndex).toBe(2)
    expect(r.message).toContain('Note 3')
    const negative = await errorOf(await post(takeId, { verdict: 'needs_work', notes: [{ atS: -1, body: 'Before it began' }] }, c.leader!))
    expect(negative.status).toBe(400)
    expect(negative.message).toContain('Note 1')
    expect(reviewRows(takeId)).toEqual([])
  })

  it('refuses an unknown verdict, an unknown field and a body that is not JSON', async () => {
    const verdict = await errorOf(await post(takeId, { verdict: 'great' }, c.leader!))
    expect(verdict.status).toBe(400)
    expect(JSON.stringify(verdict.data.issues)).toContain('verdict')
    expect((await post(takeId, { verdict: 'approved', stars: 5 }, c.leader!)).status).toBe(400)
    const text = await app.fetch(`/api/takes/${takeId}/reviews`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: '{"verdict":', cookie: c.leader })
    expect(text.status).toBe(400)
    expect(reviewRows(takeId)).toEqual([])
  })

  it('answers 409 while the take is still being analysed', async () => {
    withDb(app, db => db.prepare("update takes set status = 'analysing' where id = ?").run(takeId))
    try {
      const r = await errorOf(await post(takeId, { verdict: 'approved' }, c.leader!))
      expect([r.status, r.data.code]).toEqual([409, 'take_analysing'])
    } finally {
      withDb(app, db => db.prepare("update takes set status = 'analysed' where id = ?").run(takeId))
    }
    expect(reviewRows(takeId)).toEqual([])
  })
})

describe('a review saved, read and changed', () => {
  let reviewId = 0

  it('creates the section leader\'s review (201) and pins each note to the hold under its moment', async () => {
    expect((await getTake(takeId, c.leader)).canReview).toBe(true)
    expect((await getTake(takeId, c.player)).canReview).toBe(false)
    const first = report.holds[0]!
    const second = report.holds[1]!
    const inSecond = (second.startS + second.endS) / 2
    const beforeFirst = first.startS / 2 // the count-in before the first hold
    const mailsBefore = await mailCount(app, c.admin!, PLAYER)
    const r = await post(takeId, {
      verdict: 'needs_work',
      summary: 'Steady air; the second chord sits high.',
      notes: [{ atS: inSecond, body: 'This chord is sharp: lower the third.' }, { body: 'Breathe before the last chord.' }, { atS: beforeFirst, body: 'Start together with the count.' }],
    }, c.leader!)
    expect(r.status).toBe(201)
    const body = await r.json() as { id: number, created: boolean }
    reviewId = body.id
    expect(body.created).toBe(true)

    const take = await getTake(takeId, c.player)
    expect(take.reviews).toHaveLength(1)
    const review = take.reviews[0]!
    expect(review.id).toBe(reviewId)
    expect(review.reviewer.name).toBe('Aisha Bello')
    expect(review.verdict).toBe('needs_work')
    expect(review.summary).toBe('Steady air; the second chord sits high.')
    expect(review.mine).toBe(false)
    const byBody = Object.fromEntries(review.notes.map(n => [n.body, n]))
    expect(byBody['This chord is sharp: lower the third.']).toMatchObject({ atS: inSecond, holdIndex: expectedHold(inSecond) })
    expect(expectedHold(inSecond)).toBe(1)
    expect(byBody['Breathe before the last chord.']).toMatchObject({ atS: null, holdIndex: null })
    expect(byBody['Start together with the count.']!.holdIndex).toBe(expectedHold(beforeFirst))
    // Whole-take notes come first, then the pinned ones in the order of the take.
    expect(review.notes.map(n => n.atS)).toEqual([null, beforeFirst, inSecond])

    // The player is told, with the verdict and a link to the take.
    const mail = await latestMailTo(app, c.admin!, PLAYER, mailsBefore)
    expect(mail.subject).toContain('reviewed')
    expect(mail.text).toContain('Aisha Bello')
    expect(mail.text).toContain('Verdict: Needs work')
    expect(mail.text).toContain(`${app.url}/takes/${takeId}`)
  })

  it('updates the same reviewer\'s review in place (200) when it is sent again', async () => {
    const mailsBefore = await mailCount(app, c.admin!, PLAYER)
    const r = await post(takeId, { verdict: 'approved', notes: [{ atS: report.holds[0]!.startS + 0.01, body: 'Much better.' }] }, c.leader!)
    expect(r.status).toBe(200)
    expect(await r.json()).toEqual({ id: reviewId, created: false })
    expect(reviewRows(takeId)).toHaveLength(1)
    const review = (await getTake(takeId, c.leader)).reviews[0]!
    expect(review.verdict).toBe('approved')
    expect(review.mine).toBe(true)
    // The summary was not sent: it stays; the notes were sent: they replace the old ones.
    expect(review.summary).toBe('Steady air; the second chord sits high.')
    expect(review.notes.map(n => [n.body, n.holdIndex])).toEqual([['Much better.', 0]])
    expect(dbQuery(app, 'select count(*) as n from review_notes where review_id = ?', reviewId)[0].n).toBe(1)
    const mail = await latestMailTo(app, c.admin!, PLAYER, mailsBefore)
    expect(mail.text).toContain('Verdict: Approved')
  })

  it('keeps the notes when a resubmission leaves them out, and deletes them all with an empty list', async () => {
    expect((await post(takeId, { verdict: 'approved', summary: '' }, c.leader!)).status).toBe(200)
    let review = (await getTake(takeId, c.leader)).reviews[0]!
    expect(review.notes).toHaveLength(1)
    expect(review.summary).toBeNull()
    expect((await post(takeId, { verdict: 'approved', notes: [] }, c.leader!)).status).toBe(200)
    review = (await getTake(takeId, c.leader)).reviews[0]!
    expect(review.notes).toEqual([])
  })

  it('gives a director a review of their own beside the leader\'s', async () => {
    const r = await post(takeId, { verdict: 'retake', summary: 'Please record it again with the new tempo.' }, c.director!)
    expect(r.status).toBe(201)
    const take = await getTake(takeId, c.player)
    expect(take.reviews.map(x => x.verdict).sort()).toEqual(['approved', 'retake'])
    expect(reviewRows(takeId)).toHaveLength(2)
  })

  it('shows who reviewed it in the take list and the latest verdict on the player\'s home', async () => {
    const list = await (await app.fetch('/api/takes?player=me', { cookie: c.player })).json() as { items: Array<{ id: number, reviewedBy: Array<{ reviewer: string, verdict: string }> }> }
    const row = list.items.find(t => t.id === takeId)!
    expect(row.reviewedBy.map(m => m.reviewer).sort()).toEqual(['Aisha Bello', 'Helena Marsh'])
    const home = await (await app.fetch('/api/home', { cookie: c.player })).json() as { recent: Array<{ takeId: number, review: { reviewer: string, verdict: string } | null }> }
    expect(home.recent.find(t => t.takeId === takeId)!.review).toMatchObject({ reviewer: 'Helena Marsh', verdict: 'retake' })
  })
})

describe('GET /api/reviews/queue', () => {
  /** The takes a reviewer should see, worked out from the rows: analysed or failed, not withdrawn, nobody's review, not their own. */
  function expectedQueue(ensembleName: string, section: string | null, reviewerEmail: string): number[] {
    return dbQuery<{ id: number }>(app, `select t.id from takes t join ensembles e on e.id = t.ensemble_id
      join users me on me.email = ? join memberships pm on pm.ensemble_id = t.ensemble_id and pm.user_id = t.user_id
      left join sections s on s.id = pm.section_id
      where e.name = ? and t.status in ('analysed', 'failed') and t.withdrawn_at is null and t.user_id <> me.id
        and not exists (select 1 from reviews r where r.take_id = t.id) and (? is null or s.name = ?)
      order by t.created_at, t.id`, reviewerEmail, ensembleName, section, section).map(r => r.id)
  }
  async function analysedAll() {
    for (const { id } of dbQuery<{ id: number }>(app, 'select id from takes')) await waitForTake(app, c.admin!, id, 180_000)
  }

  it('gives a section leader their section\'s unreviewed takes, oldest first', async () => {
    await analysedAll()
    const body = await (await queue('', c.leader!)).json()
    expect(body.items.map((i: { takeId: number }) => i.takeId)).toEqual(expectedQueue('Driftwood Bay Community Choir', 'Soprano', LEADER))
    expect(body.items.every((i: { section: { name: string } }) => i.section.name === 'Soprano')).toBe(true)
    expect(body.items.map((i: { takeId: number }) => i.takeId)).not.toContain(takeId) // reviewed above
    for (let i = 1; i < body.items.length; i++) expect(body.items[i].submittedAt >= body.items[i - 1].submittedAt).toBe(true)
    expect(body.total).toBe(body.items.length)
    const item = body.items[0]
    expect(Object.keys(item)).toEqual(expect.arrayContaining(['takeId', 'player', 'section', 'drill', 'part', 'submittedAt', 'meanAbsCents']))
  })

  it('gives a director every section of their ensemble, in pages', async () => {
    const all = await (await queue('?pageSize=100', c.director!)).json()
    const wanted = expectedQueue('Driftwood Bay Community Choir', null, DIRECTOR)
    expect(all.items.map((i: { takeId: number }) => i.takeId)).toEqual(wanted)
    expect(new Set(all.items.map((i: { section: { name: string } }) => i.section.name)).size).toBeGreaterThan(1)
    expect(all.total).toBe(wanted.length)
    const p1 = await (await queue('?pageSize=2&page=1', c.director!)).json()
    const p2 = await (await queue('?pageSize=2&page=2', c.director!)).json()
    expect([...p1.items, ...p2.items].map((i: { takeId: number }) => i.takeId)).toEqual(wanted.slice(0, 4))
    expect(p1.total).toBe(wanted.length)
  })

  it('filters by section, drill and player', async () => {
    const all = await (await queue('?pageSize=100', c.director!)).json()
    const alto = all.facets.sections.find((s: { name: string }) => s.name === 'Alto')
    const bySection = await (await queue(`?sectionId=${alto.id}`, c.director!)).json()
    expect(bySection.items.map((i: { takeId: number }) => i.takeId)).toEqual(expectedQueue('Driftwood Bay Community Choir', 'Alto', DIRECTOR))
    const one = all.items[0]
    const byDrill = await (await queue(`?drillId=${one.drill.id}&pageSize=100`, c.director!)).json()
    expect(byDrill.items.map((i: { takeId: number }) => i.takeId)).toEqual(all.items.filter((i: { drill: { id: number } }) => i.drill.id === one.drill.id).map((i: { takeId: number }) => i.takeId))
    const byPlayer = await (await queue(`?playerId=${one.player.id}`, c.director!)).json()
    expect(byPlayer.items.every((i: { player: { id: number } }) => i.player.id === one.player.id)).toBe(true)
    expect(byPlayer.total).toBe(all.items.filter((i: { player: { id: number } }) => i.player.id === one.player.id).length)
  })

  it('refuses players (403), another section (403), another ensemble\'s section (404) and unknown filters (400)', async () => {
    expect((await queue('', '')).status).toBe(401)
    expect((await errorOf(await queue('', c.player!))).status).toBe(403)
    const sections = dbQuery<{ id: number, name: string }>(app, "select s.id, s.name from sections s join ensembles e on e.id = s.ensemble_id where e.name = 'Driftwood Bay Community Choir'")
    const soprano = sections.find(s => s.name === 'Soprano')!.id
    const other = await errorOf(await queue(`?sectionId=${soprano}`, c.otherLeader!))
    expect([other.status, other.data.code]).toEqual([403, 'other_section'])
    expect((await queue(`?sectionId=${soprano}`, c.leader!)).status).toBe(200)
    expect((await queue(`?sectionId=${soprano}`, c.elsewhere!)).status).toBe(404)
    const unknown = await errorOf(await queue('?colour=blue', c.director!))
    expect(unknown.status).toBe(400)
    expect(JSON.stringify(unknown.data.issues)).toContain('colour')
    for (const q of ['?page=0', '?pageSize=500', '?sectionId=1e1', '?drillId=abc']) expect((await queue(q, c.director!)).status, q).toBe(400)
  })
})

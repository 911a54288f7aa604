import { describe, expect, it, vi } from 'vitest'
import { mountSuspended, registerEndpoint } from '@nuxt/test-utils/runtime'
import { createError } from 'h3'
import HomePage from '~/pages/index.vue'
import type { HomeData } from '#shared/types/home'

// Invented rows in the shape of GET /api/home; which one the fake route answers is set per test.
const DAY = 86_400_000
const base: HomeData = {
  user: { id: 7, email: 'rowan@example.org', name: 'Rowan Test', siteRole: null },
  memberships: [],
  due: [],
  toReview: [],
  recent: [],
  ensembleSummary: [],
}
let answer: HomeData | 'fail' = base
let delayMs = 0

registerEndpoint('/api/home', async () => {
  if (delayMs) await new Promise(r => setTimeout(r, delayMs))
  if (answer === 'fail') throw createError({ statusCode: 503, statusMessage: 'Database unavailable' })
  return answer
})

async function mountHome(data: HomeData | 'fail') {
  answer = data
  clearNuxtData('home')
  const w = await mountSuspended(HomePage)
  // The home is fetched lazily: wait until the loading skeleton gives way.
  await vi.waitFor(() => {
    if (w.text().includes('Loading your home page')) throw new Error('still loading')
  }, { timeout: 5000, interval: 20 })
  return w
}

describe('home page', () => {
  it('shows a loading skeleton, announced politely, until the data arrives', async () => {
    answer = base
    delayMs = 300
    clearNuxtData('home')
    try {
      const w = await mountSuspended(HomePage)
      const status = w.get('[role="status"]')
      expect(status.text()).toContain('Loading your home page')
      await vi.waitFor(() => {
        if (!w.text().includes('You are not in an ensemble yet')) throw new Error('still loading')
      }, { timeout: 5000, interval: 20 })
    } finally {
      delayMs = 0
    }
  })

  it('explains what to do when the user is in no ensemble', async () => {
    const w = await mountHome(base)
    expect(w.text()).toContain('Welcome back, Rowan Test')
    expect(w.text()).toContain('You are not in an ensemble yet')
  })

  it('a player sees Due (overdue said in words) and recent takes with the mean deviation', async () => {
    const w = await mountHome({
      ...base,
      memberships: [{ ensembleId: 1, ensembleName: 'Fernhill Singers', role: 'player', sectionId: 2, sectionName: 'Alto' }],
      due: [
        { assignmentId: 1, ensembleId: 1, ensembleName: 'Fernhill Singers', drillId: 3, drillTitle: 'Late drill', title: null, part: 'Alto', dueAt: new Date(Date.now() - 2 * DAY).toISOString(), submitted: false, overdue: true, tolerance: 10 },
        { assignmentId: 2, ensembleId: 1, ensembleName: 'Fernhill Singers', drillId: 4, drillTitle: 'Done drill', title: null, part: 'Alto', dueAt: new Date(Date.now() + 3 * DAY).toISOString(), submitted: true, overdue: false, tolerance: 10 },
      ],
      recent: [{ takeId: 9, drillTitle: 'Done drill', part: 'Alto', status: 'analysed', createdAt: new Date().toISOString(), meanAbsCents: 7.25, withinToleranceShare: 0.8, driftCentsPerMin: null, tolerance: 10, review: null }],
    })
    const due = w.get('section[aria-labelledby="home-due"]')
    const items = due.findAll('li')
    expect(items).toHaveLength(2)
    // Soonest first: the overdue one, marked by the word, not only by colour.
    expect(items[0]!.text()).toContain('Late drill')
    expect(items[0]!.text()).toContain('Overdue')
    expect(items[0]!.text()).toContain('Not submitted yet')
    expect(items[1]!.text()).toContain('Submitted')
    expect(items[1]!.text()).not.toContain('Overdue')
    expect(items[1]!.find('time').attributes('datetime')).toMatch(/^\d{4}-\d\d-\d\dT/)
    const recent = w.get('section[aria-labelledby="home-recent"]')
    expect(recent.text()).toContain('7.3 ¢')
    expect(recent.text()).toContain('80 %')
    // Players do not get the reviewer's or director's sections.
    expect(w.find('#home-review').exists()).toBe(false)
    expect(w.find('#home-summary').exists()).toBe(false)
  })

  it('grades each badge at the tolerance the server sends, not at a fixed ±10 ¢', async () => {
    // 15 ¢ mean deviation: inside a ±25 ¢ drill tolerance, outside a ±10 ¢ one (the grading rule
    // |c| ≤ tolerance is in tune is the product's own, see shared/deviation.ts).
    const w = await mountHome({
      ...base,
      memberships: [{ ensembleId: 1, ensembleName: 'Fernhill Singers', role: 'player', sectionId: 2, sectionName: 'Alto' }],
      recent: [
        { takeId: 9, drillTitle: 'Wide drill', part: 'Alto', status: 'analysed', createdAt: new Date().toISOString(), meanAbsCents: 15, withinToleranceShare: 0.8, driftCentsPerMin: null, tolerance: 25, review: null },
        { takeId: 8, drillTitle: 'Tight drill', part: 'Alto', status: 'analysed', createdAt: new Date(Date.now() - DAY).toISOString(), meanAbsCents: 15, withinToleranceShare: 0.8, driftCentsPerMin: null, tolerance: 10, review: null },
      ],
    })
    const badges = w.get('section[aria-labelledby="home-recent"]').findAll('ul [data-token]')
    expect(badges.map(b => b.attributes('data-token'))).toEqual(['in-tune', 'off-1'])
  })

  it('tells two assignments of the same drill apart by their titles', async () => {
    const w = await mountHome({
      ...base,
      memberships: [{ ensembleId: 1, ensembleName: 'Fernhill Singers', role: 'player', sectionId: 2, sectionName: 'Alto' }],
      due: [
        { assignmentId: 1, ensembleId: 1, ensembleName: 'Fernhill Singers', drillId: 3, drillTitle: 'Held fifths', title: 'Week 1: slow', part: 'Alto', dueAt: new Date(Date.now() + DAY).toISOString(), submitted: false, overdue: false, tolerance: 10 },
        { assignmentId: 2, ensembleId: 1, ensembleName: 'Fernhill Singers', drillId: 3, drillTitle: 'Held fifths', title: 'Week 2: at tempo', part: 'Alto', dueAt: new Date(Date.now() + 8 * DAY).toISOString(), submitted: false, overdue: false, tolerance: 10 },
      ],
    })
    const items = w.get('section[aria-labelledby="home-due"]').findAll('li')
    expect(items[0]!.text()).toContain('Week 1: slow')
    expect(items[1]!.text()).toContain('Week 2: at tempo')
    expect(items[0]!.text()).toContain('Held fifths')
    // The links to the take form differ by assignment and say which one to a screen reader.
    expect(items[0]!.find('a[href^="/takes/new"]').attributes('href')).toContain('assignmentId=1')
    expect(items[1]!.find('a[href^="/takes/new"]').text()).toContain('for Week 2: at tempo, due')
  })

  it('a director sees the summary and the review queue, with empty states', async () => {
    const w = await mountHome({
      ...base,
      memberships: [{ ensembleId: 1, ensembleName: 'Fernhill Singers', role: 'director', sectionId: null, sectionName: null }],
    })
    expect(w.get('#home-summary').text()).toContain('at a glance')
    expect(w.get('section[aria-labelledby="home-review"]').text()).toContain('Nothing to review')
    expect(w.get('section[aria-labelledby="home-summary"]').text()).toContain('No takes have been analysed')
  })

  it('lists takes to review in a table with headers', async () => {
    const w = await mountHome({
      ...base,
      memberships: [{ ensembleId: 1, ensembleName: 'Fernhill Singers', role: 'section_leader', sectionId: 2, sectionName: 'Alto' }],
      toReview: [{ takeId: 5, ensembleName: 'Fernhill Singers', playerName: 'Sam Player', sectionName: 'Alto', drillTitle: 'Held chords', part: 'Alto', status: 'analysed', submittedAt: new Date().toISOString(), meanAbsCents: 15, tolerance: 10 }],
    })
    const table = w.get('section[aria-labelledby="home-review"] table')
    expect(table.findAll('th[scope="col"]').map(t => t.text())).toContain('Player')
    expect(table.text()).toContain('Sam Player')
    expect(table.get('[data-token]').attributes('data-token')).toBe('off-1')
  })

  it('shows an error with a retry button when the home cannot load', async () => {
    const w = await mountHome('fail')
    expect(w.get('[role="alert"]').text()).toContain('Could not load your home page')
    expect(w.get('[role="alert"]').text()).toContain('Database unavailable (503)')
    expect(w.get('[role="alert"] button').text()).toBe('Try again')
  })
})

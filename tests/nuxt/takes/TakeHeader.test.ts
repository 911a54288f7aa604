// The head of a take's page: where it belongs, whose part it is, the latest verdict and whether
// the take was withdrawn. Names and titles are the demo scenario's kind, invented for the test.
import { describe, expect, it } from 'vitest'
import { mountSuspended } from '@nuxt/test-utils/runtime'
import TakeHeader from '~/components/takes/TakeHeader.vue'
import type { TakeDetail } from '#shared/types/take'
import type { TakeReview } from '#shared/types/review'

const review = (id: number, name: string, verdict: TakeReview['verdict']): TakeReview => ({
  id, reviewer: { id: 10 + id, name }, verdict, summary: null, notes: [], at: '2026-11-30T18:00:00.000Z', mine: false,
})

// Only the fields the head reads.
function take (): TakeDetail {
  return {
    id: 7, drill: { id: 3, title: 'Chorale in G, bars 1–4' }, part: 'Alto', player: { id: 4, name: 'Ines Okafor' },
    createdAt: '2026-11-30T17:00:00.000Z', withdrawnAt: null, reviews: [],
  } as unknown as TakeDetail
}

describe('TakeHeader', () => {
  it('names the part and the player in the one heading, and links back to the takes and the drill', async () => {
    const w = await mountSuspended(TakeHeader, { props: { take: take() } })
    expect(w.findAll('h1')).toHaveLength(1)
    expect(w.find('h1').text()).toBe('Alto · Ines Okafor')
    const links = w.findAll('a').map(a => a.attributes('href'))
    expect(links).toContain('/takes')
    expect(links).toContain('/drills/3')
    expect(w.text()).toContain('Chorale in G, bars 1–4')
  })

  it('shows no verdict and no withdrawal notice when there are none', async () => {
    const w = await mountSuspended(TakeHeader, { props: { take: take() } })
    expect(w.find('[data-testid="take-verdict"]').exists()).toBe(false)
    expect(w.text()).not.toContain('Withdrawn')
  })

  it('gives the newest review\'s verdict in words, counts the others and links to the reviews', async () => {
    const t = { ...take(), reviews: [review(2, 'Marta Lindqvist', 'retake'), review(1, 'Jonah Abara', 'approved')] } as TakeDetail
    const w = await mountSuspended(TakeHeader, { props: { take: t } })
    const verdict = w.find('[data-testid="take-verdict"]')
    expect(verdict.text()).toContain('Record again')
    expect(verdict.text()).toContain('from Marta Lindqvist and 1 more')
    expect(verdict.find('a').attributes('href')).toBe('#reviews-heading')
  })

  it('says a withdrawn take no longer counts', async () => {
    const w = await mountSuspended(TakeHeader, { props: { take: { ...take(), withdrawnAt: '2026-12-01T09:00:00.000Z' } as TakeDetail } })
    expect(w.text()).toMatch(/Withdrawn .*no longer counts in lists and charts/)
  })
})

// The reviewer's form and the reviews the player reads. The hold under a moment is checked
// against the holds given here: a hold sounds from its start up to its end (half-open
// interval, common practice for adjacent time spans).
import { describe, expect, it } from 'vitest'
import { mountSuspended } from '@nuxt/test-utils/runtime'
import ReviewPanel from '~/components/reviews/ReviewPanel.vue'
import ReviewList from '~/components/reviews/ReviewList.vue'
import type { ReportHold } from '#shared/types/take'
import type { TakeReview } from '#shared/types/review'

const hold = (i: number, note: string, startS: number, endS: number): ReportHold => ({
  index: i, note, member: i === 1 ? 'third' : 'root', startS, endS, targetHz: 440, detectedHz: 440, centsFromTarget: 1, centsFromEqual: 1,
  spreadCents: 1, slopeCentsPerS: 0, confidence: 0.9, withinTolerance: true, reason: null,
})
const holds = [hold(0, 'A4', 1, 3), hold(1, 'C#5', 3, 5), hold(2, 'E5', 5.5, 7.5)]
const base = { holds, durationS: 8, mine: null, moment: null, ready: true, busy: false, error: null, errorNote: null, message: null }

describe('ReviewPanel', () => {
  it('pins a note to a moment picked on the waveform and sends the whole review', async () => {
    const w = await mountSuspended(ReviewPanel, { props: base })
    await w.setProps({ moment: 3.6 })
    // The moment lands in the second hold (3 ≤ 3.6 < 5).
    expect(w.text()).toContain('At 0:03.6 · Hold 2 · C#5 (third)')
    const [summary, body] = w.findAll('textarea')
    await summary!.setValue('Good air.')
    await body!.setValue('The third is high here.')
    await w.findAll('button').find(b => b.text() === 'Add the note')!.trigger('click')
    // A note on the whole take, from the place picker.
    await w.find('select').setValue('take')
    await w.findAll('textarea').at(-1)!.setValue('Breathe together.')
    await w.findAll('button').find(b => b.text() === 'Add the note')!.trigger('click')
    await w.find('input[value="needs_work"]').setValue(true)
    await w.find('form').trigger('submit')
    expect(w.emitted('save')).toEqual([[{ verdict: 'needs_work', summary: 'Good air.', notes: [{ atS: null, body: 'Breathe together.' }, { atS: 3.6, body: 'The third is high here.' }] }]])
  })

  it('pins to a chosen hold at its middle, from the keyboard', async () => {
    const w = await mountSuspended(ReviewPanel, { props: base })
    await w.find('select').setValue('hold-2')
    await w.findAll('textarea').at(-1)!.setValue('Hold the E longer.')
    await w.findAll('button').find(b => b.text() === 'Add the note')!.trigger('click')
    await w.find('input[value="approved"]').setValue(true)
    await w.find('form').trigger('submit')
    // (5.5 + 7.5) / 2 = 6.5 s, inside the third hold.
    expect(w.emitted('save')![0]![0]).toMatchObject({ verdict: 'approved', notes: [{ atS: 6.5, body: 'Hold the E longer.' }] })
  })

  it('takes the hold chosen in the hold table as the place of the next note', async () => {
    const w = await mountSuspended(ReviewPanel, { props: base })
    await w.setProps({ hold: { index: 1, n: 1 } })
    expect((w.find('select').element as HTMLSelectElement).value).toBe('hold-1')
    await w.setProps({ moment: 6 })
    await w.setProps({ hold: { index: 1, n: 2 } })
    expect((w.find('select').element as HTMLSelectElement).value).toBe('hold-1')
  })

  it('says what is missing instead of sending: no verdict, an empty note, a moment after the end', async () => {
    const w = await mountSuspended(ReviewPanel, { props: base })
    await w.find('form').trigger('submit')
    expect(w.find('[role="alert"]').text()).toBe('Choose a verdict.')
    await w.find('select').setValue('moment')
    await w.find('input[inputmode="decimal"]').setValue('9.5')
    await w.findAll('textarea').at(-1)!.setValue('Late note')
    await w.findAll('button').find(b => b.text() === 'Add the note')!.trigger('click')
    expect(w.find('[role="alert"]').text()).toContain('8.0 s long')
    expect(w.emitted('save')).toBeUndefined()
  })

  it('opens with the reviewer\'s saved review, removes a note and shows the server\'s refusal', async () => {
    const mine: TakeReview = {
      id: 3, reviewer: { id: 2, name: 'Kit Reviewer' }, verdict: 'retake', summary: 'Again please', at: '2026-03-10T18:00:00Z', mine: true,
      notes: [{ id: 1, atS: null, holdIndex: null, body: 'Whole' }, { id: 2, atS: 1.5, holdIndex: 0, body: 'Start' }],
    }
    const w = await mountSuspended(ReviewPanel, { props: { ...base, mine, error: 'Note 2 is empty', errorNote: 1 } })
    expect((w.find('input[value="retake"]').element as HTMLInputElement).checked).toBe(true)
    expect(w.findAll('[data-testid="draft-notes"] li')).toHaveLength(2)
    expect(w.find('[data-testid="draft-notes"] li:nth-child(2) textarea').attributes('aria-invalid')).toBe('true')
    expect(w.find('[role="alert"]').text()).toBe('Note 2 is empty')
    await w.findAll('button').find(b => b.text().startsWith('Remove') && b.text().includes('note 1'))!.trigger('click')
    await w.find('form').trigger('submit')
    expect(w.emitted('save')![0]![0]).toEqual({ verdict: 'retake', summary: 'Again please', notes: [{ atS: 1.5, body: 'Start' }] })
  })

  it('is disabled with a reason while the take is analysed', async () => {
    const w = await mountSuspended(ReviewPanel, { props: { ...base, ready: false } })
    expect(w.text()).toContain('still being analysed')
    expect(w.find('button[type="submit"]').attributes('disabled')).toBeDefined()
  })
})

describe('ReviewList', () => {
  it('shows the verdict and each note at its moment and hold, whole-take notes said so', async () => {
    const reviews: TakeReview[] = [{
      id: 1, reviewer: { id: 2, name: 'Kit Reviewer' }, verdict: 'approved', summary: 'Well done.', at: new Date().toISOString(), mine: false,
      notes: [{ id: 1, atS: null, holdIndex: null, body: 'Lovely tone' }, { id: 2, atS: 65.25, holdIndex: 1, body: 'Third a bit high' }, { id: 3, atS: 5.2, holdIndex: null, body: 'Breath' }],
    }]
    const w = await mountSuspended(ReviewList, { props: { reviews, holds } })
    expect(w.find('[data-testid="verdict"]').text()).toBe('Approved')
    const notes = w.findAll('[data-testid="review-note"]').map(n => n.text().replace(/\s+/g, ' '))
    expect(notes[0]).toContain('Whole take')
    expect(notes[1]).toContain('At 1:05.3')
    expect(notes[1]).toContain('hold 2 · C#5 (third)')
    expect(notes[2]).toContain('between holds')
    await w.findAll('button').find(b => b.text().startsWith('Hear'))!.trigger('click')
    expect(w.emitted('play-hold')).toEqual([[1]])
  })
})

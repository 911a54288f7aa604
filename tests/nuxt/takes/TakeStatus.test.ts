import { describe, expect, it } from 'vitest'
import { mountSuspended } from '@nuxt/test-utils/runtime'
import TakeStatus from '~/components/takes/TakeStatus.vue'

describe('TakeStatus', () => {
  it.each([
    ['queued', 'Waiting for analysis'],
    ['analysing', 'Analysing'],
    ['analysed', 'Analysed'],
    ['failed', 'Could not be analysed'],
  ])('tag for %s reads "%s"', async (status, label) => {
    const w = await mountSuspended(TakeStatus, { props: { status } })
    expect(w.text()).toBe(label)
    expect(w.attributes('data-status')).toBe(status)
  })

  it('panel: queued shows an indeterminate progress bar in a polite live region', async () => {
    const w = await mountSuspended(TakeStatus, { props: { status: 'queued', variant: 'panel', live: true } })
    const region = w.find('[role="status"]')
    expect(region.attributes('aria-live')).toBe('polite')
    expect(region.text()).toContain('Waiting for analysis')
    const bar = w.find('progress')
    expect(bar.exists()).toBe(true)
    // No value attribute = indeterminate (HTML standard, the progress element).
    expect(bar.attributes('value')).toBeUndefined()
    expect(w.text()).toContain('This updates by itself')
  })

  it('panel: analysing shows the share done as a percentage and on the bar', async () => {
    const w = await mountSuspended(TakeStatus, { props: { status: 'analysing', variant: 'panel', progress: 0.426 } })
    expect(w.find('[data-testid="status-detail"]').text()).toContain('43 % done')
    expect(w.find('progress').attributes('value')).toBe('43')
    expect(w.find('progress').attributes('aria-label')).toBe('Analysis progress')
  })

  it('panel: progress outside 0..1 or not a number never shows NaN', async () => {
    const w = await mountSuspended(TakeStatus, { props: { status: 'analysing', variant: 'panel', progress: Number.NaN } })
    expect(w.text()).not.toContain('NaN')
    const w2 = await mountSuspended(TakeStatus, { props: { status: 'analysing', variant: 'panel', progress: 1.7 } })
    expect(w2.find('progress').attributes('value')).toBe('100')
  })

  it('panel: analysed has no progress bar', async () => {
    const w = await mountSuspended(TakeStatus, { props: { status: 'analysed', variant: 'panel' } })
    expect(w.find('progress').exists()).toBe(false)
    expect(w.text()).toContain('The report is ready')
  })

  it('panel: failed explains the engine error code in words and keeps the code', async () => {
    const w = await mountSuspended(TakeStatus, {
      props: { status: 'failed', variant: 'panel', error: { code: 'clipped', message: 'heavy clipping' } },
    })
    const detail = w.find('[data-testid="status-detail"]').text()
    expect(detail).toMatch(/clipped \(too loud\)/)
    expect(w.text()).toContain('clipped')
    expect(w.text()).toContain('audio is kept')
    expect(w.find('progress').exists()).toBe(false)
  })

  it('panel: an unknown error code falls back to the server message', async () => {
    const w = await mountSuspended(TakeStatus, {
      props: { status: 'failed', variant: 'panel', error: { code: 'worker_lost', message: 'The worker stopped; retried 3 times.' } },
    })
    expect(w.find('[data-testid="status-detail"]').text()).toBe('The worker stopped; retried 3 times.')
  })
})

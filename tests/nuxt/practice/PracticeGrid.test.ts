import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { flushPromises } from '@vue/test-utils'
import { mountSuspended } from '@nuxt/test-utils/runtime'
import { computeTargets } from '#shared/tuning'
import PracticeGrid from '~/components/practice/PracticeGrid.vue'
import PracticePlayer from '~/components/practice/PracticePlayer.vue'
import PracticeVolume from '~/components/practice/PracticeVolume.vue'
import type { TargetsResult as DrillTargets } from '#shared/tuning/index'
import { usePracticeStore } from '~/stores/practice'
import { FakeAudioContext, type FakeOscillator } from './audio-mock'

// Two chords, C major then F major, with a B♭ trumpet on the top line, tuned just from each root.
const drill = {
  title: 'Two chords',
  key: 'C major',
  tempo: 60,
  a4: 440,
  system: { name: 'just-root' },
  tolerance: 10,
  parts: [{ name: 'Trumpet', instrument: 'trumpet-bb' }, { name: 'Alto' }, { name: 'Bass' }],
  chords: [
    { beats: 4, symbol: 'C', notes: { Trumpet: 'G4', Alto: 'E4', Bass: 'C3' } },
    { beats: 2, symbol: 'F', notes: { Trumpet: 'A4', Alto: null, Bass: 'F2' } },
  ],
}
const targets = computeTargets(drill) as unknown as DrillTargets
const parts = drill.parts

describe('PracticeGrid (voicing grid)', () => {
  it('lays out parts as rows and chords as columns with concert and written notes', async () => {
    const w = await mountSuspended(PracticeGrid, { props: { parts, chords: targets.chords, systemLabel: 'Just, from each chord root' } })
    expect(w.find('caption').text()).toContain('Just, from each chord root')
    expect(w.findAll('thead th')).toHaveLength(2)
    expect(w.findAll('tbody tr')).toHaveLength(3)
    const trumpet = w.findAll('tbody tr')[0]!
    expect(trumpet.findAll('[data-testid="concert-note"]').map(n => n.text())).toEqual(['G4', 'A4'])
    // A B♭ trumpet reads a major second above concert pitch (common practice): G4 → A4, A4 → B4.
    expect(trumpet.findAll('[data-testid="written-note"]').map(n => n.text())).toEqual(['written A4', 'written B4'])
    // Concert-pitch parts show no written line.
    expect(w.findAll('tbody tr')[1]!.find('[data-testid="written-note"]').exists()).toBe(false)
    expect(w.findAll('tbody tr')[1]!.text()).toContain('rest')
  })

  it('shows each target in Hz and in signed cents from equal temperament', async () => {
    const w = await mountSuspended(PracticeGrid, { props: { parts, chords: targets.chords, systemLabel: 'Just' } })
    const alto = w.findAll('tbody tr')[1]!
    // A just major third is 1200·log2(5/4) = 386.31 ¢, 13.69 ¢ below the equal-tempered 400 ¢
    // (common practice). The minus is U+2212.
    expect(alto.find('[data-testid="cents-from-equal"]').text()).toContain('\u221213.7 ¢')
    // A just fifth 3/2 is 701.96 ¢: +2.0 ¢ from equal temperament (common practice).
    expect(w.findAll('tbody tr')[0]!.find('[data-testid="cents-from-equal"]').text()).toContain('+2.0 ¢')
    // C3 root at its equal-tempered place at A4 = 440 Hz: 130.81 Hz (equal-temperament table).
    expect(w.findAll('tbody tr')[2]!.text()).toContain('130.81 Hz')
  })

  it('moves with the arrow keys, keeps one tab stop, and plays with Enter/Space (Shift plays the chord)', async () => {
    const w = await mountSuspended(PracticeGrid, { props: { parts, chords: targets.chords, systemLabel: 'Just' }, attachTo: document.body })
    const focusables = () => w.findAll('[data-r]')
    expect(focusables().filter(e => e.attributes('tabindex') === '0')).toHaveLength(1)
    const first = w.find('[data-r="0"][data-c="1"]')
    ;(first.element as HTMLElement).focus()
    await first.trigger('focus')
    await first.trigger('keydown', { key: 'ArrowDown' })
    expect((document.activeElement as HTMLElement).dataset.r).toBe('1')
    expect((document.activeElement as HTMLElement).dataset.c).toBe('1')
    await w.find('[data-r="1"][data-c="1"]').trigger('keydown', { key: 'ArrowRight' })
    expect((document.activeElement as HTMLElement).dataset.c).toBe('2')
    await w.find('[data-r="1"][data-c="2"]').trigger('keydown', { key: 'Home' })
    expect((document.activeElement as HTMLElement).dataset.c).toBe('0')
    expect(focusables().filter(e => e.attributes('tabindex') === '0')).toHaveLength(1)
    await w.find('[data-r="1"][data-c="0"]').trigger('keydown', { key: 'End' })
    await w.find('[data-r="1"][data-c="2"]').trigger('keydown', { key: 'Enter', shiftKey: true })
    expect(w.emitted('play-chord')).toEqual([[1]])
    await w.find('[data-r="1"][data-c="1"]').trigger('click')
    expect(w.emitted('play-note')).toEqual([[0, 'Trumpet']])
    await w.find('[data-r="0"][data-c="2"]').trigger('click')
    expect(w.emitted('play-chord')).toEqual([[1], [1]])
    await w.find('[data-r="3"][data-c="0"]').trigger('click')
    expect(w.emitted('play-part')).toEqual([['Bass']])
    w.unmount()
  })

  it('labels every control for screen readers with note, target and cents', async () => {
    const w = await mountSuspended(PracticeGrid, { props: { parts, chords: targets.chords, systemLabel: 'Just' } })
    const label = w.find('[data-r="2"][data-c="1"]').attributes('aria-label')!
    expect(label).toContain('Alto, chord 1: E4')
    expect(label).toContain('third')
    expect(label).toContain('\u221213.7 cents from equal temperament')
    expect(w.find('[data-r="0"][data-c="1"]').attributes('aria-label')).toBe('Play chord 1, C, 4 beats')
  })
})

describe('PracticePlayer', () => {
  beforeEach(async () => {
    // The store lives as long as the test app: start each test with a fresh audio context.
    await usePracticeStore().dispose()
    FakeAudioContext.instances = []
    vi.stubGlobal('AudioContext', FakeAudioContext)
  })
  afterEach(() => vi.unstubAllGlobals())

  it('plays a chord at the targets of the chosen system', async () => {
    const w = await mountSuspended(PracticePlayer, { props: { parts, chords: targets.chords, tempo: 60, systemLabel: 'Just' } })
    await w.find('[data-r="0"][data-c="1"]').trigger('click')
    await flushPromises()
    const oscs = FakeAudioContext.instances[0]!.of<FakeOscillator>('oscillator')
    const expected = targets.chords[0]!.notes.map(n => n.targetHz)
    expect(oscs.map(o => o.frequency.value)).toEqual(expected)
    // C3 = 130.8128 Hz; E4 = C3·5/4·2 = 327.032 Hz; G4 = C3·3/2·2 = 392.438 Hz (4:5:6 from the root, common practice).
    const c3 = 440 * 2 ** (-21 / 12)
    expect(expected.slice().sort((a, b) => a - b)).toEqual([c3, c3 * 2.5, c3 * 3].map(x => expect.closeTo(x, 6)))
  })

  it('plays one part line in time: each chord at its beat', async () => {
    const w = await mountSuspended(PracticePlayer, { props: { parts, chords: targets.chords, tempo: 120, systemLabel: 'Just' } })
    await w.find('[data-r="3"][data-c="0"]').trigger('click')
    await flushPromises()
    const oscs = FakeAudioContext.instances[0]!.of<FakeOscillator>('oscillator')
    expect(oscs).toHaveLength(2)
    // Chord 2 starts after 4 beats; at 120 bpm that is 2 s later (60/120 s a beat).
    expect(oscs[1]!.started! - oscs[0]!.started!).toBeCloseTo(2, 9)
  })
})

describe('PracticeVolume', () => {
  it('shows the headphone caution and starts at the conservative default', async () => {
    const w = await mountSuspended(PracticeVolume)
    expect(w.text()).toContain('Headphones: start quiet')
    expect(w.find('[role="note"]').exists()).toBe(true)
    const slider = w.find('input[type="range"]')
    expect((slider.element as HTMLInputElement).value).toBe('25')
    expect(w.find('label[for]').text()).toBe('Practice tone volume')
  })
})

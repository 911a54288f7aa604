import { describe, expect, it } from 'vitest'
import { mountSuspended } from '@nuxt/test-utils/runtime'
import TakeHoldTable from '~/components/takes/TakeHoldTable.vue'
import type { ReportHold as TakeHold } from '#shared/types/take'

// A just major third above C4 at A4 = 440 Hz: C4 = 261.6256 Hz (equal temperament), the pure
// third 5/4 of it = 327.0320 Hz, which is 1200·log2(5/4) − 400 = −13.686 ¢ from the equal-tempered
// E4 (329.6276 Hz). Values of the equal-tempered scale and of 5/4 = 386.31 ¢ are common practice.
const third: TakeHold = {
  index: 0, note: 'E4', member: 'third', startS: 1.2, endS: 4.8,
  targetHz: 327.032, detectedHz: 329.6276, centsFromTarget: 13.686, centsFromEqual: 0,
  spreadCents: 2.4, slopeCentsPerS: -0.8, confidence: 0.97, withinTolerance: false, reason: null, writtenNote: 'F#4',
}
const flatRoot: TakeHold = {
  index: 1, note: 'Bb3', member: 'root', startS: 5.1, endS: 8.9,
  targetHz: 233.0819, detectedHz: 231.74, centsFromTarget: -10.0, centsFromEqual: -10.0,
  spreadCents: 3.1, slopeCentsPerS: 1.5, confidence: 0.9, withinTolerance: true, reason: null,
}
const missing: TakeHold = {
  index: 2, note: 'G4', member: 'fifth', startS: 9, endS: 12,
  targetHz: 392.4383, detectedHz: null, centsFromTarget: null, centsFromEqual: null,
  spreadCents: null, slopeCentsPerS: null, confidence: null, withinTolerance: null, reason: 'silence where the hold was expected',
}

describe('TakeHoldTable', () => {
  it('says where each hold started against its beat, and how far apart the voices of a section were', async () => {
    const sung: TakeHold = { ...third, timing: { onsetS: 1.32, releaseS: 4.7, start: 'onset', fromBeatS: 0.12 }, voiceSpreadCents: 13.6 }
    const tied: TakeHold = { ...flatRoot, timing: { onsetS: null, releaseS: 8.8, start: 'chord_boundary', fromBeatS: null } }
    const w = await mountSuspended(TakeHoldTable, { props: { holds: [sung, tied, missing], tolerance: 10 } })
    const rows = w.findAll('tbody tr')
    expect(rows[0]!.find('[data-col="timing"]').text()).toBe('0.12 s late')
    expect(rows[0]!.find('[data-col="voices"]').text()).toBe('voices about 14 ¢ apart')
    expect(rows[1]!.find('[data-col="timing"]').text()).toBe('held over (no new attack)')
    expect(rows[1]!.find('[data-col="voices"]').exists()).toBe(false)
    // The phone cards say the same.
    const cards = w.findAll('[data-testid="hold-cards"] li')
    expect(cards[0]!.find('[data-col="timing"]').text()).toContain('0.12 s late')
    expect(cards[0]!.find('[data-col="voices"]').text()).toContain('voices about 14 ¢ apart')
    expect(cards[1]!.find('[data-col="timing"]').text()).toContain('held over (no new attack)')
  })

  it('says how closely each centre is known, and nothing where the analysis gave no standard error', async () => {
    // Two standard errors plus the 0.25 ¢ floor: 2 × 0.6 + 0.25 = 1.45 → ±1.5 ¢.
    const section: TakeHold = { ...third, centreErrorCents: 0.6 }
    const w = await mountSuspended(TakeHoldTable, { props: { holds: [section, flatRoot, missing], tolerance: 10 } })
    const rows = w.findAll('tbody tr')
    expect(rows[0]!.find('[data-col="centre-range"]').text()).toBe('measured to within ±1.5 ¢')
    expect(rows[1]!.find('[data-col="centre-range"]').exists()).toBe(false)
    expect(rows[2]!.find('[data-col="centre-range"]').exists()).toBe(false)
    const cards = w.findAll('[data-testid="hold-cards"] li')
    expect(cards[0]!.find('[data-col="centre-range"]').text()).toBe('measured to within ±1.5 ¢')
    expect(w.text()).not.toContain('NaN')
  })

  it('shows signed cents with a true minus sign (U+2212), never a hyphen', async () => {
    const w = await mountSuspended(TakeHoldTable, { props: { holds: [third, flatRoot, missing], tolerance: 10, part: 'Alto' } })
    const rows = w.findAll('tbody tr')
    expect(rows).toHaveLength(3)
    const second = rows[1]!
    // U+2212 MINUS SIGN (Unicode standard), not U+002D HYPHEN-MINUS.
    expect(second.text()).toContain('\u221210.0 ¢')
    expect(second.text()).not.toMatch(/-\d/)
    expect(second.find('[data-col="from-equal"]').text()).toBe('\u221210.0 ¢')
    expect(rows[0]!.text()).toContain('+13.7 ¢')
    // Zero shows without a sign.
    expect(rows[0]!.find('[data-col="from-equal"]').text()).toBe('0.0 ¢')
    // Negative slope also carries the true minus.
    expect(rows[0]!.text()).toContain('\u22120.8 ¢/s')
  })

  it('says "no pitch found" with the reason for a hold without a pitch, and no invented numbers', async () => {
    const w = await mountSuspended(TakeHoldTable, { props: { holds: [third, flatRoot, missing], tolerance: 10 } })
    const row = w.findAll('tbody tr')[2]!
    expect(row.find('[data-col="no-pitch"]').text()).toContain('no pitch found')
    expect(row.text()).toContain('silence where the hold was expected')
    expect(row.text()).not.toContain('NaN')
    // The target is still shown: it does not depend on the take.
    expect(row.text()).toContain('392.44 Hz')
  })

  it('has a caption, column and row headers, and written beside concert notes', async () => {
    const w = await mountSuspended(TakeHoldTable, { props: { holds: [third, missing], tolerance: 8, part: 'Alto', systemLabel: 'Just, from each chord root' } })
    const caption = w.find('caption').text()
    expect(caption).toContain('Alto')
    expect(caption).toContain('1 of 2 found')
    expect(caption).toContain('±8.0 ¢')
    expect(w.findAll('thead th').every(th => th.attributes('scope') === 'col')).toBe(true)
    expect(w.findAll('tbody th').every(th => th.attributes('scope') === 'row')).toBe(true)
    const cells = w.findAll('tbody tr')[0]!.findAll('td')
    expect(cells[0]!.text()).toBe('F♯4') // written (a B♭ instrument reads a major second up: common practice)
    expect(cells[1]!.text()).toBe('E4') // concert
  })

  it('colours the deviation badge by direction and keeps the number beside it', async () => {
    const w = await mountSuspended(TakeHoldTable, { props: { holds: [third, flatRoot], tolerance: 10 } })
    const badges = w.findAll('[data-token]')
    expect(badges[0]!.attributes('data-token')).toMatch(/^sharp-/)
    expect(badges[0]!.text()).toContain('+13.7 ¢')
    // −10.0 is on the tolerance edge: inside (|c| ≤ tolerance).
    expect(badges[1]!.attributes('data-token')).toBe('in-tune')
    expect(badges[1]!.text()).toContain('\u221210.0 ¢')
  })

  it('offers a listen button per hold and emits its index', async () => {
    const w = await mountSuspended(TakeHoldTable, { props: { holds: [third, flatRoot], tolerance: 10, playable: true } })
    // One button per hold in the table (wide screens) and one per card (phones).
    const buttons = w.findAll('[data-testid="hold-table"] button')
    expect(buttons).toHaveLength(2)
    await buttons[1]!.trigger('click')
    expect(w.emitted('play-hold')).toEqual([[1]])
    const cardButtons = w.findAll('[data-testid="hold-cards"] button')
    expect(cardButtons).toHaveLength(2)
    await cardButtons[0]!.trigger('click')
    expect(w.emitted('play-hold')).toEqual([[1], [0]])
  })
})

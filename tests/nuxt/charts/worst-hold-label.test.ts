// The worst-holds chart names each hold in short lines so a phone's 390 px keep the drill's name
// (the table beside the chart gives every label whole). Titles and sections are invented.
import { describe, expect, it } from 'vitest'
import { LABEL_LINE_MAX, shortLine, worstHoldLabel } from '~/utils/chart-kit'

describe('worst-hold labels', () => {
  it('puts drill, chord with part and member, and sections with the count on lines of their own', () => {
    const lines = worstHoldLabel({ chordIndex: 4, part: 'Bass', member: 'root', sections: ['Bass'], n: 2 }, 'Evening cadence')
    expect(lines).toEqual(['Evening cadence', 'Chord 5 · Bass (root)', 'Bass · 2×'])
  })

  it('cuts a long line short with an ellipsis, never past the limit, and keeps the drill\'s start', () => {
    const title = 'Chorale phrase for the whole choir, bars 17 to 32, second verse'
    const [first] = worstHoldLabel({ chordIndex: 0, part: 'Soprano', member: null, sections: [], n: 1 }, title)
    expect([...first!].length).toBeLessThanOrEqual(LABEL_LINE_MAX)
    expect(first!.endsWith('…')).toBe(true)
    expect(title.startsWith(first!.slice(0, -1))).toBe(true)
    expect(shortLine('Short')).toBe('Short')
    // Counted in characters, not UTF-16 units: "♭" and "é" are one each.
    expect(shortLine('B♭ é', 4)).toBe('B♭ é')
  })

  it('leaves the sections out when none are known', () => {
    expect(worstHoldLabel({ chordIndex: 0, part: 'Alto', member: null, sections: [], n: 3 }, 'Drill')[2]).toBe('3×')
  })
})

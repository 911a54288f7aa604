import { describe, expect, it } from 'vitest'
import { ordinal, timeLabels } from '../../../utils/take-times'

describe('telling apart takes sent close together', () => {
  // English ordinal suffixes (common practice; 11th–13th are the exceptions).
  it.each([[1, '1st'], [2, '2nd'], [3, '3rd'], [4, '4th'], [11, '11th'], [12, '12th'], [13, '13th'], [21, '21st'], [22, '22nd'], [103, '103rd'], [111, '111th']])('%d → %s', (n, s) => {
    expect(ordinal(n)).toBe(s)
  })

  it('shows no seconds when every take is in its own minute', () => {
    const l = timeLabels([{ id: 1, createdAt: '2026-03-01T10:00:05Z' }, { id: 2, createdAt: '2026-03-01T10:01:05Z' }])
    expect([...l.values()]).toEqual([{ seconds: false, ordinal: null }, { seconds: false, ordinal: null }])
  })

  it('shows seconds when two takes share a minute', () => {
    const l = timeLabels([{ id: 1, createdAt: '2026-03-01T10:00:05Z' }, { id: 2, createdAt: '2026-03-01T10:00:41Z' }, { id: 3, createdAt: '2026-03-02T09:00:00Z' }])
    expect(l.get(1)).toEqual({ seconds: true, ordinal: null })
    expect(l.get(2)).toEqual({ seconds: true, ordinal: null })
    expect(l.get(3)).toEqual({ seconds: true, ordinal: null })
  })

  it('numbers takes sent in the same second in the order they were sent, then by id', () => {
    const l = timeLabels([
      { id: 9, createdAt: '2026-03-01T10:00:05.700Z' },
      { id: 7, createdAt: '2026-03-01T10:00:05.200Z' },
      { id: 8, createdAt: '2026-03-01T10:00:05.700Z' },
    ])
    expect(l.get(7)!.ordinal).toBe('1st')
    expect(l.get(8)!.ordinal).toBe('2nd')
    expect(l.get(9)!.ordinal).toBe('3rd')
  })

  it('a row without a readable time keeps a label and never throws', () => {
    const l = timeLabels([{ id: 1, createdAt: 'not a date' }, { id: 2, createdAt: '2026-03-01T10:00:05Z' }])
    expect(l.get(1)).toEqual({ seconds: false, ordinal: null })
  })
})

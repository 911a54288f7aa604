import { describe, expect, it } from 'vitest'
import { traceSeries, traceTooltip, wrongNoteMarkers, type TraceHold } from '../../../utils/pitch-trace'

// E♭4 = 311.127 Hz and C4 = 261.626 Hz at A4 = 440 Hz (standard equal-tempered table): +300 ¢.
const measured: TraceHold = {
  index: 0, note: 'C4', startS: 1, endS: 3, targetHz: 261.6256, detectedHz: 262.38, centsFromTarget: 5, centsFromEqual: 5,
  trace: [[1.5, 262.38], [2.5, 262.38]],
}
const wrong: TraceHold = {
  index: 1, note: 'C4', startS: 4, endS: 6, targetHz: 261.6256, detectedHz: 311.127, centsFromTarget: null, centsFromEqual: null,
  reasonCode: 'wrong_note', heardNote: 'Eb4', heardCentsFromExpected: 300, trace: [[4.5, 311.127], [5.5, 311.127]],
}
const low: TraceHold = { ...wrong, index: 2, startS: 7, endS: 9, detectedHz: 220, heardNote: 'A3', heardCentsFromExpected: -300 }
// An older report that scored the wrong note as a deviation: still never drawn as one.
const oldStyle: TraceHold = { ...measured, index: 3, startS: 10, endS: 12, detectedHz: 311.127, centsFromTarget: 300, centsFromEqual: 300, trace: [[11, 311.127]] }

describe('pitch trace points', () => {
  it('draws only measured holds, in cents from target; a wrong note is never a point of the line', () => {
    const s = traceSeries([wrong, measured, oldStyle])
    const ys = s.filter(p => p.y !== null).map(p => p.y!)
    expect(ys).toHaveLength(2)
    // 1200·log2(262.38/261.6256) = +4.99 ¢
    for (const y of ys) expect(y).toBeCloseTo(4.99, 1)
    expect(ys.every(y => Math.abs(y) <= 100)).toBe(true)
    expect(s.at(-1)).toEqual({ x: 3, y: null })
  })

  it('marks each wrong note at the edge on its side, with the same words as the table', () => {
    const m = wrongNoteMarkers([measured, low, wrong, oldStyle], 40)
    expect(m.map(x => [x.x, x.y, x.side])).toEqual([[5, 40, 'above'], [8, -40, 'below'], [11, 40, 'above']])
    expect(m[0]!.text).toBe('Hold 2: Wrong note: heard Eb4, +300 ¢ from the expected C4')
    expect(m[1]!.text).toBe('Hold 3: Wrong note: heard A3, \u2212300 ¢ from the expected C4')
    expect(traceTooltip(m[0]!)).toBe(m[0]!.text)
  })

  it('a pitch point\'s tooltip gives the signed cents and the time', () => {
    expect(traceTooltip({ x: 2.5, y: -6.24 })).toBe('\u22126.2 ¢ at 2.50 s')
  })
})

import { describe, expect, it } from 'vitest'
import { SlidingWindowLimiter } from '../../../server/utils/rate-limit'

describe('SlidingWindowLimiter', () => {
  it('allows `limit` hits in a window, then limits until the oldest expires', () => {
    const l = new SlidingWindowLimiter(3, 60_000)
    const t = 1_000_000
    for (let i = 0; i < 3; i++) {
      expect(l.check('a', t + i).limited).toBe(false)
      l.hit('a', t + i)
    }
    const c = l.check('a', t + 10_000)
    expect(c.limited).toBe(true)
    expect(c.retryAfterS).toBe(50) // the first hit leaves the window 60 s after t
    expect(l.check('a', t + 60_001).limited).toBe(false)
  })

  it('keeps keys apart and forgets a key on reset', () => {
    const l = new SlidingWindowLimiter(1, 1000)
    l.hit('a', 0)
    expect(l.check('a', 1).limited).toBe(true)
    expect(l.check('b', 1).limited).toBe(false)
    l.reset('a')
    expect(l.check('a', 2).limited).toBe(false)
  })

  it('never answers a retry time below one second', () => {
    const l = new SlidingWindowLimiter(1, 1000)
    l.hit('a', 0)
    expect(l.check('a', 999.5).retryAfterS).toBe(1)
  })
})

import { describe, expect, it } from 'vitest'
import { LoginThrottle, SlidingWindowLimiter } from '../../../server/utils/rate-limit'

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

// Counting failures per account and address together is common practice for sign-in throttling
// (OWASP Authentication Cheat Sheet, "Login Throttling", from memory): a lockout keyed on the
// account alone lets anyone lock its owner out.
describe('LoginThrottle', () => {
  const limits = { maxFailuresPerAccountAddress: 5, maxFailuresPerAccount: 100, maxFailuresPerAddress: 30, windowS: 900 }
  const t = 5_000_000

  it('stops one address after five failures on one account, while the owner elsewhere still gets in', () => {
    const th = new LoginThrottle(limits)
    for (let i = 0; i < 5; i++) {
      expect(th.check('owner@example.org', '198.51.100.7', t + i).limited).toBe(false)
      th.failed('owner@example.org', '198.51.100.7', t + i)
    }
    expect(th.check('owner@example.org', '198.51.100.7', t + 10)).toEqual({ limited: true, retryAfterS: 900 })
    expect(th.check('owner@example.org', '203.0.113.20', t + 10).limited).toBe(false)
    // The same address may still try another account (up to its own ceiling).
    expect(th.check('someone@example.org', '198.51.100.7', t + 10).limited).toBe(false)
  })

  it('limits the account across addresses only at the much higher ceiling', () => {
    const th = new LoginThrottle(limits)
    for (let i = 0; i < 99; i++) th.failed('owner@example.org', `10.0.${i >> 8}.${i & 255}`, t + i)
    expect(th.check('owner@example.org', '203.0.113.20', t + 200).limited).toBe(false)
    th.failed('owner@example.org', '10.9.9.9', t + 201)
    expect(th.check('owner@example.org', '203.0.113.20', t + 202).limited).toBe(true)
  })

  it('limits one address across accounts', () => {
    const th = new LoginThrottle({ ...limits, maxFailuresPerAddress: 3 })
    for (let i = 0; i < 3; i++) th.failed(`walker-${i}@example.org`, '198.51.100.7', t + i)
    expect(th.check('fresh@example.org', '198.51.100.7', t + 5).limited).toBe(true)
    expect(th.check('fresh@example.org', '198.51.100.8', t + 5).limited).toBe(false)
  })

  it('clears the account\'s count at that address after a right password, not elsewhere', () => {
    const th = new LoginThrottle(limits)
    for (let i = 0; i < 4; i++) th.failed('owner@example.org', '198.51.100.7', t + i)
    for (let i = 0; i < 5; i++) th.failed('owner@example.org', '198.51.100.9', t + i)
    th.succeeded('owner@example.org', '198.51.100.7')
    for (let i = 0; i < 4; i++) th.failed('owner@example.org', '198.51.100.7', t + 10 + i)
    expect(th.check('owner@example.org', '198.51.100.7', t + 20).limited).toBe(false)
    expect(th.check('owner@example.org', '198.51.100.9', t + 20).limited).toBe(true)
  })
})

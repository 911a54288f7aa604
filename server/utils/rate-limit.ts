import type { H3Event } from 'h3'
import { getRequestIP, setResponseHeader } from 'h3'
import { apiError } from './errors'

/** Counts events per key in a sliding window (in memory, per process). */
export class SlidingWindowLimiter {
  private hits = new Map<string, number[]>()
  constructor (readonly limit: number, readonly windowMs: number) {}

  private recent (key: string, now: number): number[] {
    const list = (this.hits.get(key) ?? []).filter(t => t > now - this.windowMs)
    if (list.length) this.hits.set(key, list)
    else this.hits.delete(key)
    return list
  }

  /** Whether the key has used up its allowance; retryAfterS = seconds until the oldest hit expires. */
  check (key: string, now = Date.now()): { limited: boolean, retryAfterS: number } {
    const list = this.recent(key, now)
    if (list.length < this.limit) return { limited: false, retryAfterS: 0 }
    const oldest = list[list.length - this.limit]!
    return { limited: true, retryAfterS: Math.max(1, Math.ceil((oldest + this.windowMs - now) / 1000)) }
  }

  hit (key: string, now = Date.now()): void {
    const list = this.recent(key, now)
    list.push(now)
    // Keep no more than we need to answer check().
    this.hits.set(key, list.slice(-this.limit))
    if (this.hits.size > 100_000) this.prune(now)
  }

  reset (key: string): void {
    this.hits.delete(key)
  }

  prune (now = Date.now()): void {
    for (const key of [...this.hits.keys()]) this.recent(key, now)
  }
}

export interface LoginLimits {
  /** Failures of one account from one client address. */
  maxFailuresPerAccountAddress: number
  /** Failures of one account from every address together: far higher, so one attacker cannot lock the owner out. */
  maxFailuresPerAccount: number
  /** Failures from one client address, whatever the account. */
  maxFailuresPerAddress: number
  windowS: number
}

/**
 * Failed sign-ins counted three ways: the account at this address (the tight limit), the address
 * across accounts, and the account across addresses (a ceiling far above the first). Someone
 * guessing from one address is stopped after a few tries without locking the owner, who signs in
 * from another address, out of their account.
 */
export class LoginThrottle {
  readonly pair: SlidingWindowLimiter
  readonly account: SlidingWindowLimiter
  readonly address: SlidingWindowLimiter
  constructor (limits: LoginLimits) {
    const ms = limits.windowS * 1000
    this.pair = new SlidingWindowLimiter(limits.maxFailuresPerAccountAddress, ms)
    this.account = new SlidingWindowLimiter(limits.maxFailuresPerAccount, ms)
    this.address = new SlidingWindowLimiter(limits.maxFailuresPerAddress, ms)
  }

  private static pairKey (email: string, ip: string) { return `${email}\n${ip}` }

  /** Whether a sign-in to this account from this address may be tried now. */
  check (email: string, ip: string, now = Date.now()): { limited: boolean, retryAfterS: number } {
    const checks = [this.pair.check(LoginThrottle.pairKey(email, ip), now), this.account.check(email, now), this.address.check(ip, now)]
    const limited = checks.filter(c => c.limited)
    return limited.length ? { limited: true, retryAfterS: Math.max(...limited.map(c => c.retryAfterS)) } : { limited: false, retryAfterS: 0 }
  }

  failed (email: string, ip: string, now = Date.now()): void {
    this.pair.hit(LoginThrottle.pairKey(email, ip), now)
    this.account.hit(email, now)
    this.address.hit(ip, now)
  }

  /** A right password clears this account's count at this address; the wider counts keep theirs. */
  succeeded (email: string, ip: string): void {
    this.pair.reset(LoginThrottle.pairKey(email, ip))
  }
}

let loginThrottle: LoginThrottle | undefined
let resetLimiters: { account: SlidingWindowLimiter, address: SlidingWindowLimiter } | undefined

function limits (): LoginLimits {
  const c = useRuntimeConfig().login as Partial<LoginLimits> | undefined
  const n = (v: unknown, fallback: number) => (Number(v) > 0 ? Number(v) : fallback)
  return {
    maxFailuresPerAccountAddress: n(c?.maxFailuresPerAccountAddress, 5),
    maxFailuresPerAccount: n(c?.maxFailuresPerAccount, 100),
    maxFailuresPerAddress: n(c?.maxFailuresPerAddress, 30),
    windowS: n(c?.windowS, 900),
  }
}

function useLoginThrottle (): LoginThrottle {
  loginThrottle ??= new LoginThrottle(limits())
  return loginThrottle
}

/** The client's address (the socket's; forwarded headers are not trusted). */
export function clientAddress (event: H3Event): string {
  return getRequestIP(event) ?? 'unknown'
}

/** Throws 429 with Retry-After when this account at this address, the address or the account has failed too often. */
export function assertLoginAllowed (event: H3Event, email: string): void {
  const c = useLoginThrottle().check(email, clientAddress(event))
  if (c.limited) {
    setResponseHeader(event, 'Retry-After', c.retryAfterS)
    throw apiError(429, 'rate_limited', 'Too many sign-in attempts', { retryAfterS: c.retryAfterS })
  }
}

/** Records a failed sign-in. */
export function recordLoginFailure (event: H3Event, email: string): void {
  useLoginThrottle().failed(email, clientAddress(event))
}

/** A successful sign-in clears this account's failures at this address. */
export function recordLoginSuccess (event: H3Event, email: string): void {
  useLoginThrottle().succeeded(email, clientAddress(event))
}

/** Password-reset requests allowed now for this address and e-mail (3 per hour per account, 20 per address). */
export function allowPasswordResetRequest (event: H3Event, email: string): boolean {
  resetLimiters ??= {
    account: new SlidingWindowLimiter(3, 3600_000),
    address: new SlidingWindowLimiter(20, 3600_000),
  }
  const ip = clientAddress(event)
  if (resetLimiters.account.check(email).limited || resetLimiters.address.check(ip).limited) return false
  resetLimiters.account.hit(email)
  resetLimiters.address.hit(ip)
  return true
}

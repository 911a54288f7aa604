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

interface LoginLimits { maxFailuresPerAccount: number, maxFailuresPerAddress: number, windowS: number }

let loginLimiters: { account: SlidingWindowLimiter, address: SlidingWindowLimiter } | undefined
let resetLimiters: { account: SlidingWindowLimiter, address: SlidingWindowLimiter } | undefined

function limits (): LoginLimits {
  const c = useRuntimeConfig().login as Partial<LoginLimits> | undefined
  return {
    maxFailuresPerAccount: Number(c?.maxFailuresPerAccount ?? 5),
    maxFailuresPerAddress: Number(c?.maxFailuresPerAddress ?? 30),
    windowS: Number(c?.windowS ?? 900),
  }
}

function useLoginLimiters () {
  if (!loginLimiters) {
    const l = limits()
    loginLimiters = {
      account: new SlidingWindowLimiter(l.maxFailuresPerAccount, l.windowS * 1000),
      address: new SlidingWindowLimiter(l.maxFailuresPerAddress, l.windowS * 1000),
    }
  }
  return loginLimiters
}

/** The client's address (the socket's; forwarded headers are not trusted). */
export function clientAddress (event: H3Event): string {
  return getRequestIP(event) ?? 'unknown'
}

/** Throws 429 with Retry-After when this address or this account has failed too often. */
export function assertLoginAllowed (event: H3Event, email: string): void {
  const { account, address } = useLoginLimiters()
  const a = account.check(email)
  const b = address.check(clientAddress(event))
  if (a.limited || b.limited) {
    const retryAfterS = Math.max(a.retryAfterS, b.retryAfterS)
    setResponseHeader(event, 'Retry-After', retryAfterS)
    throw apiError(429, 'rate_limited', 'Too many sign-in attempts', { retryAfterS })
  }
}

/** Records a failed sign-in against the address and the account. */
export function recordLoginFailure (event: H3Event, email: string): void {
  const { account, address } = useLoginLimiters()
  account.hit(email)
  address.hit(clientAddress(event))
}

/** A successful sign-in clears the account's failures (the address keeps its count). */
export function recordLoginSuccess (email: string): void {
  useLoginLimiters().account.reset(email)
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

import { describe, expect, it } from 'vitest'
import { z } from 'zod'
import { hashToken, newToken, normaliseEmail } from '../../../server/utils/accounts'
import { canReviewSection, hasRole, type Membership } from '../../../server/utils/auth'
import { partForSection } from '../../../server/utils/home'
import { mailIsFor, passwordResetMail } from '../../../server/utils/mail'
import { formatIssues } from '../../../server/utils/validate'

const m = (role: Membership['role'], sectionId: number | null = null): Membership => ({ ensembleId: 1, userId: 1, role, sectionId, viaSiteAdmin: false })

describe('roles', () => {
  it.each([
    ['player', ['player'], true], ['player', ['section_leader'], false], ['player', ['director'], false],
    ['section_leader', ['player'], true], ['section_leader', ['section_leader'], true], ['section_leader', ['director'], false],
    ['director', ['player'], true], ['director', ['section_leader'], true], ['director', ['director'], true],
    ['player', ['director', 'player'], true],
  ] as const)('%s has %j: %s', (role, roles, ok) => {
    expect(hasRole(m(role), ...roles)).toBe(ok)
  })

  it('lets a section leader review their own section only, a director every one', () => {
    expect(canReviewSection(m('section_leader', 3), 3)).toBe(true)
    expect(canReviewSection(m('section_leader', 3), 4)).toBe(false)
    expect(canReviewSection(m('section_leader', null), null)).toBe(false)
    expect(canReviewSection(m('director'), 4)).toBe(true)
    expect(canReviewSection(m('player', 3), 3)).toBe(false)
    expect(canReviewSection(null, 3)).toBe(false)
  })
})

describe('tokens and addresses', () => {
  it('stores tokens as SHA-256 hex', () => {
    // FIPS 180-2, appendix B.1: SHA-256("abc").
    expect(hashToken('abc')).toBe('ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad')
  })
  it('makes 256-bit URL-safe tokens that differ', () => {
    const a = newToken()
    expect(a).toMatch(/^[A-Za-z0-9_-]{43}$/)
    expect(newToken()).not.toBe(a)
  })
  it('normalises addresses', () => {
    expect(normaliseEmail('  Ann.Example@Example.ORG ')).toBe('ann.example@example.org')
  })
  it.each([
    [['ann@example.org'], 'ann@example.org', true],
    [['ann@example.org', 'bob@example.org'], ' BOB@example.org', true],
    [['joann@example.org'], 'ann@example.org', false],
    [[], 'ann@example.org', false],
  ])('mail to %j is for %s: %s', (recipients, email, ok) => {
    expect(mailIsFor({ recipients }, email)).toBe(ok)
  })
  it('escapes the name in the reset mail', () => {
    const mail = passwordResetMail('a@example.org', '<b>Ann</b>', 'http://localhost:3000/reset-password?token=x&y')
    expect(mail.html).toContain('&lt;b&gt;Ann&lt;/b&gt;')
    expect(mail.html).toContain('token=x&amp;y')
    expect(mail.text).toContain('http://localhost:3000/reset-password?token=x&y')
  })
})

describe('partForSection', () => {
  it.each([
    [['Soprano', 'Alto'], 'Alto', 'Soprano', 'Alto'],
    [['Soprano', 'Alto'], null, 'alto', 'Alto'],
    [['Cornet'], null, 'Trombone', 'Cornet'],
    [['Soprano', 'Alto'], null, 'Tenor', null],
    [['Soprano', 'Alto'], null, null, null],
  ] as const)('parts %j, assignment %j, section %j → %j', (parts, assigned, section, want) => {
    expect(partForSection([...parts], assigned, section)).toBe(want)
  })
})

describe('formatIssues', () => {
  it('gives path, message and code per issue', () => {
    const r = z.object({ email: z.string().email(), n: z.number() }).safeParse({ email: 'x', n: 'y' })
    expect(r.success).toBe(false)
    const issues = formatIssues(r.error!)
    expect(issues.map(i => i.path)).toEqual([['email'], ['n']])
    for (const i of issues) expect(typeof i.message).toBe('string')
  })
})

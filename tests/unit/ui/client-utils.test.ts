import { describe, expect, it } from 'vitest'
import { routePatternToRegExp, safeRedirect, wayBack } from '../../../utils/routes'
import { apiProblem, isRetryable, tooManyAttemptsMessage } from '../../../utils/api-error'
import { formatAbsolute, formatRelative } from '../../../utils/time'
import { linkifyParts } from '../../../utils/linkify'
import { reportSystemOptions } from '../../../utils/drill-labels'

describe('safeRedirect (no open redirect after sign-in)', () => {
  it.each([
    ['/ensembles', '/ensembles'],
    ['/takes/3?tab=holds#h2', '/takes/3?tab=holds#h2'],
    [['/drills', '/x'], '/drills'],
    ['https://elsewhere.example.org/', '/'],
    ['//elsewhere.example.org', '/'],
    ['/\\elsewhere.example.org', '/'],
    ['javascript:alert(1)', '/'],
    ['/login', '/'],
    ['/login?redirect=/x', '/'],
    ['/reset-password?token=t', '/'],
    [undefined, '/'],
    [42, '/'],
  ])('%j → %s', (input, out) => {
    expect(safeRedirect(input)).toBe(out)
  })
})

describe('wayBack (where a page that cannot be shown sends someone)', () => {
  // The product's screens, as the router has them.
  const screens = ['/', '/takes', '/takes/:id', '/drills', '/drills/:id', '/drills/edit/:id', '/ensembles', '/ensembles/:id',
    '/ensembles/:id/members', '/ensembles/:id/assignments/:assignmentId', '/admin', '/admin/audit', '/dev/mailbox', '/invitations/:token']
  const patterns = screens.map(s => routePatternToRegExp(s.replace(/:(\w+)/g, ':$1()')))
  const exists = (p: string) => patterns.some(re => re.test(p))
  it.each([
    ['/takes/6', { to: '/takes', label: 'the takes' }],
    ['/ensembles/1/assignments/1', { to: '/ensembles/1', label: 'the ensemble' }],
    ['/ensembles/1/members?x=1', { to: '/ensembles/1', label: 'the ensemble' }],
    ['/ensembles/1', { to: '/ensembles', label: 'your ensembles' }],
    ['/drills/edit/5', { to: '/drills', label: 'the drills' }],
    ['/admin/audit', { to: '/admin', label: 'the admin area' }],
    ['/dev/mailbox', { to: '/', label: 'your home page' }],
    ['/invitations/abc', { to: '/', label: 'your home page' }],
    ['/takes', { to: '/', label: 'your home page' }],
    ['/', null],
  ])('%s → %j', (path, out) => {
    expect(wayBack(path, exists)).toEqual(out)
  })
})

describe('isRetryable (RFC 9110 §15: a 4xx answers the same again, except 408; RFC 6585 §4: 429 passes)', () => {
  it.each([
    [null, true], [500, true], [502, true], [503, true], [408, true], [429, true],
    [400, false], [403, false], [404, false], [409, false], [410, false], [422, false],
  ])('%s → %s', (status, out) => {
    expect(isRetryable(status)).toBe(out)
  })
})

describe('tooManyAttemptsMessage', () => {
  it.each([
    [600, 'Too many attempts, try again in 10 minutes'],
    [61, 'Too many attempts, try again in 2 minutes'],
    [60, 'Too many attempts, try again in 1 minute'],
    [5, 'Too many attempts, try again in 1 minute'],
    [null, 'Too many attempts, try again in a few minutes'],
  ])('%s s → %s', (s, text) => {
    expect(tooManyAttemptsMessage(s)).toBe(text)
  })
})

describe('apiProblem reads what the server sends', () => {
  it('takes the short message, code and field issues from an error body', () => {
    const err = {
      statusCode: 400,
      data: { statusCode: 400, statusMessage: 'Invalid input', message: 'Invalid input', data: { code: 'invalid_input', issues: [{ path: ['email'], message: 'Invalid email address' }, { path: ['email'], message: 'second' }] } },
    }
    const p = apiProblem(err)
    expect(p).toMatchObject({ status: 400, message: 'Invalid input', code: 'invalid_input', fields: { email: 'Invalid email address' } })
  })

  it('reads Retry-After from the header, else from data.retryAfterS', () => {
    const headers = new Headers({ 'retry-after': '120' })
    expect(apiProblem({ statusCode: 429, response: { status: 429, headers } }).retryAfterS).toBe(120)
    expect(apiProblem({ statusCode: 429, data: { data: { retryAfterS: 30 } } }).retryAfterS).toBe(30)
  })

  it('says the server could not be reached when there is no status', () => {
    expect(apiProblem(new TypeError('fetch failed')).message).toMatch(/could not be reached/)
    expect(apiProblem(null).status).toBeNull()
  })

  it('never shows ofetch’s "[POST] url" text as the message', () => {
    expect(apiProblem({ statusCode: 500, statusMessage: '[POST] "/api/x": 500' }, 'fallback').message).toBe('fallback')
  })
})

describe('formatRelative', () => {
  const now = Date.UTC(2025, 5, 15, 12, 0, 0)
  const H = 3_600_000
  const D = 24 * H
  it.each([
    [now + 10_000, 'just now'],
    [now - 5 * 60_000, '5 minutes ago'],
    [now + 3 * H, 'in 3 hours'],
    [now + D, 'tomorrow'],
    [now - D, 'yesterday'],
    [now + 3 * D, 'in 3 days'],
    [now - 13 * D, '13 days ago'],
    [now + 14 * D, 'in 2 weeks'],
    [now - 60 * D, '2 months ago'],
    [now + 400 * D, 'next year'],
  ])('%s → %s', (at, text) => {
    expect(formatRelative(at, now)).toBe(text)
  })
})

describe('formatAbsolute', () => {
  it('marks UTC before the browser zone is known', () => {
    expect(formatAbsolute(Date.UTC(2025, 5, 15, 18, 5), false)).toBe('Sun, 15 Jun 2025, 18:05 UTC')
  })
})

describe('linkifyParts', () => {
  it('splits out http(s) links and keeps the rest as text', () => {
    expect(linkifyParts('Open http://localhost:3000/reset-password?token=a.b_c to continue.')).toEqual([
      { text: 'Open ' },
      { text: 'http://localhost:3000/reset-password?token=a.b_c', href: 'http://localhost:3000/reset-password?token=a.b_c' },
      { text: ' to continue.' },
    ])
    expect(linkifyParts('no links')).toEqual([{ text: 'no links' }])
    expect(linkifyParts('javascript:alert(1)')).toEqual([{ text: 'javascript:alert(1)' }])
  })
})

describe('routePatternToRegExp (which links may be drawn)', () => {
  it.each([
    ['/', '/', true],
    ['/', '/x', false],
    ['/ensembles', '/ensembles', true],
    ['/ensembles', '/ensembles/3', false],
    ['/takes/:id()', '/takes/12', true],
    ['/takes/:id()', '/takes', false],
    ['/takes/:id()', '/takes/12/more', false],
    ['/dev/mailbox', '/dev/mailbox', true],
    ['/:slug(.*)*', '/anything/at/all', true],
    ['/a/:b?', '/a/', true],
  ])('%s matches %s: %s', (pattern, path, ok) => {
    expect(routePatternToRegExp(pattern).test(path)).toBe(ok)
  })
})

describe('reportSystemOptions: the system a take report was scored in, for scoring it again', () => {
  const drill = { name: 'just-tonic', tonic: 'Bb', seventh: 'harmonic', fraction: '1/4' } as const
  it('keeps the options a report carries', () => {
    const own = { name: 'meantone', seventh: 'harmonic', fraction: '1/3' } as const
    expect(reportSystemOptions(own, drill)).toBe(own)
  })
  it('takes the drill\'s options when the report names the same system or none', () => {
    expect(reportSystemOptions('just-tonic', drill)).toBe(drill)
    expect(reportSystemOptions(null, drill)).toBe(drill)
  })
  it('takes a named system with default options when the drill scored in another', () => {
    expect(reportSystemOptions('pythagorean', drill)).toEqual({ name: 'pythagorean', seventh: 'harmonic', fraction: '1/4' })
  })
  it('falls back to the drill, then to equal temperament, for a name it does not know', () => {
    expect(reportSystemOptions('made-up', drill)).toBe(drill)
    expect(reportSystemOptions('made-up', null)).toEqual({ name: 'equal', seventh: 'harmonic', fraction: '1/4' })
  })
})

import { beforeAll, describe, expect, it } from 'vitest'
import { mountSuspended, registerEndpoint } from '@nuxt/test-utils/runtime'
import AppErrorState from '~/components/app/AppErrorState.vue'

// A signed-in player (invented), so the page guard leaves the test routes alone.
registerEndpoint('/api/_auth/session', () => ({ user: { id: 4, email: 'ada@example.org', name: 'Ada Example', siteRole: null }, loggedInAt: Date.now() }))
beforeAll(async () => {
  await useUserSession().fetch()
})

// Which failures a retry can mend follows the HTTP semantics of RFC 9110 §15: a 4xx is the
// request's fault and is answered the same way again (408 Request Timeout excepted); 429 (RFC 6585
// §4) and 5xx are passing conditions on the server's side. No status at all means no answer.
const failure = (statusCode: number | null, statusMessage: string) => statusCode == null
  ? new TypeError('fetch failed')
  : { statusCode, data: { statusCode, statusMessage, message: statusMessage } }

describe('AppErrorState', () => {
  it.each([
    [403, 'Not allowed'],
    [404, 'Assignment not found'],
    [410, 'Gone'],
  ])('after %i offers the way back instead of a retry that cannot work', async (status, text) => {
    const w = await mountSuspended(AppErrorState, { props: { error: failure(status, text), what: 'this assignment' }, route: '/ensembles/1/assignments/1' })
    expect(w.text()).toContain(`${text} (${status})`)
    expect(w.find('button').exists()).toBe(false)
    const back = w.get('a')
    expect(back.text()).toBe('Back to the ensemble')
    expect(back.attributes('href')).toBe('/ensembles/1')
  })

  it.each([
    [500, 'Something broke'],
    [503, 'Database unavailable'],
    [429, 'Too many requests'],
    [408, 'Request timeout'],
    [null, ''],
  ])('after %s keeps the retry button and emits retry', async (status, text) => {
    const w = await mountSuspended(AppErrorState, { props: { error: failure(status, text) }, route: '/takes/6' })
    expect(w.find('a').exists()).toBe(false)
    await w.get('button').trigger('click')
    expect(w.get('button').text()).toBe('Try again')
    expect(w.emitted('retry')).toHaveLength(1)
  })

  it('takes the page\'s own way back, or none when the page shows one itself', async () => {
    const own = await mountSuspended(AppErrorState, { props: { error: failure(404, 'Ensemble not found'), back: { to: '/ensembles', label: 'your ensembles' } }, route: '/ensembles/7/members' })
    expect(own.get('a').attributes('href')).toBe('/ensembles')
    expect(own.get('a').text()).toBe('Back to your ensembles')
    const none = await mountSuspended(AppErrorState, { props: { error: failure(403, 'Not allowed'), back: null }, route: '/invitations/abc' })
    expect(none.find('a').exists()).toBe(false)
    expect(none.find('button').exists()).toBe(false)
  })

  it('asks to sign in again after 401, with neither retry nor way back', async () => {
    const w = await mountSuspended(AppErrorState, { props: { error: failure(401, 'Unauthorized') }, route: '/takes/6' })
    expect(w.text()).toContain('Your session has ended.')
    expect(w.find('button').exists()).toBe(false)
    expect(w.findAll('a').map(a => a.text())).toEqual(['Sign in again'])
  })
})

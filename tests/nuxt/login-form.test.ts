import { describe, expect, it } from 'vitest'
import { flushPromises } from '@vue/test-utils'
import { mountSuspended, registerEndpoint } from '@nuxt/test-utils/runtime'
import { createError, defineEventHandler, readBody, setResponseHeader } from 'h3'
import LoginPage from '~/pages/login.vue'

// What the fake login route received, per test.
const calls: unknown[] = []
let answer: 'wrong' | 'limited' = 'wrong'

registerEndpoint('/api/auth/login', {
  method: 'POST',
  handler: defineEventHandler(async (event) => {
    calls.push(await readBody(event))
    if (answer === 'limited') {
      setResponseHeader(event, 'Retry-After', 290)
      throw createError({ statusCode: 429, statusMessage: 'Too many attempts' })
    }
    throw createError({ statusCode: 401, statusMessage: 'Wrong e-mail or password' })
  }),
})

async function mountLogin() {
  const w = await mountSuspended(LoginPage)
  const email = w.get('input[type="email"]')
  const password = w.get('input[type="password"]')
  return { w, email, password }
}

describe('sign-in form', () => {
  it('labels every field', async () => {
    const { w, email, password } = await mountLogin()
    for (const input of [email, password]) {
      const id = input.attributes('id')
      expect(id).toBeTruthy()
      expect(w.find(`label[for="${id}"]`).exists()).toBe(true)
    }
    expect(w.get(`label[for="${email.attributes('id')}"]`).text()).toBe('E-mail')
  })

  it('shows field errors and sends nothing when both fields are empty', async () => {
    calls.length = 0
    const { w, email, password } = await mountLogin()
    await w.get('form').trigger('submit')
    await flushPromises()
    expect(w.text()).toContain('Enter your e-mail address')
    expect(w.text()).toContain('Enter your password')
    expect(email.attributes('aria-invalid')).toBe('true')
    expect(password.attributes('aria-invalid')).toBe('true')
    // The error is tied to its field for screen readers.
    const described = email.attributes('aria-describedby')!
    expect(w.get(`[id="${described}"]`).text()).toBe('Enter your e-mail address')
    expect(calls).toHaveLength(0)
  })

  it('rejects an address the shared schema rejects', async () => {
    calls.length = 0
    const { w, email, password } = await mountLogin()
    await email.setValue('not-an-address')
    await password.setValue('secret')
    await w.get('form').trigger('submit')
    await flushPromises()
    expect(w.text()).toContain('Enter an e-mail address such as name@example.org')
    expect(password.attributes('aria-invalid')).toBeUndefined()
    expect(calls).toHaveLength(0)
  })

  it('sends the trimmed, lower-cased address and shows the server’s 401 text in an alert', async () => {
    calls.length = 0
    answer = 'wrong'
    const { w, email, password } = await mountLogin()
    await email.setValue('  Someone@Example.org ')
    await password.setValue('not the password')
    await w.get('form').trigger('submit')
    await flushPromises()
    await new Promise(r => setTimeout(r, 50))
    await flushPromises()
    expect(calls).toEqual([{ email: 'someone@example.org', password: 'not the password' }])
    const alert = w.get('[role="alert"]')
    expect(alert.text()).toBe('Wrong e-mail or password')
    // The button is usable again after the answer.
    expect(w.get('button[type="submit"]').attributes('disabled')).toBeUndefined()
  })

  it('turns 429 with Retry-After into a wait in whole minutes', async () => {
    answer = 'limited'
    const { w, email, password } = await mountLogin()
    await email.setValue('someone@example.org')
    await password.setValue('x')
    await w.get('form').trigger('submit')
    await flushPromises()
    await new Promise(r => setTimeout(r, 50))
    await flushPromises()
    // 290 s rounds up to 5 minutes.
    expect(w.get('[role="alert"]').text()).toBe('Too many attempts, try again in 5 minutes')
  })
})

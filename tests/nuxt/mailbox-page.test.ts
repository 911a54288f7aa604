import { describe, expect, it } from 'vitest'
import { mountSuspended, registerEndpoint } from '@nuxt/test-utils/runtime'
import { createError } from 'h3'
import MailboxPage from '~/pages/dev/mailbox.vue'

let mode: 'off' | 'empty' = 'off'
registerEndpoint('/api/dev/mail', () => {
  if (mode === 'off') throw createError({ statusCode: 404, statusMessage: 'No development mailbox' })
  return []
})

describe('development mailbox page', () => {
  it('explains a 404: the mail catcher is not running', async () => {
    mode = 'off'
    clearNuxtData('dev-mail')
    const w = await mountSuspended(MailboxPage)
    expect(w.text()).toContain('The mailbox is only available with the embedded mail catcher')
  })

  it('has an empty state that says how to get a message', async () => {
    mode = 'empty'
    clearNuxtData('dev-mail')
    const w = await mountSuspended(MailboxPage)
    expect(w.text()).toContain('No messages yet')
    expect(w.text()).toContain('Forgot password?')
  })
})

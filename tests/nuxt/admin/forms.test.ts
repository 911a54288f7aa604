import { describe, expect, it, vi } from 'vitest'
import { flushPromises } from '@vue/test-utils'
import { mountSuspended, registerEndpoint } from '@nuxt/test-utils/runtime'
import { createError, defineEventHandler, readBody } from 'h3'
import AccountProfileForm from '~/components/account/AccountProfileForm.vue'
import AccountPasswordForm from '~/components/account/AccountPasswordForm.vue'
import AdminEnsembleForm from '~/components/admin/AdminEnsembleForm.vue'

const sent: { path: string, body: unknown }[] = []

registerEndpoint('/api/account', {
  method: 'PATCH',
  handler: defineEventHandler(async (event) => {
    const body = await readBody(event)
    sent.push({ path: '/api/account', body })
    return { id: 1, email: 'someone@example.org', name: body.name, instrument: body.instrument, pitchView: body.pitchView, siteAdmin: false }
  }),
})
registerEndpoint('/api/account/password', {
  method: 'POST',
  handler: defineEventHandler(async (event) => {
    sent.push({ path: '/api/account/password', body: await readBody(event) })
    throw createError({ statusCode: 400, statusMessage: 'Your current password is not right', data: { code: 'wrong_password', issues: [{ path: ['currentPassword'], message: 'This is not your current password', code: 'custom' }] } })
  }),
})
registerEndpoint('/api/admin/ensembles', {
  method: 'POST',
  handler: defineEventHandler(async (event) => {
    sent.push({ path: '/api/admin/ensembles', body: await readBody(event) })
    throw createError({ statusCode: 409, statusMessage: 'An ensemble with this name exists', data: { code: 'name_taken', issues: [{ path: ['name'], message: 'An ensemble with this name exists', code: 'custom' }] } })
  }),
})

const profile = { id: 1, email: 'someone@example.org', name: 'Some One', instrument: null, pitchView: 'concert' as const, siteAdmin: false }

describe('profile form', () => {
  it('offers every instrument of the tuning engine and sends a valid profile', async () => {
    sent.length = 0
    const w = await mountSuspended(AccountProfileForm, { props: { profile } })
    const options = w.findAll('select option').map(o => o.attributes('value'))
    expect(options).toContain('horn-f')
    expect(options).toContain('voice-tenor')
    await w.get('select').setValue('horn-f')
    await w.get('input[value="written"]').setValue(true)
    // A horn in F reads a perfect fifth (7 semitones) above concert pitch (common practice).
    expect(w.text()).toContain('Horn in F reads 7 semitones above concert pitch.')
    await w.get('form').trigger('submit')
    await flushPromises()
    await vi.waitFor(() => expect(w.text()).toContain('Profile saved.'))
    expect(sent).toEqual([{ path: '/api/account', body: { name: 'Some One', instrument: 'horn-f', pitchView: 'written' } }])
  })

  it('keeps an empty name from the server and says why', async () => {
    sent.length = 0
    const w = await mountSuspended(AccountProfileForm, { props: { profile } })
    await w.get('input[name="name"]').setValue('   ')
    await w.get('form').trigger('submit')
    await flushPromises()
    expect(sent).toHaveLength(0)
    expect(w.text()).toContain('Enter your name')
    expect(w.get('input[name="name"]').attributes('aria-invalid')).toBe('true')
  })
})

describe('password form', () => {
  it('checks the repeat locally and shows the server\'s field error', async () => {
    sent.length = 0
    const w = await mountSuspended(AccountPasswordForm)
    await w.get('input[name="current-password"]').setValue('old-password')
    await w.get('input[name="new-password"]').setValue('new-password-1')
    await w.get('input[name="repeat-password"]').setValue('new-password-2')
    await w.get('form').trigger('submit')
    await flushPromises()
    expect(sent).toHaveLength(0)
    expect(w.text()).toContain('The two new passwords differ')
    await w.get('input[name="repeat-password"]').setValue('new-password-1')
    await w.get('form').trigger('submit')
    await flushPromises()
    await vi.waitFor(() => expect(w.text()).toContain('This is not your current password'))
    expect(sent).toHaveLength(1)
    expect(w.get('input[name="current-password"]').attributes('aria-invalid')).toBe('true')
  })
})

describe('new ensemble form', () => {
  it('names each missing field, then shows a name conflict at the name', async () => {
    sent.length = 0
    const w = await mountSuspended(AdminEnsembleForm)
    await w.get('form').trigger('submit')
    await flushPromises()
    expect(sent).toHaveLength(0)
    expect(w.text()).toContain('Choose what kind of ensemble it is')
    await w.get('input[name="name"]').setValue('Harbour Voices')
    await w.get('select[name="kind"]').setValue('choir')
    await w.get('input[name="directorEmail"]').setValue('lead@example.org')
    await w.get('form').trigger('submit')
    await flushPromises()
    await vi.waitFor(() => expect(w.text()).toContain('An ensemble with this name exists'))
    expect(sent).toEqual([{ path: '/api/admin/ensembles', body: { name: 'Harbour Voices', kind: 'choir', directorEmail: 'lead@example.org' } }])
    expect(w.text()).not.toMatch(/undefined|\[object Object\]/)
  })
})

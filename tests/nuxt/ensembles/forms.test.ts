import { describe, expect, it, vi } from 'vitest'
import { mountSuspended, registerEndpoint } from '@nuxt/test-utils/runtime'
import { createError, readBody } from 'h3'
import { checkRows, parseInvitationCsv } from '#shared/people/invitation-csv'
import InvitationBulk from '~/components/ensembles/InvitationBulk.vue'
import MemberEditor from '~/components/ensembles/MemberEditor.vue'

// The preview endpoint runs the real row checks against an invented ensemble, so the component
// is shown what the server would answer.
const context = { sections: [{ id: 1, name: 'Alto' }], memberEmails: new Set(['in@example.org']), openInvitationEmails: new Set<string>() }
const sentBodies: unknown[] = []
registerEndpoint('/api/ensembles/9/invitations/bulk-preview', {
  method: 'POST',
  handler: async (event) => {
    const { csv } = await readBody<{ csv: string }>(event)
    const parsed = parseInvitationCsv(csv)
    if (!parsed.ok) throw createError({ statusCode: 400, statusMessage: parsed.error.message, data: { code: parsed.error.code } })
    const rows = checkRows(parsed.rows, context)
    return { rows, goodCount: rows.filter(r => r.ok).length, badCount: rows.filter(r => !r.ok).length, delimiter: parsed.delimiter }
  },
})
registerEndpoint('/api/ensembles/9/invitations/bulk', {
  method: 'POST',
  handler: async (event) => {
    sentBodies.push(await readBody(event))
    return { sent: 1, skipped: 2, invitations: [] }
  },
})

describe('the bulk invitation list', () => {
  it('marks each bad row with its reason and sends only after the check, with the good rows confirmed', async () => {
    const w = await mountSuspended(InvitationBulk, { props: { ensembleId: 9 } })
    await w.find('textarea').setValue('name;email;section\nAna;ana@example.org;Alto\nBad;bad-address;Alto\nIn;in@example.org;Tenor\n')
    await w.findAll('button').find(b => b.text() === 'Check the list')!.trigger('click')
    await vi.waitFor(() => expect(w.text()).toContain('rows can be sent'), { timeout: 5000 })
    const text = w.text()
    expect(text).toContain('1 of 3 rows can be sent; 2 have problems and will be left out.')
    expect(text).toContain('E-mail: "bad-address" is not an e-mail address')
    expect(text).toContain('E-mail: in@example.org is already a member')
    expect(text).toContain('Section: there is no section "Tenor" (sections: Alto)')
    expect(text).not.toMatch(/undefined|\[object/)

    // Editing the list after the check blocks sending until it is checked again.
    await w.find('textarea').setValue('name,email\nSomeone,else@example.org\n')
    const send = () => w.findAll('button').find(b => b.text().startsWith('Send'))!
    expect(send().attributes('disabled')).toBeDefined()
    expect(w.text()).toContain('The list changed since it was checked')
    await w.findAll('button').find(b => b.text() === 'Check the list')!.trigger('click')
    await vi.waitFor(() => expect(w.text()).toContain('1 of 1 row can be sent'), { timeout: 5000 })
    await send().trigger('click')
    await vi.waitFor(() => expect(w.text()).toContain('Sent 1 invitation'), { timeout: 5000 })
    expect(sentBodies).toEqual([{ csv: 'name,email\nSomeone,else@example.org\n', sendGood: true }])
    expect(w.text()).toContain('Sent 1 invitation; 2 rows were left out.')
  })

  it('says why a list cannot be read at all', async () => {
    const w = await mountSuspended(InvitationBulk, { props: { ensembleId: 9 } })
    await w.find('textarea').setValue('name,section\nAna,Alto\n')
    await w.findAll('button').find(b => b.text() === 'Check the list')!.trigger('click')
    await vi.waitFor(() => expect(w.find('[role="alert"]').exists()).toBe(true), { timeout: 5000 })
    expect(w.find('[role="alert"]').text()).toContain('The header has no email column')
  })
})

const patches: unknown[] = []
registerEndpoint('/api/ensembles/9/members/3', {
  method: 'PATCH',
  handler: async (event) => {
    const body = await readBody<Record<string, unknown>>(event)
    patches.push(body)
    if (body.role === 'player') throw createError({ statusCode: 409, statusMessage: 'The ensemble needs at least one director: make someone else director first', data: { code: 'last_director' } })
    return { userId: 3, name: 'Dee', role: 'director', sectionId: null, section: null, instrument: 'voice-alto', reads: 'written', readsFromAccount: false }
  },
})

describe('the member editor', () => {
  const member = { userId: 3, name: 'Dee', role: 'director' as const, sectionId: null, section: null, instrument: null, reads: 'written' as const, readsFromAccount: false, email: 'dee@example.org' }

  it('sends only what changed and shows the server\'s reason when it refuses', async () => {
    const w = await mountSuspended(MemberEditor, { props: { member, sections: [], ensembleId: 9 }, attachTo: document.body })
    await w.find('select').setValue('player')
    const saveButton = w.findAll('button').find(b => b.text() === 'Save')!
    ;(saveButton.element as HTMLElement).focus()
    await w.find('form').trigger('submit')
    await vi.waitFor(() => expect(w.find('[role="alert"]').exists()).toBe(true), { timeout: 5000 })
    expect(patches.at(-1)).toEqual({ role: 'player' })
    expect(w.find('[role="alert"]').text()).toBe('The ensemble needs at least one director: make someone else director first')
    expect(w.emitted('saved')).toBeUndefined()
    // Focus is on the reason, not dropped to the page, so a keyboard or screen-reader user hears it.
    await vi.waitFor(() => expect(document.activeElement).toBe(w.find('[role="alert"]').element), { timeout: 5000 })

    await w.find('select').setValue('director')
    await w.findAll('select')[2]!.setValue('voice-alto')
    await w.find('form').trigger('submit')
    await vi.waitFor(() => expect(w.emitted('saved')).toHaveLength(1), { timeout: 5000 })
    expect(patches.at(-1)).toEqual({ instrument: 'voice-alto' })
    w.unmount()
  })

  it('offers the account\'s own choice and sends it as an unset reading', async () => {
    const w = await mountSuspended(MemberEditor, { props: { member, sections: [], ensembleId: 9 } })
    const account = w.find('input[type="radio"][value="account"]')
    expect((account.element as HTMLInputElement).checked).toBe(false)
    expect((w.find('input[type="radio"][value="written"]').element as HTMLInputElement).checked).toBe(true)
    await account.setValue(true)
    await w.find('form').trigger('submit')
    await vi.waitFor(() => expect(w.emitted('saved')).toHaveLength(1), { timeout: 5000 })
    expect(patches.at(-1)).toEqual({ reads: null })

    const following = await mountSuspended(MemberEditor, { props: { member: { ...member, reads: 'concert' as const, readsFromAccount: true }, sections: [], ensembleId: 9 } })
    expect((following.find('input[type="radio"][value="account"]').element as HTMLInputElement).checked).toBe(true)
    expect(following.text()).toContain('now concert pitch')
  })
})

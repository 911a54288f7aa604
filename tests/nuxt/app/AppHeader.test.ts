import { beforeAll, describe, expect, it } from 'vitest'
import { mountSuspended, registerEndpoint } from '@nuxt/test-utils/runtime'
import AppHeader from '~/components/app/AppHeader.vue'

// Invented demo data. The keyboard behaviour is the disclosure pattern of the WAI-ARIA Authoring
// Practices: Escape closes the disclosed content and focus returns to the button that opened it.
registerEndpoint('/api/_auth/session', () => ({ user: { id: 4, email: 'ada@example.org', name: 'Ada Example', siteRole: null }, loggedInAt: Date.now() }))
registerEndpoint('/api/ensembles', () => [
  { id: 1, name: 'Harbour Singers', kind: 'choir', role: 'player', sectionCount: 4, memberCount: 24, archived: false },
])
beforeAll(async () => {
  await useUserSession().fetch()
})

describe('AppHeader compact menu', () => {
  it('opens with the Menu button and closes on Escape, giving focus back to the button', async () => {
    const w = await mountSuspended(AppHeader, { attachTo: document.body })
    const button = w.findAll('button').find(b => b.text() === 'Menu')!
    const menu = w.find(`#${button.attributes('aria-controls')}`)
    expect(button.attributes('aria-expanded')).toBe('false')
    expect(menu.isVisible()).toBe(false)

    await button.trigger('click')
    expect(button.attributes('aria-expanded')).toBe('true')
    expect(menu.isVisible()).toBe(true)

    // Escape from a link inside the menu, where keyboard focus usually is.
    const link = menu.find('a')
    ;(link.element as HTMLElement).focus()
    await link.trigger('keydown', { key: 'Escape' })
    expect(button.attributes('aria-expanded')).toBe('false')
    expect(menu.isVisible()).toBe(false)
    expect(document.activeElement).toBe(button.element)

    // And from the button itself.
    await button.trigger('click')
    await button.trigger('keydown', { key: 'Escape' })
    expect(button.attributes('aria-expanded')).toBe('false')
    expect(document.activeElement).toBe(button.element)
    w.unmount()
  })

  it('leaves focus alone on Escape when the menu is closed', async () => {
    const w = await mountSuspended(AppHeader, { attachTo: document.body })
    const account = w.find('a[href="/account"]')
    ;(account.element as HTMLElement).focus()
    await account.trigger('keydown', { key: 'Escape' })
    expect(document.activeElement).toBe(account.element)
    w.unmount()
  })
})

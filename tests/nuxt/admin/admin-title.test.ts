import { beforeAll, describe, expect, it, vi } from 'vitest'
import { mountSuspended, registerEndpoint } from '@nuxt/test-utils/runtime'
import { appHead } from '#build/nuxt.config.mjs'
import AdminFrame from '~/pages/admin.vue'

// Invented demo data: a signed-in player (no site role) opens the admin area.
registerEndpoint('/api/_auth/session', () => ({ user: { id: 4, email: 'ada@example.org', name: 'Ada Example', siteRole: null }, loggedInAt: Date.now() }))
beforeAll(async () => {
  await useUserSession().fetch()
  // The served page starts with nuxt.config's default head title ("Driftline"); the test app
  // does not, so it is added here the way the page would carry it.
  useNuxtApp().runWithContext(() => useHead({ title: appHead.title }))
})

describe('pages/admin title', () => {
  it('names the product once for a player, who sees only the notice', async () => {
    expect(appHead.title).toBe('Driftline')
    const w = await mountSuspended(AdminFrame)
    expect(w.text()).toContain('For site admins only')
    await vi.waitFor(() => expect(document.title).toBe('Admin · Driftline'), { timeout: 5000 })
    w.unmount()
  })
})

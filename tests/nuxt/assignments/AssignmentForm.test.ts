// The assignment form: says what is missing before anything is sent, focuses the first field in
// error, sends the route's own body, and shows the server's refusal beside the field it names.
// Sections, players and the drill are invented.
import { describe, expect, it } from 'vitest'
import { mountSuspended, registerEndpoint } from '@nuxt/test-utils/runtime'
import { createError, readBody } from 'h3'
import AssignmentForm from '~/components/assignments/AssignmentForm.vue'
import type { DrillListItem } from '#shared/types/drill-view'

const drill = { id: 4, title: 'Evening cadence', key: 'F major', tempo: 60, a4: 440, system: { name: 'equal' }, tolerance: 10, parts: [{ name: 'Soprano', instrument: null }, { name: 'Alto', instrument: null }], chords: 4, version: 1, takes: 0, createdAt: '2030-01-01T00:00:00Z', updatedAt: '2030-01-01T00:00:00Z', archivedAt: null } as DrillListItem
const props = {
  ensembleId: 9,
  sections: [{ id: 21, name: 'Alto', position: 0, memberCount: 3, instrument: null }, { id: 22, name: 'Bells', position: 1, memberCount: 2, instrument: null }],
  members: [{ userId: 31, name: 'Noor Vale', role: 'player' as const, sectionId: 21, section: 'Alto', instrument: null, reads: 'concert' as const, readsFromAccount: false }],
  drills: [drill],
  presetDrillId: 4,
}
let sent: any = null
let refuse = false
registerEndpoint('/api/ensembles/9/assignments', {
  method: 'POST',
  handler: async (event) => {
    sent = await readBody(event)
    if (refuse) throw createError({ statusCode: 400, statusMessage: 'Choose the part this section or player records', data: { code: 'part_required', field: 'sectionParts', sectionId: 22, name: 'Bells' } })
    return { id: 77, assignees: 3 }
  },
})

describe('AssignmentForm', () => {
  it('sends the takes allowed typed in the number field as a whole number', async () => {
    refuse = false
    sent = null
    const w = await mountSuspended(AssignmentForm, { props })
    await w.find('[data-testid="assign-section-Alto"]').setValue(true)
    // A number input's value reaches the form as text (a browser's number field, typed "3").
    await w.find('input[name="attempts"]').setValue('3')
    await w.find('form').trigger('submit')
    await new Promise(r => setTimeout(r, 50))
    expect(sent).toMatchObject({ sectionIds: [21], attempts: 3 })
    w.unmount()
  })

  it('asks for a section or player first and sends nothing', async () => {
    sent = null
    const w = await mountSuspended(AssignmentForm, { props, attachTo: document.body })
    await w.find('form').trigger('submit')
    await new Promise(r => setTimeout(r, 0))
    expect(w.text()).toContain('Choose at least one section or player')
    expect(sent).toBeNull()
    w.unmount()
  })

  it('refuses a due date in the past and focuses it', async () => {
    sent = null
    const w = await mountSuspended(AssignmentForm, { props, attachTo: document.body })
    await w.find('[data-testid="assign-section-Alto"]').setValue(true)
    await w.find('[data-testid="assignment-due"]').setValue('2001-05-02T18:00')
    await w.find('form').trigger('submit')
    await new Promise(r => setTimeout(r, 0))
    expect(w.text()).toContain('The due date is in the past')
    expect(document.activeElement?.getAttribute('data-testid')).toBe('assignment-due')
    expect(sent).toBeNull()
    w.unmount()
  })

  it('sends the chosen sections with the due date in UTC, and shows a refusal by the field it names', async () => {
    refuse = false
    const w = await mountSuspended(AssignmentForm, { props })
    await w.find('[data-testid="assign-section-Alto"]').setValue(true)
    await w.find('[data-testid="assignment-due"]').setValue('2031-05-02T18:00')
    await w.find('form').trigger('submit')
    await new Promise(r => setTimeout(r, 50))
    expect(sent).toMatchObject({ drillId: 4, sectionIds: [21], userIds: [], attempts: null })
    expect(sent.dueAt).toBe(new Date('2031-05-02T18:00').toISOString()) // the browser's zone, sent as an instant
    expect(w.emitted('saved')?.[0]).toEqual([{ id: 77, assignees: 3, created: true }])

    refuse = true
    await w.find('[data-testid="assign-section-Bells"]').setValue(true)
    await w.find('form').trigger('submit')
    await new Promise(r => setTimeout(r, 50))
    expect(w.text()).toContain('Choose the part this section or player records: Bells')
    w.unmount()
  })
})

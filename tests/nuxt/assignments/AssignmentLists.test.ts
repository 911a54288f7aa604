import { describe, expect, it } from 'vitest'
import { mountSuspended } from '@nuxt/test-utils/runtime'
import MyAssignmentList from '~/components/assignments/MyAssignmentList.vue'
import AssignmentTable from '~/components/assignments/AssignmentTable.vue'
import type { AssignmentSummary, MyAssignment } from '#shared/types/assignment'

// Invented scenario data (demo ensemble, example.org people); the checks are on the wording and links.
const mine = (over: Partial<MyAssignment>): MyAssignment => ({
  id: 5, drillId: 9, drill: 'Chorale in B♭', part: 'Alto', dueAt: '2026-12-10T18:00:00Z', status: 'due', latestTakeId: null,
  ensembleId: 1, ensembleName: 'Harbour Chorale', title: null, instructions: '', attempts: null, attemptsUsed: 0, ...over,
})
const summary = (over: Partial<AssignmentSummary>): AssignmentSummary => ({
  id: 7, drillId: 9, drill: 'Chorale in B♭', title: 'Week 3', instructions: '', dueAt: null, attempts: null, archived: false,
  createdAt: '2026-12-01T09:00:00Z', targets: [], assignees: 12, submitted: 4, ...over,
})

describe('MyAssignmentList', () => {
  it('links each assignment to recording its part, and stops offering takes once the attempts are used', async () => {
    const w = await mountSuspended(MyAssignmentList, {
      props: { items: [mine({}), mine({ id: 6, status: 'submitted', latestTakeId: 44, attempts: 2, attemptsUsed: 2 })] },
    })
    const rows = w.findAll('li')
    expect(rows[0]!.attributes('data-status')).toBe('due')
    const record = rows[0]!.findAll('a').find(a => a.text().startsWith('Record or upload a take'))!
    expect(record.attributes('href')).toBe('/takes/new?drillId=9&assignmentId=5&part=Alto')
    expect(rows[1]!.text()).toContain('Submitted')
    expect(rows[1]!.text()).toContain('2 of 2 takes used')
    expect(rows[1]!.find('a[href="/takes/44"]').exists()).toBe(true)
    expect(rows[1]!.text()).not.toContain('Send another take')
  })
})

describe('AssignmentTable', () => {
  it('says who each assignment is for and how many have sent a take', async () => {
    const w = await mountSuspended(AssignmentTable, {
      props: {
        ensembleId: 1, ensembleName: 'Harbour Chorale', isDirector: false,
        items: [
          summary({ targets: [{ sectionId: null, sectionName: null, userId: null, userName: null, part: null }] }),
          summary({ id: 8, targets: [{ sectionId: 2, sectionName: 'Altos', userId: null, userName: null, part: 'Alto 2' }, { sectionId: null, sectionName: null, userId: 30, userName: 'Rowan Example', part: null }] }),
        ],
      },
    })
    const rows = w.findAll('tbody tr')
    expect(rows[0]!.text()).toContain('Whole ensemble')
    expect(rows[1]!.text()).toContain('Altos (Alto 2), Rowan Example')
    expect(rows[0]!.text()).toContain('4 of 12')
    expect(w.find('caption').text()).toContain('Harbour Chorale')
    // A section leader follows completion but does not edit or archive.
    expect(w.findAll('button')).toHaveLength(0)
  })

  it('lets a director edit, archive and restore', async () => {
    const a = summary({})
    const b = summary({ id: 8, archived: true })
    const w = await mountSuspended(AssignmentTable, { props: { ensembleId: 1, ensembleName: 'Harbour Chorale', isDirector: true, items: [a, b] } })
    const [edit, archive, restore] = w.findAll('button')
    expect(edit!.text()).toContain('Edit')
    await edit!.trigger('click')
    await archive!.trigger('click')
    expect(restore!.text()).toContain('Restore')
    await restore!.trigger('click')
    expect(w.emitted('edit')).toEqual([[a]])
    expect(w.emitted('archive')).toEqual([[a, true], [b, false]])
  })
})

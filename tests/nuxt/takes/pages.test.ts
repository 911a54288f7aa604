import { beforeAll, describe, expect, it, vi } from 'vitest'
import { flushPromises } from '@vue/test-utils'
import { mountSuspended, registerEndpoint } from '@nuxt/test-utils/runtime'
import { createError } from 'h3'
import { computeTargets } from '#shared/tuning'
// Imported up front: the pages are transformed while the file loads, not inside the test app's start-up.
import DrillsPage from '~/pages/drills/index.vue'
import type { DrillListItem } from '#shared/types/drill-view'
import TakePage from '~/pages/takes/[id].vue'
import TakesPage from '~/pages/takes/index.vue'
import DrillPage from '~/pages/drills/[id].vue'
import NewTakePage from '~/pages/takes/new.vue'

// Invented demo data (the contract's shapes); the check values are the trade's, noted beside them.
const ensembles = [
  { id: 1, name: 'Harbour Singers', kind: 'choir', role: 'director', sectionCount: 4, memberCount: 24, archived: false },
  { id: 2, name: 'Quay Brass', kind: 'brass_band', role: 'player', sectionCount: 5, memberCount: 20, archived: false },
  { id: 3, name: 'Old Choir', kind: 'choir', role: 'player', sectionCount: 2, memberCount: 8, archived: true },
]
const drillRow = {
  id: 5, title: 'Held triads in E♭', key: 'Eb major', tempo: 60, a4: 440, system: { name: 'just-root', seventh: 'harmonic', fraction: '1/4' },
  tolerance: 8, parts: [{ name: 'Soprano', instrument: 'voice-soprano' }, { name: 'Alto', instrument: null }], chords: 6, createdAt: '2026-03-01T10:00:00Z',
  updatedAt: '2026-03-02T10:00:00Z', version: 2, takes: 3, archivedAt: null,
} satisfies DrillListItem
// A signed-in player, so the page guard lets the pages through.
registerEndpoint('/api/_auth/session', () => ({ user: { id: 4, email: 'ada@example.org', name: 'Ada Example', siteRole: null }, loggedInAt: Date.now() }))
beforeAll(async () => {
  await useUserSession().fetch()
})

registerEndpoint('/api/ensembles', () => ensembles)
registerEndpoint('/api/ensembles/1/drills', () => [drillRow])
registerEndpoint('/api/ensembles/2/drills', () => [])

let importCalls = 0
let importFails = false
registerEndpoint('/api/ensembles/1/drills/import', {
  method: 'POST',
  handler: async () => {
    importCalls++
    if (importFails) {
      throw createError({ statusCode: 400, statusMessage: 'Invalid drill file', data: { code: 'bad_note', message: '"H4" is not a note name', path: 'chords.2.notes.Alto' } })
    }
    return { id: 77, parts: ['Soprano', 'Alto'], chords: 3 }
  },
})

async function chooseFile(w: Awaited<ReturnType<typeof mountSuspended>>, file: File) {
  const input = w.find('input[type="file"]')
  Object.defineProperty(input.element, 'files', { value: [file], configurable: true })
  await input.trigger('change')
}

describe('pages/drills/index', () => {
  it('lists the drills of each active ensemble and offers the import to directors only', async () => {
    const Page = DrillsPage
    const w = await mountSuspended(Page)
    await flushPromises()
    expect(w.text()).toContain('Harbour Singers')
    expect(w.text()).toContain('Quay Brass')
    expect(w.text()).not.toContain('Old Choir')
    const link = w.find('a[href="/drills/5"]')
    expect(link.text()).toBe('Held triads in E♭')
    expect(w.text()).toContain('No drills in this ensemble yet')
    const options = w.find('#import-ensemble').findAll('option').map(o => o.text())
    expect(options).toEqual(['Harbour Singers'])
  })

  it('imports a drill file, and shows the server’s reason when the file is refused', async () => {
    const Page = DrillsPage
    const w = await mountSuspended(Page)
    await flushPromises()
    // Wrong kind of file: refused before sending.
    await chooseFile(w, new File(['x'], 'notes.pdf', { type: 'application/pdf' }))
    await w.find('form').trigger('submit')
    await flushPromises()
    expect(importCalls).toBe(0)
    expect(w.text()).toContain('drill document (.json) or a Standard MIDI File')

    await chooseFile(w, new File(['{"title":"x"}'], 'drill.json', { type: 'application/json' }))
    importFails = true
    await w.find('form').trigger('submit')
    await vi.waitFor(() => expect(w.text()).toContain('The drill was not imported'))
    expect(w.text()).toContain('"H4" is not a note name (at chords.2.notes.Alto)')

    importFails = false
    await w.find('form').trigger('submit')
    await vi.waitFor(() => expect(w.text()).toContain('Drill imported'))
    expect(w.text()).toContain('3 chords, parts Soprano, Alto')
    expect(w.find('a[href="/drills/77"]').exists()).toBe(true)
    expect(importCalls).toBe(2)
  })
})

// A take report for the Alto of a C major chord scored just from the root.
const doc = {
  title: 'One chord', key: 'C major', tempo: 60, a4: 440, system: { name: 'just-root', seventh: 'harmonic', fraction: '1/4' }, tolerance: 10,
  parts: [{ name: 'Alto' }, { name: 'Bass' }], chords: [{ beats: 4, notes: { Alto: 'E4', Bass: 'C3' } }, { beats: 4, notes: { Alto: 'F4', Bass: 'F2' } }],
}
const report = {
  take: { durationS: 9.5, sampleRate: 48000, channels: 1 },
  system: 'just-root', a4: 440, part: 'Alto', tolerance: 10, description: 'Just intonation from each chord\'s root (seventh 7/4)',
  holds: [
    { index: 0, note: 'E4', member: 'third', startS: 0.6, endS: 4.4, targetHz: 327.032, detectedHz: 329.628, centsFromTarget: 13.686, centsFromEqual: 0, spreadCents: 1.9, slopeCentsPerS: -0.4, confidence: 0.95, withinTolerance: false, reason: null, writtenNote: 'E4' },
    { index: 1, note: 'F4', member: 'third', startS: 4.6, endS: 8.4, targetHz: 343.323, detectedHz: null, centsFromTarget: null, centsFromEqual: null, spreadCents: null, slopeCentsPerS: null, confidence: 0, withinTolerance: null, reason: 'no voiced sound where the hold was expected', writtenNote: 'F4' },
  ],
  summary: { meanAbsCents: 13.686, withinToleranceShare: 0, driftCentsPerMin: null, holdsFound: 1, holdsExpected: 2 },
  memberBias: { third: 13.686 },
  warnings: [{ code: 'holds_missing', message: '1 of 2 holds were not found' }],
}
const takeDetail = (status: string, extra: Record<string, unknown> = {}) => ({
  id: 9, status, progress: status === 'analysed' ? 1 : 0.4, error: null, report: status === 'analysed' ? report : null,
  drill: { id: 3, title: 'One chord' }, part: 'Alto', player: { id: 4, name: 'Ada Example' }, assignmentId: null,
  createdAt: '2026-03-10T18:00:00Z', withdrawnAt: null, canWithdraw: true, canRestore: false, canRescore: status === 'analysed', canReanalyse: status === 'analysed',
  audioUrl: '/takes/9/audio', mime: 'audio/webm', bytes: 1000, originalName: null, earlier: [], viewerIsPlayer: true, ...extra,
})
// Made-up limits of the server's configuration.
const limits = { maxBytes: 200 * 1024 * 1024, maxDurationS: 1200 }
registerEndpoint('/api/drills/3', () => ({ id: 3, ensembleId: 1, ensembleName: 'Harbour Singers', role: 'player', document: doc, targets: computeTargets(doc), targetsError: null, preselectedPart: 'Alto', openAssignments: [], limits }))
// The same drill with two open assignments for the Alto part and one for the Bass.
registerEndpoint('/api/drills/6', () => ({
  id: 6, ensembleId: 1, ensembleName: 'Harbour Singers', role: 'player', document: doc, targets: computeTargets(doc), targetsError: null, preselectedPart: 'Alto', limits,
  openAssignments: [
    { id: 71, title: 'Week 1: slow', part: 'Alto', dueAt: '2026-03-12T18:00:00Z', submitted: false },
    { id: 72, title: null, part: 'Alto', dueAt: '2026-03-19T18:00:00Z', submitted: false },
    { id: 73, title: 'Bass line', part: 'Bass', dueAt: null, submitted: false },
  ],
}))
let current = takeDetail('analysed')
registerEndpoint('/api/takes/9', () => current)
registerEndpoint('/api/takes/10', () => ({ ...takeDetail('analysing'), id: 10 }))
// Ana's take, opened by her director.
// Not there, or not the caller's: the server says 404 either way.
registerEndpoint('/api/takes/6', () => { throw createError({ statusCode: 404, statusMessage: 'Take not found' }) })
registerEndpoint('/api/takes/11', () => takeDetail('analysed', { id: 11, player: { id: 8, name: 'Ana Ruiz' }, viewerIsPlayer: false, canWithdraw: false }))

function mockBrowserOnly() {
  vi.doMock('wavesurfer.js', () => ({ default: { create: () => ({ on: () => {}, destroy: () => {}, playPause: () => {} }) } }))
  vi.doMock('wavesurfer.js/dist/plugins/regions.esm.js', () => ({ default: { create: () => ({ on: () => {}, addRegion: () => ({}), clearRegions: () => {}, getRegions: () => [] }) } }))
  vi.doMock('vue-chartjs', () => ({ Line: { name: 'Line', render: () => null } }))
}

describe('pages/takes/[id]', () => {
  it('shows the report of an analysed take: summary, holds, notes, history', async () => {
    mockBrowserOnly()
    current = takeDetail('analysed')
    const Page = TakePage
    const w = await mountSuspended(Page, { route: '/takes/9' })
    await flushPromises()
    expect(w.text()).toContain('Alto · Ada Example')
    expect(w.find('[data-status]').exists()).toBe(false) // no status panel once analysed
    expect(w.find('[data-testid="summary-found"]').text()).toContain('1 of 2')
    const table = w.find('[data-testid="hold-table"]')
    expect(table.text()).toContain('+13.7 ¢')
    expect(table.text()).toContain('no pitch found')
    expect(table.text()).toContain('no voiced sound where the hold was expected')
    expect(w.text()).toContain('1 of 2 holds were not found')
    expect(w.text()).toContain('first take of this part')
    expect(w.text()).toContain('Score again')
    expect(w.text()).toContain('Withdraw this take')
    expect(w.text()).toContain('Record another take of this part')
  })

  it('speaks of the player by name to a director, and offers recording only to the player', async () => {
    mockBrowserOnly()
    const w = await mountSuspended(TakePage, { route: '/takes/11' })
    await flushPromises()
    expect(w.text()).toContain('This is Ana’s first take of this part')
    expect(w.text()).not.toContain('This is your first take')
    expect(w.text()).not.toContain('Record another take')
  })

  it('offers the way back to the takes, not a retry, for a take that is not found', async () => {
    const w = await mountSuspended(TakePage, { route: '/takes/6' })
    await flushPromises()
    const alert = w.get('[role="alert"]')
    expect(alert.text()).toContain('Take not found (404)')
    expect(alert.find('button').exists()).toBe(false)
    const back = alert.get('a')
    expect(back.text()).toBe('Back to the takes')
    expect(back.attributes('href')).toBe('/takes')
  })

  it('shows the live status panel while the take is analysed', async () => {
    mockBrowserOnly()
    vi.stubGlobal('EventSource', class { addEventListener() {} close() {} onerror = null })
    const Page = TakePage
    const w = await mountSuspended(Page, { route: '/takes/10' })
    await flushPromises()
    const panel = w.find('[data-status="analysing"]')
    expect(panel.text()).toContain('40 % done')
    expect(w.find('[data-testid="hold-table"]').exists()).toBe(false)
    vi.unstubAllGlobals()
  })
})

let restored: number[] = []
registerEndpoint('/api/takes/61/restore', { method: 'POST', handler: () => { restored.push(61); return { id: 61, withdrawnAt: null } } })
registerEndpoint('/api/takes', (event) => {
  const params = new URL(event.node.req.url!, 'http://x').searchParams
  const page = Number(params.get('page') || 1)
  if (params.get('withdrawn') === 'only') {
    const items = restored.includes(61) ? [] : [{ id: 61, drillId: 5, drillTitle: 'Held triads in E♭', part: 'Alto', playerName: 'Ben Oduya', status: 'analysed', createdAt: '2026-03-08T18:00:00Z', meanAbsCents: 9, withinToleranceShare: 0.5, withdrawn: true, withdrawnAt: '2026-03-09T10:00:00Z', assignmentId: null, canRestore: true }]
    return { items, total: items.length, page: 1, pageSize: 20 }
  }
  return {
    items: [{ id: 40 + page, drillId: 5, drillTitle: 'Held triads in E♭', part: 'Alto', playerName: 'Ada Example', status: 'analysed', createdAt: '2026-03-10T18:00:00Z', meanAbsCents: 4.25, withinToleranceShare: 0.75, withdrawn: false, withdrawnAt: null, assignmentId: null, canRestore: false }],
    total: 45, page, pageSize: 20,
  }
})

describe('pages/takes/index', () => {
  it('lists takes with status and figures, and pages through them', async () => {
    const Page = TakesPage
    const w = await mountSuspended(Page, { route: '/takes' })
    await flushPromises()
    const row = w.find('tbody tr')
    expect(row.text()).toContain('Held triads in E♭')
    expect(row.text()).toContain('Analysed')
    expect(row.text()).toContain('4.3 ¢')
    expect(row.text()).toContain('75 %')
    // 45 takes at 20 a page: 3 pages.
    expect(w.find('nav[aria-label="Pages of takes"]').text()).toContain('Page 1 of 3')
    expect(w.find('a[rel="next"]').attributes('href')).toBe('/takes?page=2')
    expect(w.find('a[rel="prev"]').exists()).toBe(false)
    expect(w.find('caption').text()).toContain('45 takes')
  })

  it('gives a director the withdrawn takes with a Restore button for each', async () => {
    restored = []
    const w = await mountSuspended(TakesPage, { route: '/takes?withdrawn=only' })
    await flushPromises()
    expect(w.find('h1').text()).toBe('Withdrawn takes')
    expect((w.find('#filter-withdrawn').element as HTMLSelectElement).value).toBe('only')
    const button = w.find('tbody tr button')
    expect(button.text()).toContain('Restore')
    expect(button.text()).toContain('Ben Oduya’s take of Held triads in E♭')
    await button.trigger('click')
    await flushPromises()
    expect(restored).toEqual([61])
    await new Promise(r => setTimeout(r, 50))
    await flushPromises()
    expect(w.find('[data-testid="restore-message"]').text()).toContain('Restored: Ben Oduya’s take')
    expect(w.text()).toContain('No take is withdrawn')
  })
})

registerEndpoint('/api/drills/4', () => ({ id: 4, ensembleId: 1, ensembleName: 'Harbour Singers', role: 'player', document: { ...doc, system: { name: 'scala', seventh: 'harmonic', fraction: '1/4' } }, targets: null, targetsError: { code: 'scala_missing', message: 'The scala system needs the text of a Scala .scl file' }, preselectedPart: null, openAssignments: [], limits }))

describe('pages/drills/[id]', () => {
  it('shows the voicing in the drill’s system and recomputes it for another system', async () => {
    const Page = DrillPage
    const w = await mountSuspended(Page, { route: '/drills/3' })
    await flushPromises()
    expect(w.find('h1').text()).toBe('One chord')
    const alto = w.findAll('[data-testid="voicing-grid"] tbody tr')[0]!
    // Just third from the root: −13.7 ¢ from equal temperament (1200·log2(5/4) − 400, common practice).
    expect(alto.find('[data-testid="cents-from-equal"]').text()).toContain('\u221213.7 ¢')
    expect(w.find('[data-testid="record-link"]').attributes('href')).toBe('/takes/new?drillId=3&part=Alto')
    expect(w.text()).toContain('Headphones: start quiet')
    // Switch the practice system to equal temperament: every note 0.0 ¢ from equal.
    await w.find('fieldset select').setValue('equal')
    await flushPromises()
    const cents = w.findAll('[data-testid="cents-from-equal"]').map(c => c.text().split(' · ')[0])
    expect(cents.every(c => c === '0.0 ¢')).toBe(true)
    expect(w.text()).toContain('Takes are still scored in the drill\'s system')
  })

  it('explains when the drill’s own targets cannot be computed and still lets the player pick a system', async () => {
    const Page = DrillPage
    const w = await mountSuspended(Page, { route: '/drills/4' })
    await flushPromises()
    expect(w.text()).toContain('needs the text of a Scala .scl file')
    expect(w.find('[data-testid="voicing-grid"]').exists()).toBe(false)
    await w.find('fieldset select').setValue('just-root')
    await flushPromises()
    expect(w.find('[data-testid="voicing-grid"]').exists()).toBe(true)
  })
})

describe('pages/takes/new', () => {
  it('preselects the part from the address and explains an unknown one', async () => {
    const Page = NewTakePage
    const w = await mountSuspended(Page, { route: '/takes/new?drillId=3&part=Bass' })
    await flushPromises()
    expect((w.find('#take-part').element as HTMLSelectElement).value).toBe('Bass')
    const w2 = await mountSuspended(Page, { route: '/takes/new?drillId=3&part=Tenor' })
    await flushPromises()
    expect(w2.text()).toContain('no part called “Tenor”')
    // Falls back to the part of the player's section.
    expect((w2.find('#take-part').element as HTMLSelectElement).value).toBe('Alto')
  })

  it('lets the player choose between two open assignments of the drill and part', async () => {
    const w = await mountSuspended(NewTakePage, { route: '/takes/new?drillId=6&part=Alto' })
    await flushPromises()
    const choice = w.find('[data-testid="take-assignment-choice"]')
    expect(choice.exists()).toBe(true)
    // Told apart by title, else by due date; plus "none" for a practice take.
    expect(choice.text()).toContain('Week 1: slow')
    expect(choice.findAll('input[type="radio"]')).toHaveLength(3)
    expect(choice.text()).toContain('Choose one before sending')
    expect(w.find('[data-testid="take-uploader"] button[type="submit"]').attributes('disabled')).toBeDefined()
    await choice.findAll('input[type="radio"]')[1]!.setValue(true)
    await flushPromises()
    expect(w.find('[data-testid="take-uploader"] button[type="submit"]').attributes('disabled')).toBeUndefined()
  })

  it('links the take to the one open assignment of the chosen part without asking', async () => {
    const w = await mountSuspended(NewTakePage, { route: '/takes/new?drillId=6&part=Bass' })
    await flushPromises()
    expect(w.find('[data-testid="take-assignment-choice"]').exists()).toBe(false)
    expect(w.find('[data-testid="take-assignment"]').text()).toContain('“Bass line”')
  })

  it('asks for a drill when none is given', async () => {
    const Page = NewTakePage
    const w = await mountSuspended(Page, { route: '/takes/new' })
    await flushPromises()
    expect(w.text()).toContain('Choose a drill first')
  })
})

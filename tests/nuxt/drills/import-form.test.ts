import { describe, expect, it, vi } from 'vitest'
import { flushPromises } from '@vue/test-utils'
import { mountSuspended, registerEndpoint } from '@nuxt/test-utils/runtime'
import DrillImportForm from '~/components/drills/DrillImportForm.vue'
import DrillNotation from '~/components/drills/DrillNotation.client.vue'
import { parseDrill } from '#shared/drill/schema'

// The notation library draws into an SVG in a real browser (the e2e test checks that); here it is
// replaced by a recorder of the MusicXML it is given.
const loaded: string[] = []
vi.mock('opensheetmusicdisplay', () => ({
  OpenSheetMusicDisplay: class {
    async load(xml: string) { loaded.push(xml) }
    render() {}
    clear() {}
  },
}))

// An invented import (the shapes are the API's); the B-flat trumpet's written pitch is a major
// second above concert (common practice).
const drill = parseDrill({
  title: 'Pier Warm-up', key: 'F major', tempo: 60, a4: 440, system: { name: 'equal', seventh: 'harmonic', fraction: '1/4' }, tolerance: 10,
  parts: [{ name: 'Women 1' }, { name: 'Women 2' }, { name: 'Trumpet', instrument: 'trumpet-bb' }],
  chords: [{ beats: 4, notes: { 'Women 1': 'A4', 'Women 2': 'F4', 'Trumpet': 'C5' } }],
})
let calls = 0
registerEndpoint('/api/ensembles/1/drills/import', {
  method: 'POST',
  handler: () => {
    calls++
    if (calls === 1) {
      return { preview: true, format: 'musicxml', drill, warnings: ['Bar 3: Women 2 goes above Women 1 (the voices cross); each part keeps its own voice as written'], parts: ['Women 1', 'Women 2', 'Trumpet'], chords: 1, sections: ['Soprano', 'Alto', 'Trumpet'] }
    }
    return { id: 12, parts: ['Soprano', 'Alto', 'Trumpet'], chords: 1, warnings: [] }
  },
})

/** The text fields of each multipart request the form sent (read from the FormData it passed to $fetch). */
function sentFields(spy: { mock: { calls: unknown[][] } }): Record<string, string>[] {
  return spy.mock.calls.map(([, opts]) => {
    const body = (opts as { body: FormData }).body
    return Object.fromEntries([...body.entries()].filter(([, v]) => typeof v === 'string') as [string, string][])
  })
}

describe('DrillImportForm', () => {
  it('previews, matches parts to sections, refuses two parts of one name, then saves with the chosen names', async () => {
    const spy = vi.spyOn(globalThis as unknown as { $fetch: (...a: unknown[]) => unknown }, '$fetch')
    const w = await mountSuspended(DrillImportForm, { props: { ensembles: [{ id: 1, name: 'Harbour Singers' }] } })
    const input = w.find('input[type="file"]')
    Object.defineProperty(input.element, 'files', { value: [new File(['<score-partwise/>'], 'warm-up.musicxml')], configurable: true })
    await input.trigger('change')
    await w.find('input[name="bars"]').setValue('2-')
    await w.findAll('button').find(b => b.text() === 'Preview')!.trigger('click')
    await flushPromises()
    expect(spy).not.toHaveBeenCalled() // the shared schema refuses "2-" before sending
    expect(w.text()).toContain('Bars as a range such as 3-6')

    await w.find('input[name="bars"]').setValue('2-5')
    await w.findAll('button').find(b => b.text() === 'Preview')!.trigger('click')
    await vi.waitFor(() => expect(w.find('[data-testid="import-preview"]').exists(), w.text()).toBe(true))
    expect(sentFields(spy)[0]).toMatchObject({ preview: '1', bars: '2-5' })
    expect(w.text()).toContain('Bar 3: Women 2 goes above Women 1')
    // A part named like a section is matched to it; the others wait for a choice.
    const selects = w.findAll('[data-testid="import-preview"] select')
    expect(selects.map(s => (s.element as HTMLSelectElement).value)).toEqual(['', '', 'Trumpet'])

    await selects[0]!.setValue('Alto')
    await selects[1]!.setValue('Alto')
    expect(w.text()).toContain('Two parts would both be named "Alto"')
    expect(w.find('button[type="submit"]').attributes('disabled')).toBeDefined()

    await selects[0]!.setValue('Soprano')
    await w.find('form').trigger('submit')
    await vi.waitFor(() => expect(w.text()).toContain('Drill imported'))
    const saved = sentFields(spy)[1]!
    expect(JSON.parse(saved.parts!)).toEqual({ 'Women 1': 'Soprano', 'Women 2': 'Alto' })
    expect(saved.preview).toBeUndefined()
    spy.mockRestore()
    expect(w.emitted('imported')).toHaveLength(1)
  })
})

describe('DrillNotation', () => {
  it('hands the notation library the drill as MusicXML, at concert or written pitch', async () => {
    loaded.length = 0
    const w = await mountSuspended(DrillNotation, { props: { document: drill, pitch: 'concert' } })
    await vi.waitFor(() => expect(w.find('[data-state="ready"]').exists()).toBe(true))
    expect(loaded[0]).toContain('<score-partwise version="4.0">')
    expect(loaded[0]).not.toContain('<transpose>')
    expect(w.find('[role="img"]').attributes('aria-label')).toBe('Notation of Pier Warm-up at concert pitch: 3 parts, 1 chord')
    await w.setProps({ pitch: 'written' })
    await vi.waitFor(() => expect(loaded).toHaveLength(2))
    // Written for the B-flat trumpet: concert C5 is written D5 (a major second higher, common practice).
    expect(loaded[1]).toContain('<transpose><diatonic>-1</diatonic><chromatic>-2</chromatic></transpose>')
    expect(loaded[1]).toContain('<pitch><step>D</step><octave>5</octave></pitch>')
  })
})

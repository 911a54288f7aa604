// The voicing grid editor in a Nuxt environment: keyboard note entry, written pitch for a
// transposing part, undo, and the checks shown before anything is sent.
import { describe, expect, it, vi } from 'vitest'
import { mountSuspended } from '@nuxt/test-utils/runtime'
import DrillEditor from '~/components/drills/DrillEditor.vue'
import { parseDrill } from '#shared/drill/schema'

const document = parseDrill({
  title: 'Brass pair',
  key: 'Bb major',
  parts: [{ name: 'Cornet', instrument: 'cornet-bb' }, { name: 'Bass' }],
  chords: [{ beats: 4, notes: { Cornet: null, Bass: null } }],
})

async function mountEditor() {
  const w = await mountSuspended(DrillEditor, { props: { document, version: null, ensembleId: 1, drillId: null } })
  const cell = (p: number, c: number) => w.find(`[data-cell="${p}:${c}"]`)
  const press = async (p: number, c: number, key: string, opts: Record<string, boolean> = {}) => {
    await cell(p, c).trigger('keydown', { key, ...opts })
  }
  return { w, cell, press }
}

describe('DrillEditor', () => {
  it('types notes with the key signature and octave digits, and undoes the last edit', async () => {
    const { cell, press } = await mountEditor()
    // B♭ major's signature flats B and E (common practice): typing B then 2 gives B♭2.
    await press(1, 0, 'b')
    await press(1, 0, '2')
    expect(cell(1, 0).text()).toContain('B♭2')
    await press(1, 0, '=')
    expect(cell(1, 0).text()).toContain('B2')
    await press(1, 0, 'z', { ctrlKey: true })
    expect(cell(1, 0).text()).toContain('B♭2')
    await press(1, 0, 'r')
    expect(cell(1, 0).text()).toContain('rest')
  })

  it('reads and shows written pitch for a B♭ cornet when asked', async () => {
    const { w, cell, press } = await mountEditor()
    await w.find('input[type="checkbox"]').setValue(true)
    // A B♭ cornet reads a major second above concert pitch (common practice): written D5 sounds C5.
    await press(0, 0, 'd')
    await press(0, 0, '=')
    await press(0, 0, '5')
    expect(cell(0, 0).text()).toContain('D5')
    expect(cell(0, 0).text()).toContain('sounds C5')
    await w.find('input[type="checkbox"]').setValue(false)
    expect(cell(0, 0).text()).toContain('C5')
  })

  it('lists the blank cells by chord and part instead of sending anything', async () => {
    const fetchSpy = vi.spyOn(globalThis, '$fetch')
    const { w } = await mountEditor()
    await w.find('[data-testid="save-drill"]').trigger('click')
    await new Promise(r => setTimeout(r, 0))
    const issues = w.find('[data-testid="editor-issues"]').text()
    expect(issues).toContain('Chord 1, Cornet: no note yet; type a note or R for a rest')
    expect(issues).toContain('Chord 1, Bass: no note yet')
    expect(fetchSpy).not.toHaveBeenCalled()
    fetchSpy.mockRestore()
  })
})

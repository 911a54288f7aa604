// The voicing grid editor in a Nuxt environment: keyboard note entry, written pitch for a
// transposing part, undo, and the checks shown before anything is sent (in plain words, all at once).
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

async function mountEditor(doc = document, opts: { attach?: boolean } = {}) {
  const w = await mountSuspended(DrillEditor, { props: { document: doc, version: null, ensembleId: 1, drillId: null }, ...(opts.attach ? { attachTo: window.document.body } : {}) })
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

  // zod's own wording ("Too small: expected number to be >=415") never reaches a director.
  const RAW = /expected|>=|<=|Too small|Too big|Invalid input|undefined|\[object/
  const messages = (w: Awaited<ReturnType<typeof mountEditor>>['w']) => [
    ...w.findAll('.field-error').map(e => e.text()),
    ...w.findAll('[data-testid="editor-issues"] li').map(e => e.text()),
  ]
  const settingsField = (w: Awaited<ReturnType<typeof mountEditor>>['w'], max: string) => w.find(`[data-testid="drill-settings"] input[type="number"][max="${max}"]`)

  it('words every problem of the settings in plain language, in the fields and once in the summary', async () => {
    const { w } = await mountEditor()
    // The limits are the product's own (shared/drill/schema.ts): A4 from 415 to 466 Hz (a semitone
    // either side of 440 Hz, ISO 16), tolerance above 0 and at most 50 cents, tempo 20–300.
    const title = w.find('[data-testid="drill-settings"] input:not([type])')
    const walk: [string, string, string][] = [
      ['466', '0', 'A reference pitch from 415 to 466 Hz'], ['466', '467', 'A reference pitch from 415 to 466 Hz'], ['466', '', 'A reference pitch from 415 to 466 Hz'],
      ['50', '-5', 'A tolerance above 0 and at most 50 cents'], ['50', '0', 'A tolerance above 0 and at most 50 cents'], ['50', '51', 'A tolerance above 0 and at most 50 cents'],
      ['300', '0', 'A tempo from 20 to 300 beats per minute'], ['300', '301', 'A tempo from 20 to 300 beats per minute'],
    ]
    for (const [max, value, message] of walk) {
      await title.setValue('')
      await settingsField(w, max).setValue(value)
      await w.find('[data-testid="save-drill"]').trigger('click')
      await new Promise(r => setTimeout(r, 0))
      const shown = messages(w)
      expect(shown, `${max}: "${value}"`).toContain(message)
      expect(shown).toContain('Give the drill a title')
      for (const m of shown) expect(m, `${max}: "${value}"`).not.toMatch(RAW)
      const listed = w.findAll('[data-testid="editor-issues"] li').map(e => e.text())
      expect(new Set(listed).size).toBe(listed.length)
      expect(w.text()).not.toContain('The drill is not valid')
      await settingsField(w, max).setValue(max)
    }
  })

  it('lists the customer\'s case once each: A4 0, tolerance −5 and no title, beside the blank cells', async () => {
    const { w } = await mountEditor()
    await settingsField(w, '466').setValue('0')
    await settingsField(w, '50').setValue('-5')
    await w.find('[data-testid="drill-settings"] input:not([type])').setValue('')
    await w.find('[data-testid="save-drill"]').trigger('click')
    await new Promise(r => setTimeout(r, 0))
    expect(w.findAll('[data-testid="editor-issues"] li').map(e => e.text())).toEqual([
      'Chord 1, Cornet: no note yet; type a note or R for a rest',
      'Chord 1, Bass: no note yet; type a note or R for a rest',
      'Give the drill a title',
      'A reference pitch from 415 to 466 Hz',
      'A tolerance above 0 and at most 50 cents',
    ])
    expect(w.find('[data-testid="drill-settings"]').text()).toContain('Give the drill a title')
    // The targets line does not repeat the problems the fields and the summary already name.
    expect(w.text()).toContain('The targets show once the drill\'s settings and parts are valid.')
  })

  it('lists an empty title with the blank cells on the first press of an untouched form, and focuses the summary', async () => {
    const untitled = { ...document, title: '' }
    const fetchSpy = vi.spyOn(globalThis, '$fetch')
    const { w } = await mountEditor(untitled, { attach: true })
    await w.find('[data-testid="save-drill"]').trigger('click')
    await new Promise(r => setTimeout(r, 0))
    const listed = w.findAll('[data-testid="editor-issues"] li').map(e => e.text())
    expect(listed).toEqual([
      'Chord 1, Cornet: no note yet; type a note or R for a rest',
      'Chord 1, Bass: no note yet; type a note or R for a rest',
      'Give the drill a title',
    ])
    expect(w.text()).toContain('Fix these 3 before saving')
    const title = w.find('[data-testid="drill-settings"] input:not([type])')
    expect(title.attributes('aria-invalid')).toBe('true')
    expect(w.find(`#${title.attributes('aria-describedby')}`).text()).toBe('Give the drill a title')
    expect(window.document.activeElement?.contains(w.find('[data-testid="editor-issues"]').element)).toBe(true)
    expect(fetchSpy).not.toHaveBeenCalled()
    fetchSpy.mockRestore()
    w.unmount()
  })
})

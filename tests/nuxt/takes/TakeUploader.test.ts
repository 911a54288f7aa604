import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { flushPromises } from '@vue/test-utils'
import { mountSuspended } from '@nuxt/test-utils/runtime'
import TakeUploader from '~/components/takes/TakeUploader.vue'

/** A stand-in for XMLHttpRequest that records what is sent and lets the test answer. */
class FakeXhr {
  static all: FakeXhr[] = []
  method = ''
  url = ''
  headers: Record<string, string> = {}
  body: FormData | null = null
  status = 0
  responseText = ''
  upload: { onprogress: ((e: ProgressEvent) => void) | null } = { onprogress: null }
  onload: (() => void) | null = null
  onerror: (() => void) | null = null
  ontimeout: (() => void) | null = null
  onabort: (() => void) | null = null
  constructor() { FakeXhr.all.push(this) }
  open(method: string, url: string) { this.method = method; this.url = url }
  setRequestHeader(k: string, v: string) { this.headers[k] = v }
  send(body: FormData) { this.body = body }
  abort() { this.onabort?.() }
  progress(loaded: number, total: number) { this.upload.onprogress?.({ lengthComputable: true, loaded, total } as ProgressEvent) }
  respond(status: number, body: unknown) {
    this.status = status
    this.responseText = JSON.stringify(body)
    this.onload?.()
  }
  fail() { this.onerror?.() }
}

// RFC 4122 version-4 UUID layout: 8-4-4-4-12 hex digits, version nibble 4, variant 8–b.
const UUID_V4 = /^[0-9a-f]{8}-[0-9a-f]{4}-4[0-9a-f]{3}-[89ab][0-9a-f]{3}-[0-9a-f]{12}$/

function wav(bytes = 1024, name = 'alto.wav', type = 'audio/wav') {
  return new File([new Uint8Array(bytes)], name, { type })
}

// What the server's configuration allows (sent with the drill); made-up round figures.
const LIMITS = { maxBytes: 200 * 1024 * 1024, maxDurationS: 1200 }

async function mountWithFile(file = wav(), props: Record<string, unknown> = {}) {
  const w = await mountSuspended(TakeUploader, { props: { drillId: 12, part: 'Alto', assignmentId: 5, limits: LIMITS, ...props } })
  // As the browser does when a file is chosen in the picker.
  const input = w.find('input[type="file"]')
  Object.defineProperty(input.element, 'files', { value: [file], configurable: true })
  await input.trigger('change')
  await flushPromises()
  return w
}

describe('TakeUploader', () => {
  beforeEach(() => {
    FakeXhr.all = []
    vi.stubGlobal('XMLHttpRequest', FakeXhr)
  })
  afterEach(() => vi.unstubAllGlobals())

  it('sends drill, part, assignment, an idempotency key and the audio to POST /api/takes', async () => {
    const file = wav()
    const w = await mountWithFile(file)
    await w.find('form').trigger('submit')
    expect(FakeXhr.all).toHaveLength(1)
    const x = FakeXhr.all[0]!
    expect(x.method).toBe('POST')
    expect(x.url).toBe('/api/takes')
    expect(x.body!.get('drillId')).toBe('12')
    expect(x.body!.get('part')).toBe('Alto')
    expect(x.body!.get('assignmentId')).toBe('5')
    expect(String(x.body!.get('idempotencyKey'))).toMatch(UUID_V4)
    expect((x.body!.get('audio') as File).name).toBe('alto.wav')
    // The text fields come first: the server checks them before it stores any audio.
    expect([...x.body!.keys()].at(-1)).toBe('audio')
  })

  it('refuses a second submit while the first is in flight', async () => {
    const w = await mountWithFile()
    await w.find('form').trigger('submit')
    await w.find('form').trigger('submit')
    await w.find('button[type="submit"]').trigger('click')
    expect(FakeXhr.all).toHaveLength(1)
    expect(w.find('button[type="submit"]').attributes('disabled')).toBeDefined()
    expect(w.find('button[type="submit"]').text()).toBe('Sending…')
    FakeXhr.all[0]!.respond(202, { id: 41, status: 'queued' })
    await flushPromises()
    expect(w.emitted('submitted')).toEqual([[{ id: 41, status: 'queued' }]])
    // Once sent, the same form does not send again.
    await w.find('form').trigger('submit')
    expect(FakeXhr.all).toHaveLength(1)
  })

  it('reuses its idempotency key when the connection drops and the take is sent again', async () => {
    const w = await mountWithFile()
    await w.find('form').trigger('submit')
    const first = String(FakeXhr.all[0]!.body!.get('idempotencyKey'))
    FakeXhr.all[0]!.fail()
    await flushPromises()
    expect(w.find('[data-testid="upload-error"]').text()).toContain('connection dropped')
    expect(w.find('button[type="submit"]').text()).toBe('Send again')
    await w.find('form').trigger('submit')
    expect(FakeXhr.all).toHaveLength(2)
    expect(String(FakeXhr.all[1]!.body!.get('idempotencyKey'))).toBe(first)
    // The server recognises the key and answers 200 with the same take.
    FakeXhr.all[1]!.respond(200, { id: 41, status: 'analysing' })
    await flushPromises()
    expect(w.emitted('submitted')).toEqual([[{ id: 41, status: 'analysing' }]])
  })

  it('shows upload progress from the upload events', async () => {
    const w = await mountWithFile()
    await w.find('form').trigger('submit')
    FakeXhr.all[0]!.progress(512, 1024)
    await flushPromises()
    expect(w.find('progress').attributes('value')).toBe('50')
    expect(w.text()).toContain('50 % sent')
  })

  it.each([
    [415, 'not_audio', /not audio Driftline can read/],
    [413, 'too_long', /longer than 20 minutes/],
    [422, 'silent', /recording is silent/],
    [422, 'clipped', /heavily clipped/],
    [404, undefined, /not in any of your ensembles/],
  ])('turns a %i (%s) from the server into a clear message', async (status, code, text) => {
    const w = await mountWithFile()
    await w.find('form').trigger('submit')
    // A 413 names the limit in its details, as the route sends it.
    FakeXhr.all[0]!.respond(status, { statusCode: status, statusMessage: 'Refused', data: code ? { code, ...(code === 'too_long' ? { maxDurationS: 1200 } : {}) } : {} })
    await flushPromises()
    const err = w.find('[data-testid="upload-error"]')
    expect(err.attributes('role')).toBe('alert')
    expect(err.text()).toMatch(text)
    expect(w.emitted('submitted')).toBeUndefined()
    // The chosen file stays, so nothing is lost.
    expect(w.find('[data-testid="chosen-file"]').text()).toContain('alto.wav')
  })

  it('does not say "Uploaded" beside a refusal, even when every byte went', async () => {
    const w = await mountWithFile()
    await w.find('form').trigger('submit')
    FakeXhr.all[0]!.progress(1024, 1024)
    await flushPromises()
    expect(w.text()).toContain('Stored; waiting for the server')
    FakeXhr.all[0]!.respond(415, { statusCode: 415, statusMessage: 'Refused', data: { code: 'not_audio' } })
    await flushPromises()
    expect(w.find('[data-testid="upload-error"]').exists()).toBe(true)
    expect(w.find('progress').exists()).toBe(false)
    expect(w.text()).not.toContain('Uploaded')
    expect(w.text()).not.toContain('Stored')
  })

  it('lists field issues of a 400', async () => {
    const w = await mountWithFile()
    await w.find('form').trigger('submit')
    FakeXhr.all[0]!.respond(400, { statusCode: 400, statusMessage: 'Bad fields', data: { code: 'bad_fields', issues: [{ path: ['part'], message: 'not a part of this drill' }] } })
    await flushPromises()
    expect(w.find('[data-testid="upload-error"]').text()).toContain('part: not a part of this drill')
  })

  it('checks the file before sending: empty, too large, not audio', async () => {
    let w = await mountWithFile(wav(0))
    await w.find('form').trigger('submit')
    expect(FakeXhr.all).toHaveLength(0)
    expect(w.text()).toContain('no audio in it')

    // The limit named is the one the server sent, not a figure copied into the form.
    w = await mountWithFile(wav(2048), { limits: { maxBytes: 1024, maxDurationS: 300 } })
    await w.find('form').trigger('submit')
    expect(FakeXhr.all).toHaveLength(0)
    expect(w.text()).toContain('larger than 1 KB')
    expect(w.text()).toContain('up to 1 KB and 5 minutes')

    w = await mountWithFile(new File(['hello'], 'notes.txt', { type: 'text/plain' }))
    await w.find('form').trigger('submit')
    expect(FakeXhr.all).toHaveLength(0)
    expect(w.text()).toContain('not audio')
  })

  it('sends a recorded take given as a prop instead of a chosen file', async () => {
    const rec = new File([new Uint8Array(4096)], 'Alto-2026.webm', { type: 'audio/webm' })
    const w = await mountSuspended(TakeUploader, { props: { drillId: 3, part: 'Alto', recorded: rec, limits: LIMITS } })
    expect(w.find('input[type="file"]').exists()).toBe(false)
    await w.find('form').trigger('submit')
    expect((FakeXhr.all[0]!.body!.get('audio') as File).name).toBe('Alto-2026.webm')
    expect(FakeXhr.all[0]!.body!.has('assignmentId')).toBe(false)
  })
})

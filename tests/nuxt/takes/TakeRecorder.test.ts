import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { flushPromises } from '@vue/test-utils'
import { mountSuspended } from '@nuxt/test-utils/runtime'
import TakeRecorder from '~/components/takes/TakeRecorder.client.vue'
import { usePracticeStore } from '~/stores/practice'
import { pickRecordMime, useRecorderStore } from '~/stores/recorder'
import { FakeAudioContext, type FakeOscillator } from '../practice/audio-mock'

class FakeTrack { stopped = false; stop() { this.stopped = true } }
class FakeStream { tracks = [new FakeTrack()]; getTracks() { return this.tracks } }

class FakeMediaRecorder {
  static all: FakeMediaRecorder[] = []
  static supported = ['audio/webm;codecs=opus', 'audio/webm']
  static isTypeSupported(t: string) { return FakeMediaRecorder.supported.includes(t) }
  state: 'inactive' | 'recording' = 'inactive'
  ondataavailable: ((e: { data: Blob }) => void) | null = null
  onstop: (() => void) | null = null
  onerror: (() => void) | null = null
  timeslice: number | undefined
  constructor(readonly stream: unknown, readonly options: { mimeType: string, audioBitsPerSecond?: number }) { FakeMediaRecorder.all.push(this) }
  start(timeslice?: number) { this.state = 'recording'; this.timeslice = timeslice }
  stop() {
    this.state = 'inactive'
    this.ondataavailable?.({ data: new Blob([new Uint8Array(3000)], { type: 'audio/webm' }) })
    this.onstop?.()
  }
}

let getUserMedia: ReturnType<typeof vi.fn>
let stream: FakeStream

function stubBrowser() {
  stream = new FakeStream()
  getUserMedia = vi.fn(async () => stream)
  vi.stubGlobal('navigator', {
    ...navigator,
    mediaDevices: {
      getUserMedia,
      enumerateDevices: async () => [
        { kind: 'audioinput', deviceId: 'usb-1', label: 'USB condenser' },
        { kind: 'audiooutput', deviceId: 'out-1', label: 'Headphones' },
        { kind: 'audioinput', deviceId: 'int-1', label: '' },
      ],
      addEventListener: () => {},
      removeEventListener: () => {},
    },
  })
  vi.stubGlobal('MediaRecorder', FakeMediaRecorder)
  vi.stubGlobal('AudioContext', FakeAudioContext)
  Object.defineProperty(window, 'isSecureContext', { value: true, configurable: true })
  URL.createObjectURL = vi.fn(() => 'blob:take-1')
  URL.revokeObjectURL = vi.fn()
}

const guide = [{ atS: 0, durationS: 1.9, hz: [293.66] }, { atS: 2, durationS: 1.9, hz: [329.63] }]

describe('TakeRecorder', () => {
  beforeEach(async () => {
    FakeAudioContext.instances = []
    FakeMediaRecorder.all = []
    FakeMediaRecorder.supported = ['audio/webm;codecs=opus', 'audio/webm']
    stubBrowser()
    await usePracticeStore().dispose()
    useRecorderStore().setPermission('unknown')
  })
  afterEach(() => vi.unstubAllGlobals())

  it('explains a refused microphone and offers the upload instead', async () => {
    getUserMedia.mockRejectedValueOnce(Object.assign(new Error('denied'), { name: 'NotAllowedError' }))
    const w = await mountSuspended(TakeRecorder, { props: { tempo: 60, guide, part: 'Alto' } })
    await w.find('button').trigger('click')
    await flushPromises()
    const help = w.find('[data-testid="mic-help"]')
    expect(help.attributes('role')).toBe('alert')
    expect(help.text()).toContain('Microphone blocked')
    expect(help.text()).toContain('allow the microphone, then reload')
    await help.find('button').trigger('click')
    expect(w.emitted('use-upload')).toHaveLength(1)
    expect(w.find('button').text()).toBe('Try the microphone again')
  })

  it.each([
    ['NotFoundError', /No microphone was found/],
    ['NotReadableError', /in use by another program/],
  ])('explains %s', async (name, text) => {
    getUserMedia.mockRejectedValueOnce(Object.assign(new Error('x'), { name }))
    const w = await mountSuspended(TakeRecorder, { props: { tempo: 60, guide } })
    await w.find('button').trigger('click')
    await flushPromises()
    expect(w.find('[data-testid="mic-help"]').text()).toMatch(text)
  })

  it('asks for a plain microphone signal, lists the inputs and meters without routing the mic to the speakers', async () => {
    const w = await mountSuspended(TakeRecorder, { props: { tempo: 60, guide } })
    await w.find('button').trigger('click')
    await flushPromises()
    // Processing meant for calls bends pitch and level: all three off.
    expect(getUserMedia.mock.calls[0]![0]).toMatchObject({ audio: { echoCancellation: false, noiseSuppression: false, autoGainControl: false } })
    const options = w.findAll('select')[0]!.findAll('option').map(o => o.text())
    expect(options).toEqual(['Browser default', 'USB condenser', 'Microphone 2'])
    const meterCtx = FakeAudioContext.instances[0]!
    const src = meterCtx.of('stream-source')[0]!
    expect((src as unknown as { mediaStream: unknown }).mediaStream).toBe(stream)
    expect(src.outputs.map(n => n.kind)).toEqual(['analyser'])
    expect(meterCtx.of('analyser')[0]!.outputs).toEqual([])
    expect(w.find('meter').exists()).toBe(true)
    expect(w.find('label[for]').text()).toBe('Microphone')
  })

  it('records the microphone stream only, with the count-in and guide tones in the headphones, then plays it back', async () => {
    const w = await mountSuspended(TakeRecorder, { props: { tempo: 120, guide, part: 'Alto 2' } })
    await w.find('button').trigger('click')
    await flushPromises()
    const start = w.findAll('button').find(b => b.text().includes('Start recording'))!
    await start.trigger('click')
    await flushPromises()
    const rec = FakeMediaRecorder.all[0]!
    // The recorder gets the microphone's own stream: nothing from the tone player is mixed in.
    expect(rec.stream).toBe(stream)
    expect(rec.options.mimeType).toBe('audio/webm;codecs=opus')
    expect(rec.state).toBe('recording')
    // Tones play in a separate context: 4 count-in clicks and the two guide notes.
    const toneCtx = FakeAudioContext.instances.find(c => c.of('oscillator').length)!
    expect(toneCtx.of('stream-source')).toEqual([])
    const oscs = toneCtx.of<FakeOscillator>('oscillator')
    expect(oscs.filter(o => o.type === 'triangle')).toHaveLength(4)
    expect(oscs.filter(o => o.type !== 'triangle').map(o => o.frequency.value)).toEqual([293.66, 329.63])
    // Stop, listen back, use it.
    await w.findAll('button').find(b => b.text() === 'Stop')!.trigger('click')
    await flushPromises()
    expect(rec.state).toBe('inactive')
    expect(w.find('[data-testid="listen-back"]').attributes('src')).toBe('blob:take-1')
    await w.findAll('button').find(b => b.text() === 'Use this take')!.trigger('click')
    const file = w.emitted('recorded')![0]![0] as File
    expect(file.type).toBe('audio/webm')
    expect(file.name).toMatch(/^Alto_2-.*\.webm$/)
    expect(file.size).toBe(3000)
  })

  it('discards a recording to record again', async () => {
    const w = await mountSuspended(TakeRecorder, { props: { tempo: 60, guide } })
    await w.find('button').trigger('click')
    await flushPromises()
    useRecorderStore().countInBeats = 0
    await w.findAll('button').find(b => b.text().includes('Start recording'))!.trigger('click')
    await flushPromises()
    await w.findAll('button').find(b => b.text() === 'Stop')!.trigger('click')
    await flushPromises()
    await w.findAll('button').find(b => b.text() === 'Discard it')!.trigger('click')
    expect(w.emitted('discarded')).toHaveLength(1)
    expect(URL.revokeObjectURL).toHaveBeenCalledWith('blob:take-1')
    expect(w.find('[data-testid="listen-back"]').exists()).toBe(false)
    expect(w.findAll('button').some(b => b.text().includes('Start recording'))).toBe(true)
  })

  it('says so when the browser cannot record in a format the analysis reads', async () => {
    FakeMediaRecorder.supported = ['audio/x-caf'] // a format the analysis does not read
    const w = await mountSuspended(TakeRecorder, { props: { tempo: 60, guide } })
    await w.find('button').trigger('click')
    await flushPromises()
    await w.findAll('button').find(b => b.text().includes('Start recording'))!.trigger('click')
    await flushPromises()
    expect(FakeMediaRecorder.all).toHaveLength(0)
    expect(w.text()).toContain('cannot record in a format Driftline reads')
  })

  it('needs a secure address', async () => {
    Object.defineProperty(window, 'isSecureContext', { value: false, configurable: true })
    const w = await mountSuspended(TakeRecorder, { props: { tempo: 60, guide } })
    await w.find('button').trigger('click')
    await flushPromises()
    expect(getUserMedia).not.toHaveBeenCalled()
    expect(w.find('[data-testid="mic-help"]').text()).toContain('secure (https) address')
  })

  it('records MP4/AAC where the browser offers nothing else (Safari), and Opus first everywhere else', () => {
    // What each browser's MediaRecorder.isTypeSupported answers (common practice: Safari records
    // only audio/mp4; Chromium audio/webm with Opus).
    const safari = (m: string) => m.startsWith('audio/mp4')
    const chromium = (m: string) => m.startsWith('audio/webm')
    expect(pickRecordMime(safari)).toBe('audio/mp4;codecs=mp4a.40.2')
    expect(pickRecordMime(chromium)).toBe('audio/webm;codecs=opus')
    expect(pickRecordMime(() => false)).toBeNull()
  })
})

// Every decoder on the committed fixtures (tests/fixtures/audio, made by
// scripts/make-audio-fixtures.ts with Debian's flac, lame, oggenc, opusenc, mkvmerge and ffmpeg).
// The truth for each file (tone, sample rate, channels, length) is what the encoders were given,
// listed in tests/fixtures/audio/README.md. The tone is measured two independent ways: counting
// positive-going zero crossings with linear interpolation (common practice for a pure tone) and
// the McLeod pitch method of the `pitchy` package from the npm registry.
import { readFileSync } from 'node:fs'
import { dirname, join } from 'node:path'
import { fileURLToPath } from 'node:url'
import { PitchDetector } from 'pitchy'
import { describe, expect, it } from 'vitest'
import { decodeAudio, detectFormat, opusPacketSamples, type AudioFormat, type DecodedAudio } from '../../../server/analysis/decode'
import { ANALYSIS_ERROR_MESSAGE, ANALYSIS_ERROR_STATUS, AnalysisError, isAnalysisError, type AnalysisErrorCode } from '../../../server/analysis/errors'
import { encodeWav } from '../../../server/analysis/wav'

const dir = join(dirname(fileURLToPath(import.meta.url)), '..', '..', 'fixtures', 'audio')
const fixture = (name: string) => new Uint8Array(readFileSync(join(dir, name)))
const cents = (f: number, ref: number) => 1200 * Math.log2(f / ref)

/** Tone frequency from positive-going zero crossings over the middle 60 % (linear interpolation). */
function zeroCrossingHz (x: Float32Array, rate: number): number {
  const from = Math.floor(x.length * 0.2)
  const to = Math.floor(x.length * 0.8)
  let first = -1
  let last = -1
  let count = 0
  for (let i = from + 1; i < to; i++) {
    const a = x[i - 1]!
    const b = x[i]!
    if (a < 0 && b >= 0) {
      const t = i - 1 + a / (a - b)
      if (first < 0) first = t
      last = t
      count++
    }
  }
  return ((count - 1) * rate) / (last - first)
}

/** Tone frequency by pitchy's McLeod pitch method on a window from the middle of the take. */
function mcleodHz (x: Float32Array, rate: number): number {
  let size = 1024
  while (size * 2 <= x.length * 0.6 && size < 8192) size *= 2
  const start = Math.floor((x.length - size) / 2)
  const [hz] = PitchDetector.forFloat32Array(size).findPitch(x.subarray(start, start + size), rate)
  return hz
}

/** RMS over the middle 60 % times √2: the amplitude of a sine. */
function sineAmplitude (x: Float32Array): number {
  const from = Math.floor(x.length * 0.2)
  const to = Math.floor(x.length * 0.8)
  let s = 0
  for (let i = from; i < to; i++) s += x[i]! * x[i]!
  return Math.sqrt((2 * s) / (to - from))
}

interface Row { file: string, format: AudioFormat, hz: number, rate: number, channels: number, minS: number, maxS: number, amp: number, lossy: boolean }
const row = (file: string, format: AudioFormat, hz: number, rate: number, channels: number, s: number, amps: number[], extraS = 0.002): Row => ({
  file, format, hz, rate, channels, minS: s - 0.002, maxS: s + extraS, amp: amps.reduce((a, b) => a + b, 0) / amps.length, lossy: !['wav', 'flac'].includes(format),
})
// MPEG Layer III may keep encoder delay and padding when no gapless tag is read: up to 3 frames.
const mp3Slack = (rate: number) => (3 * (rate >= 32000 ? 1152 : 576)) / rate
// Recorder-style WebM signals no end padding (as browsers do): up to one 20-ms packet extra.
const webmSlack = 0.021
// A fragmented MP4 carries no edit list to trim the AAC encoder's padding: up to one 1024-sample frame.
const fragSlack = 1024 / 48000

const DECODABLE: Row[] = [
  row('wav-pcm8-mono-8000-440.wav', 'wav', 440, 8000, 1, 1, [0.5]),
  row('wav-pcm16-mono-44100-440.wav', 'wav', 440, 44100, 1, 1, [0.5]),
  row('wav-pcm16-stereo-48000-220.wav', 'wav', 220, 48000, 2, 0.5, [0.5, 0.3]),
  row('wav-pcm24-mono-96000-440.wav', 'wav', 440, 96000, 1, 0.25, [0.5]),
  row('wav-pcm32-mono-22050-220.wav', 'wav', 220, 22050, 1, 0.5, [0.5]),
  row('wav-float32-stereo-16000-440.wav', 'wav', 440, 16000, 2, 0.5, [0.5, 0.3]),
  row('wav-float64-mono-11025-220.wav', 'wav', 220, 11025, 1, 0.5, [0.5]),
  row('wav-pcm16-mono-192000-440.wav', 'wav', 440, 192000, 1, 0.25, [0.5]),
  row('wav-ext-pcm16-6ch-8000-440.wav', 'wav', 440, 8000, 6, 0.5, [0.6, 0.5, 0.4, 0.3, 0.2, 0.1]),
  row('wav-ext-pcm24-stereo-44100-220.wav', 'wav', 220, 44100, 2, 0.25, [0.5, 0.3]),
  row('wav-ext-float32-stereo-32000-440.wav', 'wav', 440, 32000, 2, 0.25, [0.5, 0.3]),
  row('wav-rf64-pcm16-mono-8000-440.wav', 'wav', 440, 8000, 1, 1, [0.5]),
  row('wav-pcm16-mono-8000-220-list-chunk.wav', 'wav', 220, 8000, 1, 1, [0.5]),
  row('flac-mono-44100-440.flac', 'flac', 440, 44100, 1, 1, [0.5]),
  row('flac-stereo-96000-220.flac', 'flac', 220, 96000, 2, 0.5, [0.5, 0.3]),
  row('flac-24bit-mono-192000-440.flac', 'flac', 440, 192000, 1, 0.25, [0.5]),
  row('flac-mono-8000-220.flac', 'flac', 220, 8000, 1, 1, [0.5]),
  row('mp3-mono-44100-440.mp3', 'mp3', 440, 44100, 1, 1, [0.5], mp3Slack(44100)),
  row('mp3-stereo-48000-220.mp3', 'mp3', 220, 48000, 2, 1, [0.5, 0.3], mp3Slack(48000)),
  row('mp3-mono-8000-440.mp3', 'mp3', 440, 8000, 1, 1, [0.5], mp3Slack(8000)),
  row('mp3-id3-mono-44100-220.mp3', 'mp3', 220, 44100, 1, 1, [0.5], mp3Slack(44100)),
  row('vorbis-mono-44100-440.ogg', 'ogg-vorbis', 440, 44100, 1, 1, [0.5]),
  row('vorbis-stereo-48000-220.ogg', 'ogg-vorbis', 220, 48000, 2, 1, [0.5, 0.3]),
  row('vorbis-mono-8000-220.ogg', 'ogg-vorbis', 220, 8000, 1, 1, [0.5]),
  // Opus always decodes at 48 kHz (RFC 7845 §5.1: the OpusHead input rate is informational).
  row('opus-mono-48000-440.opus', 'ogg-opus', 440, 48000, 1, 1, [0.5]),
  row('opus-stereo-44100src-220.opus', 'ogg-opus', 220, 48000, 2, 1, [0.5, 0.3]),
  row('opus-mono-8000src-440.opus', 'ogg-opus', 440, 48000, 1, 1, [0.5]),
  row('webm-opus-mono-48000-440.webm', 'webm-opus', 440, 48000, 1, 1, [0.5]),
  row('webm-recorder-opus-mono-48000-440.webm', 'webm-opus', 440, 48000, 1, 1, [0.5], webmSlack),
  row('webm-recorder-opus-stereo-48000-220.webm', 'webm-opus', 220, 48000, 2, 1, [0.5, 0.3], webmSlack),
  // AAC-LC in MP4 (ISO/IEC 14496-3): the moov's edit list trims the encoder's priming and padding.
  row('aac-mono-44100-440.m4a', 'mp4-aac', 440, 44100, 1, 1, [0.5]),
  row('aac-fragmented-stereo-48000-220.m4a', 'mp4-aac', 220, 48000, 2, 1, [0.5, 0.3], fragSlack),
]

const decoded = new Map<string, Promise<DecodedAudio>>()
const decodeFixture = (file: string) => {
  if (!decoded.has(file)) decoded.set(file, decodeAudio(fixture(file)))
  return decoded.get(file)!
}

describe('decodeAudio on every fixture format', () => {
  it.each(DECODABLE)('$file: format sniffed from the bytes', ({ file, format }) => {
    expect(detectFormat(fixture(file))).toBe(format)
  })

  it.each(DECODABLE)('$file: sample rate, channels and length read from the file', async (r) => {
    const a = await decodeFixture(r.file)
    expect(a.format).toBe(r.format)
    expect(a.sampleRate).toBe(r.rate)
    expect(a.channels).toBe(r.channels)
    expect(a.durationS).toBeGreaterThanOrEqual(r.minS)
    expect(a.durationS).toBeLessThanOrEqual(r.maxS)
    expect(a.samples.length).toBe(Math.round(a.durationS * a.sampleRate))
    expect(a.truncated).toBeUndefined()
  })

  it.each(DECODABLE)('$file: the tone is at its true frequency (zero crossings and pitchy agree)', async (r) => {
    const a = await decodeFixture(r.file)
    // A wrong sample rate would move the tone by whole semitones (48 vs 44.1 kHz is 147 cents).
    expect(Math.abs(cents(zeroCrossingHz(a.samples, a.sampleRate), r.hz))).toBeLessThan(0.5)
    expect(Math.abs(cents(mcleodHz(a.samples, a.sampleRate), r.hz))).toBeLessThan(5)
  })

  it.each(DECODABLE)('$file: mono mix is the channel mean; level figures are sane; no NaN', async (r) => {
    const a = await decodeFixture(r.file)
    const tol = r.lossy ? 0.06 : 0.005
    expect(sineAmplitude(a.samples) / r.amp).toBeGreaterThan(1 - tol)
    expect(sineAmplitude(a.samples) / r.amp).toBeLessThan(1 + tol)
    expect(a.clippedShare).toBe(0)
    expect(a.peak).toBeGreaterThan(0.45)
    expect(a.peak).toBeLessThan(r.lossy ? 0.7 : 0.61)
    expect(a.samples.every(Number.isFinite)).toBe(true)
  })

  it('reads 48 kHz as 48 kHz in every container (never an assumed 44.1 kHz)', async () => {
    const at48 = DECODABLE.filter(r => r.rate === 48000)
    expect(at48.map(r => r.format).sort()).toEqual(expect.arrayContaining(['wav', 'mp3', 'ogg-vorbis', 'ogg-opus', 'webm-opus']))
    for (const r of at48) {
      const a = await decodeFixture(r.file)
      expect(a.sampleRate).toBe(48000)
      const hz = zeroCrossingHz(a.samples, a.sampleRate)
      expect(Math.abs(hz - r.hz)).toBeLessThan(0.05)
      expect(Math.abs(hz * (44100 / 48000) - r.hz)).toBeGreaterThan(15) // what a misread rate would show
    }
  })

  it('trims the end padding a WebM file signals with DiscardPadding (mkvmerge file is exactly 1 s)', async () => {
    const a = await decodeFixture('webm-opus-mono-48000-440.webm')
    expect(Math.abs(a.durationS - 1)).toBeLessThan(0.001)
  })

  it('applies the Opus pre-skip in WebM (OpusHead pre-skip 312 samples, RFC 7845 §4.2)', async () => {
    // Same packets in Ogg and in recorder-style WebM: the decoded starts line up sample for sample.
    const ogg = await decodeFixture('opus-mono-48000-440.opus')
    const webm = await decodeFixture('webm-recorder-opus-mono-48000-440.webm')
    for (const i of [100, 1000, 20000, 47000]) expect(webm.samples[i]).toBeCloseTo(ogg.samples[i]!, 6)
  })
})

describe('Opus output rate', () => {
  it.each([8000, 16000, 24000] as const)('decodes Ogg and WebM Opus natively at %i Hz when asked (libopus output rates, RFC 6716 §2)', async (rate) => {
    for (const file of ['opus-mono-48000-440.opus', 'webm-opus-mono-48000-440.webm', 'webm-recorder-opus-stereo-48000-220.webm']) {
      const a = await decodeAudio(fixture(file), { opusRate: rate })
      expect(a.sampleRate).toBe(rate)
      const truth = file.includes('220') ? 220 : 440
      expect(Math.abs(cents(zeroCrossingHz(a.samples, rate), truth))).toBeLessThan(0.5)
      expect(a.durationS).toBeGreaterThan(0.999)
      expect(a.durationS).toBeLessThan(1 + webmSlack)
    }
  })
  it('rejects a rate libopus cannot produce', async () => {
    await expect(decodeAudio(fixture('opus-mono-48000-440.opus'), { opusRate: 44100 as 48000 })).rejects.toThrow(RangeError)
  })
})

describe('cut-off files', () => {
  const CUT: Array<[string, AudioFormat, number, number, number]> = [
    // file, format, tone, rate, min seconds expected
    ['wav-truncated-1.5s-of-2s-8000-440.wav', 'wav', 440, 8000, 1.5],
    ['flac-truncated-70pct-of-2s-220.flac', 'flac', 220, 44100, 1],
    ['mp3-truncated-70pct-of-2s-440.mp3', 'mp3', 440, 44100, 1.2],
    ['opus-truncated-70pct-of-2s-440.opus', 'ogg-opus', 440, 48000, 1.2],
    ['webm-recorder-truncated-70pct-of-2s-440.webm', 'webm-opus', 440, 48000, 1.3],
    ['aac-truncated-70pct-of-2s-440.m4a', 'mp4-aac', 440, 44100, 1.2],
  ]
  it.each(CUT)('%s: what survives is decoded and flagged truncated', async (file, format, hz, rate, minS) => {
    const a = await decodeAudio(fixture(file))
    expect(a.format).toBe(format)
    expect(a.truncated).toBe(true)
    expect(a.sampleRate).toBe(rate)
    expect(a.durationS).toBeGreaterThanOrEqual(minS)
    expect(a.durationS).toBeLessThan(1.5 + 0.01)
    expect(Math.abs(cents(zeroCrossingHz(a.samples, rate), hz))).toBeLessThan(0.5)
  })

  it('a WAV cut to under 1 s is corrupt', async () => {
    await expect(decodeAudio(fixture('wav-truncated-0.25s-of-2s-8000-440.wav'))).rejects.toMatchObject({ code: 'corrupt', status: 422 })
  })
})

async function codeOf (bytes: Uint8Array, opts?: Parameters<typeof decodeAudio>[1]): Promise<AnalysisError> {
  try {
    await decodeAudio(bytes, opts)
  } catch (err) {
    expect(err).toBeInstanceOf(AnalysisError)
    return err as AnalysisError
  }
  throw new Error('expected decodeAudio to reject')
}

describe('bad input gets a stable code', () => {
  const BAD: Array<[string, AnalysisErrorCode]> = [
    ['empty.wav', 'empty'],
    ['wav-no-frames.wav', 'empty'],
    ['not-audio-text.wav', 'not_audio'],
    ['not-audio-noise.bin', 'not_audio'],
    ['corrupt-zero-channels.wav', 'corrupt'],
    ['corrupt-flac-header-only.flac', 'corrupt'],
    ['corrupt-opus-headers-only.opus', 'corrupt'],
    ['corrupt-middle.flac', 'corrupt'],
    ['corrupt-middle.mp3', 'corrupt'],
    ['corrupt-middle.opus', 'corrupt'],
    ['corrupt-middle.webm', 'corrupt'],
    ['corrupt-middle.m4a', 'corrupt'],
  ]
  it.each(BAD)('%s → %s', async (file, code) => {
    const err = await codeOf(fixture(file))
    expect(err.code).toBe(code)
    expect(err.status).toBe(ANALYSIS_ERROR_STATUS[code])
    expect(err.message).toBe(ANALYSIS_ERROR_MESSAGE[code])
  })

  it('detectFormat names nothing for text, noise and empty input', () => {
    expect(detectFormat(fixture('not-audio-text.wav'))).toBeNull()
    expect(detectFormat(fixture('not-audio-noise.bin'))).toBeNull()
    expect(detectFormat(new Uint8Array(0))).toBeNull()
  })

  it('too_large is decided from the byte count before any decoding', async () => {
    const err = await codeOf(fixture('not-audio-noise.bin'), { maxBytes: 1000 })
    expect(err.code).toBe('too_large')
    expect(err.status).toBe(413)
  })

  it('too_long for WAV comes from the header, before the samples are read', async () => {
    // A header promising 30 min of 48 kHz stereo 16-bit with only 2 s of data present.
    const w = encodeWav([new Float32Array(96000), new Float32Array(96000)], 48000, { bits: 16 })
    new DataView(w.buffer).setUint32(40, 30 * 60 * 48000 * 4, true)
    const err = await codeOf(w)
    expect(err.code).toBe('too_long')
    expect(err.status).toBe(413)
    expect(err.details?.durationS).toBe(1800)
  })

  it.each(['flac-mono-44100-440.flac', 'mp3-mono-44100-440.mp3', 'vorbis-mono-44100-440.ogg', 'opus-mono-48000-440.opus', 'webm-recorder-opus-mono-48000-440.webm', 'aac-mono-44100-440.m4a'])(
    '%s longer than maxDurationS → too_long', async (file) => {
      expect((await codeOf(fixture(file), { maxDurationS: 0.5 })).code).toBe('too_long')
    })

  it('sample rates outside 8–192 kHz are refused, not resampled or guessed', async () => {
    expect((await codeOf(encodeWav(new Float32Array(8000), 4000))).details?.reason).toBe('unsupported_sample_rate')
    expect((await codeOf(encodeWav(new Float32Array(8000), 384000))).code).toBe('not_audio')
    const zero = encodeWav(new Float32Array(8000), 8000)
    new DataView(zero.buffer).setUint32(24, 0, true)
    expect((await codeOf(zero)).code).toBe('corrupt')
  })

  it('a WAV with an encoding we do not read (IMA ADPCM, tag 0x11) is not_audio', async () => {
    const w = encodeWav(new Float32Array(8000), 8000)
    new DataView(w.buffer).setUint16(20, 0x11, true)
    const err = await codeOf(w)
    expect(err.code).toBe('not_audio')
    expect(err.details?.formatTag).toBe(0x11)
  })

  it('RIFF files that are not WAVE (an AVI header) are not_audio', async () => {
    const w = encodeWav(new Float32Array(100), 8000)
    w.set([0x41, 0x56, 0x49, 0x20], 8) // 'AVI '
    expect((await codeOf(w)).code).toBe('not_audio')
  })

  it('a few non-finite float samples become silence; many make the file corrupt', async () => {
    const w = encodeWav(new Float32Array(10000).fill(0.25), 8000, { float: true, bits: 32 })
    const dataAt = w.length - 40000
    const v = new DataView(w.buffer)
    v.setFloat32(dataAt + 4 * 10, Number.NaN, true)
    v.setFloat32(dataAt + 4 * 20, Number.POSITIVE_INFINITY, true)
    const ok = await decodeAudio(w)
    expect(ok.samples[10]).toBe(0)
    expect(ok.samples[20]).toBe(0)
    expect(ok.samples.every(Number.isFinite)).toBe(true)
    for (let i = 0; i < 100; i++) v.setFloat32(dataAt + 4 * (100 + i), Number.NaN, true)
    expect((await codeOf(w)).code).toBe('corrupt')
  })

  it('a Matroska file whose audio is not Opus is not_audio, one with no audio track is corrupt', async () => {
    const el = (id: number[], body: number[]) => [...id, 0x80 | body.length, ...body]
    const str = (s: string) => Array.from(s, c => c.charCodeAt(0))
    const head = el([0x1a, 0x45, 0xdf, 0xa3], el([0x42, 0x82], str('webm')))
    const tracks = (codec: string) => el([0x16, 0x54, 0xae, 0x6b], el([0xae], [...el([0xd7], [1]), ...el([0x83], [2]), ...el([0x86], str(codec))]))
    const file = (body: number[]) => Uint8Array.from([...head, ...el([0x18, 0x53, 0x80, 0x67], body)])
    const vorbis = file(tracks('A_VORBIS'))
    expect(detectFormat(vorbis)).toBeNull()
    expect((await codeOf(vorbis)).details?.codec).toBe('A_VORBIS')
    expect(detectFormat(file(tracks('A_OPUS')))).toBe('webm-opus')
    expect((await codeOf(file([])))).toMatchObject({ code: 'corrupt' })
  })

  it('an MP4 whose audio is not AAC is not_audio; one cut before its moov ends is corrupt', async () => {
    const b = fixture('aac-mono-44100-440.m4a')
    expect(detectFormat(b)).toBe('mp4-aac')
    // The sample entry type names the codec (ISO/IEC 14496-12 §8.5.2): make it Apple Lossless.
    const alac = b.slice()
    const at = Buffer.from(alac).indexOf('mp4a')
    expect(at).toBeGreaterThan(0)
    alac.set([0x61, 0x6c, 0x61, 0x63], at) // 'alac'
    expect(detectFormat(alac)).toBeNull()
    const err = await codeOf(alac)
    expect(err.code).toBe('not_audio')
    expect(err.details?.codec).toBe('alac')
    // ftyp and the start of the moov only: the sniff says MP4 (more may come), the decoder says corrupt.
    const head = b.subarray(0, 200)
    expect(detectFormat(head)).toBe('mp4-aac')
    expect((await codeOf(head)).code).toBe('corrupt')
    // An ftyp box alone, with a brand we do not take, is not audio we read.
    const other = Uint8Array.from([0, 0, 0, 16, ...Buffer.from('ftypheic'), 0, 0, 0, 0])
    expect(detectFormat(other)).toBeNull()
  })

  it('detectFormat works on the first bytes of a file (an upload still arriving)', () => {
    for (const r of DECODABLE) {
      const b = fixture(r.file)
      // mkvmerge leaves a 4 KB Void before its Tracks, so a WebM head needs a little more.
      expect(detectFormat(b.subarray(0, Math.min(b.length, 8192)))).toBe(r.format)
    }
    expect(detectFormat(fixture('webm-opus-mono-48000-440.webm').subarray(0, 2000))).toBeNull()
  })

  it('random damage to any fixture gives a result without NaN or an AnalysisError, never a crash', async () => {
    let seed = 7
    const rand = () => { seed = (seed * 1103515245 + 12345) >>> 0; return seed / 2 ** 32 }
    const files = DECODABLE.filter((_, i) => i % 3 === 0).map(r => r.file)
    for (const file of files) {
      const base = fixture(file)
      for (let k = 0; k < 8; k++) {
        const b = base.slice()
        const span = k % 2 ? 200 : b.length // header bytes, or anywhere
        for (let i = 0; i < 1 + k * 3; i++) b[Math.floor(rand() * Math.min(span, b.length))] = Math.floor(rand() * 256)
        try {
          const a = await decodeAudio(b)
          expect(a.samples.every(Number.isFinite)).toBe(true)
          expect(a.sampleRate).toBeGreaterThanOrEqual(8000)
        } catch (err) {
          expect(isAnalysisError(err), `${file} #${k}: ${String(err)}`).toBe(true)
        }
      }
    }
  })

  it('never throws anything but an AnalysisError on damaged bytes (every fixture cut at many points)', async () => {
    for (const file of ['flac-mono-44100-440.flac', 'mp3-mono-44100-440.mp3', 'vorbis-mono-44100-440.ogg', 'opus-mono-48000-440.opus', 'webm-opus-mono-48000-440.webm', 'wav-pcm16-mono-8000-220-list-chunk.wav', 'aac-mono-44100-440.m4a', 'aac-fragmented-stereo-48000-220.m4a']) {
      const b = fixture(file)
      for (const cut of [1, 5, 13, 40, 100, 300, 1000]) {
        if (cut >= b.length) continue
        try {
          const a = await decodeAudio(b.subarray(0, cut))
          expect(a.samples.every(Number.isFinite)).toBe(true)
        } catch (err) {
          expect(isAnalysisError(err)).toBe(true)
        }
      }
    }
  })
})

describe('input handling details', () => {
  it('reads a WAV from a view at an odd byte offset (no alignment assumption)', async () => {
    const w = fixture('wav-pcm16-stereo-48000-220.wav')
    const padded = new Uint8Array(w.length + 1)
    padded.set(w, 1)
    const a = await decodeAudio(padded.subarray(1))
    const b = await decodeFixture('wav-pcm16-stereo-48000-220.wav')
    expect(a.samples.length).toBe(b.samples.length)
    let same = true
    for (let i = 0; i < a.samples.length; i++) if (a.samples[i] !== b.samples[i]) same = false
    expect(same).toBe(true)
  })

  it('reads a WAV whose writer streamed it and left the data size at 0 or 0xFFFFFFFF', async () => {
    for (const placeholder of [0, 0xffffffff]) {
      const w = encodeWav(new Float32Array(16000).fill(0.25), 16000, { bits: 16 })
      new DataView(w.buffer).setUint32(40, placeholder, true)
      const a = await decodeAudio(w)
      expect(a.durationS).toBe(1)
      expect(a.truncated).toBeUndefined()
      expect(a.samples[8000]).toBe(0.25)
    }
  })

  it('reports the clipped share and the peak of a hard-clipped take', async () => {
    const n = 8000
    const x = new Float32Array(n)
    for (let i = 0; i < n; i++) x[i] = Math.max(-1, Math.min(1, 2 * Math.sin((2 * Math.PI * 220 * i) / 8000)))
    const a = await decodeAudio(encodeWav(x, 8000, { bits: 16 }))
    // A sine at twice full scale sits on the rails where |sin| ≥ 1/2: two thirds of the time.
    expect(a.clippedShare).toBeGreaterThan(0.6)
    expect(a.clippedShare).toBeLessThan(0.72)
    expect(a.peak).toBeCloseTo(1, 3)
  })

  it('counts Opus packet lengths from the TOC byte (RFC 6716 §3.1)', () => {
    // TOC = config << 3 | stereo << 2 | code; durations from the configuration table.
    expect(opusPacketSamples(Uint8Array.of(0xf8))).toBe(960) // config 31 CELT FB 20 ms, code 0: one frame
    expect(opusPacketSamples(Uint8Array.of(0x10))).toBe(1920) // config 2 SILK NB 40 ms
    expect(opusPacketSamples(Uint8Array.of(0x18))).toBe(2880) // config 3 SILK NB 60 ms
    expect(opusPacketSamples(Uint8Array.of(0x79))).toBe(1920) // config 15 hybrid FB 20 ms, code 1: two frames
    expect(opusPacketSamples(Uint8Array.of(0x80))).toBe(120) // config 16 CELT NB 2.5 ms
    expect(opusPacketSamples(Uint8Array.of(0xfb, 0x03))).toBe(2880) // code 3 with a count byte of 3
    expect(opusPacketSamples(new Uint8Array(0))).toBe(0)
  })
})

describe('AnalysisError', () => {
  it.each(Object.entries(ANALYSIS_ERROR_STATUS))('%s maps to HTTP %i', (code, status) => {
    const e = new AnalysisError(code as AnalysisErrorCode, { x: 1 })
    expect(e).toBeInstanceOf(Error)
    expect(e.status).toBe(status)
    expect(e.message.length).toBeGreaterThan(0)
    expect(e.details).toEqual({ x: 1 })
  })
  it('uses 415 for not_audio, 413 for size and length, 400 for an unknown part, 422 for the rest', () => {
    expect(ANALYSIS_ERROR_STATUS).toEqual({
      not_audio: 415, too_large: 413, too_long: 413, unknown_part: 400,
      corrupt: 422, empty: 422, silent: 422, clipped: 422, no_holds: 422,
    })
  })
})

// WAV writer and reader checked against the Microsoft RIFF/WAVE specification (Multimedia
// Programming Interface and Data Specifications 1.0) and its WAVE_FORMAT_EXTENSIBLE addendum,
// and cross-checked with an independent WAV decoder from the npm registry (@audio/decode).
import { describe, expect, it } from 'vitest'
import refDecode from '@audio/decode'
import { encodeWav, type WavFormat } from '../../../server/analysis/wav'
import { decodeAudio } from '../../../server/analysis/decode'

const ascii = (b: Uint8Array, at: number, n: number) => String.fromCharCode(...b.subarray(at, at + n))
const view = (b: Uint8Array) => new DataView(b.buffer, b.byteOffset, b.byteLength)

/** A deterministic test signal inside ±0.9 (a sum of two sines). */
function signal (n: number, seed = 1): Float32Array {
  const x = new Float32Array(n)
  for (let i = 0; i < n; i++) x[i] = 0.6 * Math.sin(i * 0.0731 * seed) + 0.3 * Math.sin(i * 0.3113 + seed)
  return x
}

describe('encodeWav header layout', () => {
  it('writes the canonical 44-byte PCM header (RIFF/WAVE spec, fmt chunk of WAVE_FORMAT_PCM)', () => {
    const w = encodeWav([new Float32Array(10), new Float32Array(10)], 48000, { bits: 16 })
    const v = view(w)
    expect(ascii(w, 0, 4)).toBe('RIFF')
    expect(v.getUint32(4, true)).toBe(w.length - 8) // RIFF size excludes 'RIFF' and the size field
    expect(ascii(w, 8, 4)).toBe('WAVE')
    expect(ascii(w, 12, 4)).toBe('fmt ')
    expect(v.getUint32(16, true)).toBe(16)
    expect(v.getUint16(20, true)).toBe(1) // WAVE_FORMAT_PCM
    expect(v.getUint16(22, true)).toBe(2) // channels
    expect(v.getUint32(24, true)).toBe(48000)
    expect(v.getUint32(28, true)).toBe(48000 * 4) // nAvgBytesPerSec = rate × block align
    expect(v.getUint16(32, true)).toBe(4) // nBlockAlign = channels × bytes per sample
    expect(v.getUint16(34, true)).toBe(16)
    expect(ascii(w, 36, 4)).toBe('data')
    expect(v.getUint32(40, true)).toBe(40)
    expect(w.length).toBe(44 + 40)
  })

  it('gives float files format tag 3, cbSize 0 and the fact chunk the spec asks of non-PCM data', () => {
    const w = encodeWav(new Float32Array(7), 22050, { float: true, bits: 64 })
    const v = view(w)
    expect(v.getUint32(16, true)).toBe(18)
    expect(v.getUint16(20, true)).toBe(3) // WAVE_FORMAT_IEEE_FLOAT
    expect(v.getUint16(34, true)).toBe(64)
    expect(v.getUint16(36, true)).toBe(0) // cbSize
    expect(ascii(w, 38, 4)).toBe('fact')
    expect(v.getUint32(46, true)).toBe(7) // dwSampleLength in frames
    expect(ascii(w, 50, 4)).toBe('data')
    expect(v.getUint32(54, true)).toBe(56)
  })

  it('writes WAVE_FORMAT_EXTENSIBLE with valid bits, a 5.1 channel mask and the KSDATAFORMAT_SUBTYPE_PCM GUID', () => {
    const chans = Array.from({ length: 6 }, () => new Float32Array(3))
    const w = encodeWav(chans, 44100, { bits: 24, extensible: true })
    const v = view(w)
    expect(v.getUint32(16, true)).toBe(40)
    expect(v.getUint16(20, true)).toBe(0xfffe)
    expect(v.getUint16(32, true)).toBe(18) // 6 × 3 bytes
    expect(v.getUint16(36, true)).toBe(22) // cbSize
    expect(v.getUint16(38, true)).toBe(24) // wValidBitsPerSample
    expect(v.getUint32(40, true)).toBe(0x3f) // FL FR FC LFE BL BR
    // {00000001-0000-0010-8000-00AA00389B71} stored little-endian in its first three fields.
    expect(Array.from(w.subarray(44, 60))).toEqual([0x01, 0x00, 0x00, 0x00, 0x00, 0x00, 0x10, 0x00, 0x80, 0x00, 0x00, 0xaa, 0x00, 0x38, 0x9b, 0x71])
  })

  it('defaults to the extensible header only for more than two channels (the addendum recommends it there)', () => {
    expect(view(encodeWav([new Float32Array(1), new Float32Array(1)], 8000)).getUint16(20, true)).toBe(1)
    expect(view(encodeWav([0, 1, 2].map(() => new Float32Array(1)), 8000)).getUint16(20, true)).toBe(0xfffe)
  })

  it('pads an odd-sized data chunk to a word boundary and counts the pad in the RIFF size', () => {
    const w = encodeWav(new Float32Array(5), 8000, { bits: 8 })
    expect(view(w).getUint32(40, true)).toBe(5) // the chunk size itself excludes the pad byte
    expect(w.length).toBe(44 + 6)
    expect(view(w).getUint32(4, true)).toBe(w.length - 8)
  })

  it('rejects formats the spec does not define', () => {
    expect(() => encodeWav(new Float32Array(4), 8000, { bits: 12 as WavFormat['bits'] })).toThrow(RangeError)
    expect(() => encodeWav(new Float32Array(4), 8000, { float: true, bits: 16 })).toThrow(RangeError)
    expect(() => encodeWav([new Float32Array(4), new Float32Array(3)], 8000)).toThrow(RangeError)
    expect(() => encodeWav(new Float32Array(4), 0)).toThrow(RangeError)
  })
})

describe('sample codes (RIFF/WAVE spec: 8-bit is unsigned with 128 as zero; wider PCM is signed two\'s complement)', () => {
  const dataOf = (w: Uint8Array) => w.subarray(44)

  it('8-bit: −1 → 0, 0 → 128, +1 → 255', () => {
    expect(Array.from(dataOf(encodeWav(Float32Array.of(-1, 0, 1), 8000, { bits: 8 })).subarray(0, 3))).toEqual([0, 128, 255])
  })
  it('16-bit: +1 → 0x7FFF, −1 → 0x8000, 0 → 0, little-endian', () => {
    const d = dataOf(encodeWav(Float32Array.of(1, -1, 0, 0.5), 8000, { bits: 16 }))
    expect(Array.from(d)).toEqual([0xff, 0x7f, 0x00, 0x80, 0x00, 0x00, 0x00, 0x40])
  })
  it('24-bit: +1 → 0x7FFFFF, −1 → 0x800000', () => {
    const d = dataOf(encodeWav(Float32Array.of(1, -1), 8000, { bits: 24 }))
    expect(Array.from(d)).toEqual([0xff, 0xff, 0x7f, 0x00, 0x00, 0x80])
  })
  it('32-bit: +1 → 0x7FFFFFFF, −0.5 → 0xC0000000', () => {
    const d = view(dataOf(encodeWav(Float32Array.of(1, -0.5), 8000, { bits: 32 })))
    expect(d.getInt32(0, true)).toBe(0x7fffffff)
    expect(d.getInt32(4, true)).toBe(-0x40000000)
  })
  it('clamps out-of-range input and writes non-finite input as silence', () => {
    const d = view(dataOf(encodeWav(Float32Array.of(3, -3, Number.NaN, Number.POSITIVE_INFINITY), 8000, { bits: 16 })))
    expect([d.getInt16(0, true), d.getInt16(2, true), d.getInt16(4, true), d.getInt16(6, true)]).toEqual([32767, -32768, 0, 0])
  })

  it('reads hand-written codes back as code / 2^(bits−1): 0x7FFF ≈ +1.0, 0x8000 = −1, 8-bit 128 = 0', async () => {
    // Build the files byte by byte so the reader is checked against the spec, not against encodeWav.
    const file = (bits: number, payload: number[]) => {
      const w = encodeWav(new Float32Array(payload.length / (bits / 8)), 8000, { bits: bits as WavFormat['bits'] })
      w.set(payload, 44)
      return w
    }
    // Decoding needs ≥ 1 sample; long enough files are not needed for exact codes.
    const r8 = await decodeAudio(file(8, [0, 128, 255, 64]))
    expect(Array.from(r8.samples)).toEqual([-1, 0, 127 / 128, -0.5])
    const r16 = await decodeAudio(file(16, [0xff, 0x7f, 0x00, 0x80, 0x00, 0x00, 0x01, 0x00]))
    expect(Array.from(r16.samples)).toEqual([32767 / 32768, -1, 0, 1 / 32768].map(Math.fround))
    const r24 = await decodeAudio(file(24, [0xff, 0xff, 0x7f, 0x00, 0x00, 0x80, 0x00, 0x00, 0xc0]))
    expect(Array.from(r24.samples)).toEqual([8388607 / 8388608, -1, -0.5].map(Math.fround))
    const r32 = await decodeAudio(file(32, [0xff, 0xff, 0xff, 0x7f, 0x00, 0x00, 0x00, 0x80]))
    expect(Array.from(r32.samples)).toEqual([Math.fround(2147483647 / 2147483648), -1])
  })
})

describe('round trips through encodeWav and decodeAudio', () => {
  // Quantisation error of a rounding quantiser is at most half a step, 2^−bits for full scale ±1.
  const cases: Array<[string, WavFormat, number]> = [
    ['PCM 8', { bits: 8 }, 2 ** -8],
    ['PCM 16', { bits: 16 }, 2 ** -16],
    ['PCM 24', { bits: 24 }, 2 ** -24],
    ['PCM 32', { bits: 32 }, 2 ** -24], // the Float32 result limits it to single precision
    ['float 32', { float: true, bits: 32 }, 0],
    ['float 64', { float: true, bits: 64 }, 2 ** -25],
    ['extensible PCM 16', { bits: 16, extensible: true }, 2 ** -16],
    ['extensible PCM 24', { bits: 24, extensible: true }, 2 ** -24],
    ['extensible float 32', { float: true, bits: 32, extensible: true }, 0],
  ]

  it.each(cases)('%s mono: every sample within half a quantisation step', async (_name, format, tol) => {
    const x = signal(12000)
    const r = await decodeAudio(encodeWav(x, 12000, format))
    expect(r.sampleRate).toBe(12000)
    expect(r.channels).toBe(1)
    expect(r.samples.length).toBe(x.length)
    let worst = 0
    for (let i = 0; i < x.length; i++) worst = Math.max(worst, Math.abs(r.samples[i]! - x[i]!))
    expect(worst).toBeLessThanOrEqual(tol + 1e-12)
  })

  it.each(cases)('%s stereo: the mono mix is the channel average', async (_name, format, tol) => {
    const a = signal(9000, 1)
    const b = signal(9000, 2)
    const r = await decodeAudio(encodeWav([a, b], 9000, format))
    expect(r.channels).toBe(2)
    let worst = 0
    for (let i = 0; i < a.length; i++) worst = Math.max(worst, Math.abs(r.samples[i]! - (a[i]! + b[i]!) / 2))
    expect(worst).toBeLessThanOrEqual(tol + 1e-7)
  })

  it.each(cases)('%s agrees with the registry WAV decoder (@audio/decode) per channel', async (_name, format) => {
    const a = signal(4000, 3)
    const b = signal(4000, 4)
    const ref = await refDecode(encodeWav([a, b], 16000, format))
    expect(ref.sampleRate).toBe(16000)
    expect(ref.channelData.length).toBe(2)
    // Decoders differ on the 8/16-bit positive scale (/2^(n−1) or /(2^(n−1)−1)): allow 2 steps,
    // and no finer than single precision, which both decoders return.
    const bits = format.float ? 24 : (format.bits ?? 16)
    const tol = Math.max(2 * 2 ** (1 - bits), 2 ** -22)
    let worst = 0
    for (let i = 0; i < a.length; i++) {
      worst = Math.max(worst, Math.abs(ref.channelData[0]![i]! - a[i]!), Math.abs(ref.channelData[1]![i]! - b[i]!))
    }
    expect(worst).toBeLessThanOrEqual(tol)
  })

  it('reads 8 channels (7.1 mask 0x63F) and any rate the header states', async () => {
    const chans = Array.from({ length: 8 }, (_, c) => new Float32Array(2000).fill((c - 3.5) / 8))
    const w = encodeWav(chans, 96000, { bits: 16 })
    expect(view(w).getUint32(40, true)).toBe(0x63f)
    const r = await decodeAudio(w)
    expect(r.channels).toBe(8)
    expect(r.sampleRate).toBe(96000)
    expect(Math.abs(r.samples[100]!)).toBeLessThan(1e-4) // symmetric levels average to zero
  })
})

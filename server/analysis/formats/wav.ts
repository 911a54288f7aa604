// WAV: Microsoft RIFF/WAVE, WAVE_FORMAT_EXTENSIBLE and EBU RF64, read by hand.
import { AnalysisError } from '../errors'
import { CLIP_LEVEL, type DecodedAudio, type Limits, MAX_MAGNITUDE, MAX_NON_FINITE_SHARE, checkDuration, checkSampleRate, isAscii, requireFrames } from './common'

// ---- WAV (Microsoft RIFF/WAVE, WAVE_FORMAT_EXTENSIBLE, EBU RF64) ----------------------------------

export const KSDATAFORMAT_TAIL = [0x00, 0x00, 0x00, 0x00, 0x10, 0x00, 0x80, 0x00, 0x00, 0xaa, 0x00, 0x38, 0x9b, 0x71]

export interface WavHeader {
  formatTag: 1 | 3, channels: number, sampleRate: number, bytesPer: number, blockAlign: number, dataStart: number, dataSize: number
  /** The data chunk's size was not written (streaming writer): `dataSize` is what the bytes hold. */
  sizeUnknown?: boolean
}

export function readWavHeader (b: Uint8Array): WavHeader {
  const fail = (reason: string, extra: Record<string, unknown> = {}): never => { throw new AnalysisError('corrupt', { format: 'wav', reason, ...extra }) }
  const v = new DataView(b.buffer, b.byteOffset, b.byteLength)
  if (b.length < 12) fail('header')
  const rf64 = !isAscii(b, 0, 'RIFF')
  let ds64DataSize: number | null = null
  let fmt: Omit<WavHeader, 'dataStart' | 'dataSize'> | null = null
  let dataStart = -1
  let dataSize = 0
  let sizeUnknown = false
  let p = 12
  while (p + 8 <= b.length) {
    const body = p + 8
    let size = v.getUint32(p + 4, true)
    if (isAscii(b, p, 'ds64') && rf64) {
      if (size < 28 || body + 28 > b.length) fail('ds64')
      ds64DataSize = Number(v.getBigUint64(body + 8, true))
    } else if (isAscii(b, p, 'fmt ')) {
      if (size < 16 || body + 16 > b.length) fail('fmt')
      fmt = parseFmt(v, b, body, size)
    } else if (isAscii(b, p, 'data')) {
      // 0xFFFFFFFF: the real size is in ds64 (RF64), or a streaming writer never came back to fill
      // it in; such writers also leave 0 with the samples following to the end of the file.
      if (size === 0xffffffff) {
        sizeUnknown = ds64DataSize === null
        size = ds64DataSize ?? b.length - body
      } else if (size === 0 && ds64DataSize === null && b.length - body >= 4 && !looksLikeChunkId(b, body)) {
        sizeUnknown = true
        size = b.length - body
      }
      dataStart = body
      dataSize = size
      if (fmt) break
    }
    if (body + size > b.length && !isAscii(b, p, 'data')) {
      if (fmt && dataStart >= 0) break // a trailing chunk cut short does not matter
      fail('chunk_size')
    }
    p = body + size + (size & 1)
  }
  if (!fmt) fail('no_fmt_chunk')
  if (dataStart < 0) fail('no_data_chunk')
  return sizeUnknown ? { ...fmt!, dataStart, dataSize, sizeUnknown } : { ...fmt!, dataStart, dataSize }
}

export function looksLikeChunkId (b: Uint8Array, at: number): boolean {
  for (let i = 0; i < 4; i++) if (b[at + i]! < 0x20 || b[at + i]! > 0x7e) return false
  return true
}

export function parseFmt (v: DataView, b: Uint8Array, at: number, size: number): Omit<WavHeader, 'dataStart' | 'dataSize'> {
  let tag = v.getUint16(at, true)
  const channels = v.getUint16(at + 2, true)
  const sampleRate = v.getUint32(at + 4, true)
  const blockAlign = v.getUint16(at + 12, true)
  const bits = v.getUint16(at + 14, true)
  if (tag === 0xfffe) {
    if (size < 40 || at + 40 > b.length) throw new AnalysisError('corrupt', { format: 'wav', reason: 'extensible_fmt' })
    tag = v.getUint16(at + 24, true)
    for (let i = 0; i < 14; i++) {
      if (b[at + 26 + i] !== KSDATAFORMAT_TAIL[i]) tag = 0 // a SubFormat GUID outside the KSDATAFORMAT family
    }
  }
  if (tag !== 1 && tag !== 3) throw new AnalysisError('not_audio', { format: 'wav', reason: 'unsupported_wav_encoding', formatTag: tag })
  if (channels === 0) throw new AnalysisError('corrupt', { format: 'wav', reason: 'channels' })
  // Trust the container size when a writer put valid bits (e.g. 20) in a wider block.
  let bytesPer = Math.ceil(bits / 8)
  if (blockAlign !== bytesPer * channels && blockAlign > 0 && blockAlign % channels === 0) bytesPer = blockAlign / channels
  const ok = tag === 1 ? [1, 2, 3, 4].includes(bytesPer) : bytesPer === 4 || bytesPer === 8
  if (!ok) throw new AnalysisError(bits === 0 ? 'corrupt' : 'not_audio', { format: 'wav', reason: 'bits_per_sample', bits })
  checkSampleRate(sampleRate, 'wav')
  return { formatTag: tag, channels, sampleRate, bytesPer, blockAlign: bytesPer * channels }
}

export function decodeWavBytes (b: Uint8Array, limits: Limits): DecodedAudio {
  const h = readWavHeader(b)
  const declaredFrames = Math.floor(h.dataSize / h.blockAlign)
  checkDuration(declaredFrames / h.sampleRate, limits, 'wav')
  const available = Math.min(h.dataSize, b.length - h.dataStart)
  const frames = Math.floor(available / h.blockAlign)
  const truncated = frames < declaredFrames
  if (declaredFrames === 0) throw new AnalysisError('empty', { format: 'wav', reason: 'no_frames' })
  requireFrames(frames, h.sampleRate, truncated, 'wav')

  const n = frames * h.channels
  const start = b.byteOffset + h.dataStart
  const raw = b.subarray(h.dataStart, h.dataStart + n * h.bytesPer)
  const aligned = (k: number) => (start % k === 0 ? raw.buffer : raw.slice().buffer)
  const offset = (k: number) => (start % k === 0 ? start : 0)
  const out = new Float32Array(frames)
  const stats = { peak: 0, clipped: 0, nonFinite: 0 }
  const ch = h.channels
  if (h.formatTag === 3) {
    const src = h.bytesPer === 4 ? new Float32Array(aligned(4), offset(4), n) : new Float64Array(aligned(8), offset(8), n)
    mixInterleaved(src, frames, ch, 1, 0, CLIP_LEVEL, out, stats)
  } else if (h.bytesPer === 1) {
    mixInterleaved(raw, frames, ch, 1 / 128, 128, 127 / 128, out, stats)
  } else if (h.bytesPer === 2) {
    mix16(new Int16Array(aligned(2), offset(2), n), frames, ch, out, stats)
  } else if (h.bytesPer === 4) {
    mixInterleaved(new Int32Array(aligned(4), offset(4), n), frames, ch, 1 / 2147483648, 0, CLIP_LEVEL, out, stats)
  } else {
    mix24(raw, frames, ch, out, stats)
  }
  if (stats.nonFinite / n > MAX_NON_FINITE_SHARE) throw new AnalysisError('corrupt', { format: 'wav', reason: 'non_finite_samples', count: stats.nonFinite })
  const res: DecodedAudio = {
    samples: out,
    sampleRate: h.sampleRate,
    channels: ch,
    durationS: frames / h.sampleRate,
    clippedShare: stats.clipped / n,
    peak: stats.peak,
  }
  if (truncated) res.truncated = true
  return res
}

export interface LevelStats { peak: number, clipped: number, nonFinite: number }

// Integer PCM is read as (code − offset)/2^(bits−1), so 0x7FFF ≈ +1.0 and 8-bit 128 = 0.
export function mixInterleaved (src: ArrayLike<number>, frames: number, ch: number, scale: number, offset: number, clipLevel: number, out: Float32Array, s: LevelStats) {
  let peak = 0
  let clipped = 0
  let nonFinite = 0
  const inv = 1 / ch
  let k = 0
  for (let i = 0; i < frames; i++) {
    let sum = 0
    for (let c = 0; c < ch; c++) {
      let x = (src[k++]! - offset) * scale
      if (!(x <= MAX_MAGNITUDE && x >= -MAX_MAGNITUDE)) { x = 0; nonFinite++ }
      const a = x < 0 ? -x : x
      if (a > peak) peak = a
      if (a >= clipLevel) clipped++
      sum += x
    }
    out[i] = sum * inv
  }
  s.peak = peak
  s.clipped = clipped
  s.nonFinite = nonFinite
}

// 16-bit is most uploads: a monomorphic loop on the integer codes runs about twice as fast.
export function mix16 (src: Int16Array, frames: number, ch: number, out: Float32Array, s: LevelStats) {
  let peak = 0
  let clipped = 0
  const scale = 1 / (32768 * ch)
  let k = 0
  for (let i = 0; i < frames; i++) {
    let sum = 0
    for (let c = 0; c < ch; c++) {
      const q = src[k++]!
      const a = q < 0 ? -q : q
      if (a > peak) peak = a
      if (a >= 32767) clipped++
      sum += q
    }
    out[i] = sum * scale
  }
  s.peak = peak / 32768
  s.clipped = clipped
}

export function mix24 (b: Uint8Array, frames: number, ch: number, out: Float32Array, s: LevelStats) {
  const scale = 1 / 8388608
  const clipLevel = 8388607 / 8388608
  const inv = 1 / ch
  let peak = 0
  let clipped = 0
  let p = 0
  for (let i = 0; i < frames; i++) {
    let sum = 0
    for (let c = 0; c < ch; c++) {
      const q = ((b[p]! | (b[p + 1]! << 8) | (b[p + 2]! << 16)) << 8) >> 8
      p += 3
      const x = q * scale
      const a = x < 0 ? -x : x
      if (a > peak) peak = a
      if (a >= clipLevel) clipped++
      sum += x
    }
    out[i] = sum * inv
  }
  s.peak = peak
  s.clipped = clipped
}

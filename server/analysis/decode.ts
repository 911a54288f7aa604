// Decodes an uploaded take to a mono Float32 signal at the file's own sample rate.
// The container is sniffed from the bytes (never from a file name). WAV is read by hand (fast,
// exact, checks sizes from the header before touching samples). FLAC, MP3 and Ogg Vorbis go to
// the WebAssembly decoders of the @audio/decode family (libFLAC, mpg123, libvorbis). Opus is
// demuxed here, from Ogg (pages CRC-checked, end trimmed by granule position) or from
// WebM/Matroska (what browser recorders stream: unknown-size Segment and Clusters, no Duration,
// no Cues), and its packets go to the libopus core of @audio/decode-opus. AAC in MP4/M4A (what
// Safari's recorder writes, and phone voice memos) is checked here (ftyp, moov, the audio track's
// codec) and demuxed and decoded by @audio/decode-mp4 with FAAD2 from @audio/decode-aac.

import { AnalysisError } from './errors'

export type AudioFormat = 'wav' | 'flac' | 'mp3' | 'ogg-vorbis' | 'ogg-opus' | 'webm-opus' | 'mp4-aac'

export interface DecodedAudio {
  /** Mono mix: the average of all channels. */
  samples: Float32Array
  /** The file's own sample rate in Hz, read from it (Opus: 48 kHz, or `opusRate` when asked). */
  sampleRate: number
  channels: number
  durationS: number
  /** Share of all channel samples at or above full scale (|x| ≥ 0.999, or the top integer code). */
  clippedShare?: number
  /** Largest |sample| over all channels before mixing. */
  peak?: number
  /** The file ended before its header said it would; what is here decoded cleanly. */
  truncated?: boolean
  format?: AudioFormat
}

export interface DecodeOptions {
  /** Reject larger inputs before decoding. Default 200 MiB. */
  maxBytes?: number
  /** Reject longer audio; checked from headers before decoding where the format says. Default 1200 s. */
  maxDurationS?: number
  /**
   * Output rate for Opus (Ogg and WebM). libopus decodes natively at 8, 12, 16, 24 or 48 kHz;
   * 24 kHz halves the decode time and keeps everything below 12 kHz. Default 48000.
   */
  opusRate?: OpusRate
}

export type OpusRate = 8000 | 12000 | 16000 | 24000 | 48000

export const DEFAULT_MAX_BYTES = 200 * 1024 * 1024
export const DEFAULT_MAX_DURATION_S = 1200
export const MIN_SAMPLE_RATE = 8000
export const MAX_SAMPLE_RATE = 192000
/** A file cut short is still used when at least this much audio survives. */
export const MIN_TRUNCATED_S = 1
const CLIP_LEVEL = 0.999
/** Float samples beyond ±1000 (60 dB over full scale) are damage, treated like NaN. */
const MAX_MAGNITUDE = 1000
/** More non-finite samples than this share means the stream is damaged, not just odd. */
const MAX_NON_FINITE_SHARE = 0.001
const CHUNK_BYTES = 1 << 20

/** Names the audio format from the first bytes of a file, or null when it is not one we read. */
export function detectFormat (bytes: Uint8Array): AudioFormat | null {
  if (bytes.length < 4) return null
  if (isAscii(bytes, 0, 'RIFF') || isAscii(bytes, 0, 'RF64') || isAscii(bytes, 0, 'BW64')) {
    return isAscii(bytes, 8, 'WAVE') ? 'wav' : null
  }
  if (isAscii(bytes, 0, 'fLaC')) return 'flac'
  if (isAscii(bytes, 0, 'OggS')) {
    const first = oggFirstPacket(bytes)
    if (first && isAscii(first, 0, 'OpusHead')) return 'ogg-opus'
    if (first && first[0] === 1 && isAscii(first, 1, 'vorbis')) return 'ogg-vorbis'
    return null
  }
  if (bytes[0] === 0x1a && bytes[1] === 0x45 && bytes[2] === 0xdf && bytes[3] === 0xa3) {
    try {
      const head = parseMatroska(bytes, true)
      return head.track?.codecId === 'A_OPUS' ? 'webm-opus' : null
    } catch {
      return null
    }
  }
  if (isMp4(bytes)) {
    try {
      const info = readMp4Info(bytes)
      // The moov may still be on its way (or sit after the mdat): only a codec we saw rules it out.
      return !info.track || isAacTrack(info.track) ? 'mp4-aac' : null
    } catch {
      return 'mp4-aac'
    }
  }
  const start = id3End(bytes)
  if (start > 0 && isAscii(bytes, start, 'fLaC')) return 'flac'
  if (findMpegStart(bytes, start) >= 0) return 'mp3'
  return null
}

/** Decodes a whole file to mono; throws AnalysisError (empty, not_audio, corrupt, too_large, too_long). */
export async function decodeAudio (bytes: Uint8Array, opts: DecodeOptions = {}): Promise<DecodedAudio> {
  const maxBytes = opts.maxBytes ?? DEFAULT_MAX_BYTES
  const maxDurationS = opts.maxDurationS ?? DEFAULT_MAX_DURATION_S
  if (!bytes || bytes.length === 0) throw new AnalysisError('empty')
  if (bytes.length > maxBytes) throw new AnalysisError('too_large', { bytes: bytes.length, maxBytes })
  const format = detectFormat(bytes)
  if (!format) {
    explainMatroska(bytes)
    explainMp4(bytes)
    throw new AnalysisError('not_audio')
  }
  const opusRate = opts.opusRate ?? 48000
  if (![8000, 12000, 16000, 24000, 48000].includes(opusRate)) throw new RangeError('opusRate must be 8000, 12000, 16000, 24000 or 48000')
  const limits: Limits = { maxDurationS, opusRate }
  let out: DecodedAudio
  try {
    switch (format) {
      case 'wav': out = decodeWavBytes(bytes, limits); break
      case 'flac': out = await decodeFlac(bytes, limits); break
      case 'mp3': out = await decodeMp3(bytes, limits); break
      case 'ogg-vorbis': out = await decodeOggVorbis(bytes, limits); break
      case 'ogg-opus': out = await decodeOggOpus(bytes, limits); break
      case 'webm-opus': out = await decodeWebmOpus(bytes, limits); break
      case 'mp4-aac': out = await decodeMp4Aac(bytes, limits); break
    }
  } catch (err) {
    if (err instanceof AnalysisError) throw err
    // A decoder that throws on our input met a damaged stream; say so instead of crashing.
    throw new AnalysisError('corrupt', { format, cause: err instanceof Error ? err.message : String(err) })
  }
  out.format = format
  return out
}

/** A Matroska file we do not take: damaged or cut before its audio track is corrupt, another codec is not ours. */
function explainMatroska (b: Uint8Array) {
  if (!(b[0] === 0x1a && b[1] === 0x45 && b[2] === 0xdf && b[3] === 0xa3)) return
  const head = parseMatroska(b, true) // throws 'corrupt' on damage
  if (!head.track) throw new AnalysisError('corrupt', { format: 'webm-opus', reason: 'no_audio_track' })
  throw new AnalysisError('not_audio', { reason: 'codec', codec: head.track.codecId })
}

/**
 * Duration in seconds that a WAV or FLAC header states, read from the first bytes of a file;
 * null when the header is not (yet) complete, states no length, or the format is another.
 */
export function headerDurationS (head: Uint8Array): number | null {
  try {
    const format = detectFormat(head)
    if (format === 'wav') {
      const h = readWavHeader(head)
      if (h.sizeUnknown || h.dataSize === 0) return null
      return Math.floor(h.dataSize / h.blockAlign) / h.sampleRate
    }
    if (format === 'flac') {
      const info = readFlacInfo(head)
      if (info.totalSamples === 0 || !(info.sampleRate > 0)) return null
      return info.totalSamples / info.sampleRate
    }
  } catch {
    // A header we cannot read here is left to the analysis, which explains what is wrong with it.
  }
  return null
}

// ---- shared helpers -----------------------------------------------------------------------------

interface Limits { maxDurationS: number, opusRate: OpusRate }

function isAscii (b: Uint8Array, at: number, s: string): boolean {
  if (at + s.length > b.length) return false
  for (let i = 0; i < s.length; i++) if (b[at + i] !== s.charCodeAt(i)) return false
  return true
}

function checkSampleRate (sampleRate: number, format: AudioFormat) {
  if (!Number.isFinite(sampleRate) || sampleRate <= 0) throw new AnalysisError('corrupt', { format, reason: 'sample_rate', sampleRate })
  if (sampleRate < MIN_SAMPLE_RATE || sampleRate > MAX_SAMPLE_RATE) {
    throw new AnalysisError('not_audio', { format, reason: 'unsupported_sample_rate', sampleRate })
  }
}

function checkDuration (durationS: number, limits: Limits, format: AudioFormat) {
  if (durationS > limits.maxDurationS) throw new AnalysisError('too_long', { format, durationS, maxDurationS: limits.maxDurationS })
}

/** Accumulates decoded chunks as a mono mix with level statistics, so memory stays one mono copy. */
class MonoMixer {
  private chunks: Float32Array[] = []
  frames = 0
  peak = 0
  clipped = 0
  values = 0
  nonFinite = 0
  constructor (private readonly format: AudioFormat, private readonly maxFrames: number, private readonly clipLevel = CLIP_LEVEL) {}

  /** Adds `n` frames of the first `channels` arrays of `data`. */
  push (data: Float32Array[], n: number, channels = data.length) {
    if (n <= 0 || channels <= 0) return
    if (this.frames + n > this.maxFrames) {
      throw new AnalysisError('too_long', { format: this.format, reason: 'decoded_length' })
    }
    const out = new Float32Array(n)
    const inv = 1 / channels
    let peak = this.peak
    let clipped = 0
    let nonFinite = 0
    const level = this.clipLevel
    for (let c = 0; c < channels; c++) {
      const src = data[c]!
      for (let i = 0; i < n; i++) {
        let x = src[i]!
        if (!(x <= MAX_MAGNITUDE && x >= -MAX_MAGNITUDE)) { x = 0; nonFinite++ }
        const a = x < 0 ? -x : x
        if (a > peak) peak = a
        if (a >= level) clipped++
        out[i] = out[i]! + x
      }
    }
    if (channels > 1) for (let i = 0; i < n; i++) out[i] = out[i]! * inv
    this.peak = peak
    this.clipped += clipped
    this.nonFinite += nonFinite
    this.values += n * channels
    this.frames += n
    this.chunks.push(out)
  }

  finish (): Float32Array {
    if (this.values > 0 && this.nonFinite / this.values > MAX_NON_FINITE_SHARE) {
      throw new AnalysisError('corrupt', { format: this.format, reason: 'non_finite_samples', count: this.nonFinite })
    }
    if (this.chunks.length === 1) return this.chunks[0]!
    const all = new Float32Array(this.frames)
    let p = 0
    for (const c of this.chunks) { all.set(c, p); p += c.length }
    this.chunks = [all]
    return all
  }
}

function result (mixer: MonoMixer, sampleRate: number, channels: number, truncated: boolean): DecodedAudio {
  const samples = mixer.finish()
  const out: DecodedAudio = {
    samples,
    sampleRate,
    channels,
    durationS: samples.length / sampleRate,
    clippedShare: mixer.values ? mixer.clipped / mixer.values : 0,
    peak: mixer.peak,
  }
  if (truncated) out.truncated = true
  return out
}

/** Zero decoded frames, or a cut-off stream with too little left, is unusable. */
function requireFrames (frames: number, sampleRate: number, truncated: boolean, format: AudioFormat) {
  if (frames === 0) throw new AnalysisError('corrupt', { format, reason: 'no_audio_frames' })
  if (truncated && frames / sampleRate < MIN_TRUNCATED_S) {
    throw new AnalysisError('corrupt', { format, reason: 'truncated', decodedS: frames / sampleRate })
  }
}

interface CodecErrorLike { message: string }
interface DecodedChunk { channelData: Float32Array[], samplesDecoded?: number, sampleRate: number, errors?: CodecErrorLike[] }

function framesOf (r: DecodedChunk): number {
  const len = r.channelData?.[0]?.length ?? 0
  return r.samplesDecoded != null ? Math.min(r.samplesDecoded, len) : len
}

function failOnCodecErrors (r: DecodedChunk, format: AudioFormat) {
  if (r.errors && r.errors.length > 0) {
    throw new AnalysisError('corrupt', { format, reason: 'decoder_errors', first: r.errors[0]!.message, count: r.errors.length })
  }
}

// ---- WAV (Microsoft RIFF/WAVE, WAVE_FORMAT_EXTENSIBLE, EBU RF64) ----------------------------------

const KSDATAFORMAT_TAIL = [0x00, 0x00, 0x00, 0x00, 0x10, 0x00, 0x80, 0x00, 0x00, 0xaa, 0x00, 0x38, 0x9b, 0x71]

interface WavHeader {
  formatTag: 1 | 3, channels: number, sampleRate: number, bytesPer: number, blockAlign: number, dataStart: number, dataSize: number
  /** The data chunk's size was not written (streaming writer): `dataSize` is what the bytes hold. */
  sizeUnknown?: boolean
}

function readWavHeader (b: Uint8Array): WavHeader {
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

function looksLikeChunkId (b: Uint8Array, at: number): boolean {
  for (let i = 0; i < 4; i++) if (b[at + i]! < 0x20 || b[at + i]! > 0x7e) return false
  return true
}

function parseFmt (v: DataView, b: Uint8Array, at: number, size: number): Omit<WavHeader, 'dataStart' | 'dataSize'> {
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

function decodeWavBytes (b: Uint8Array, limits: Limits): DecodedAudio {
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

interface LevelStats { peak: number, clipped: number, nonFinite: number }

// Integer PCM is read as (code − offset)/2^(bits−1), so 0x7FFF ≈ +1.0 and 8-bit 128 = 0.
function mixInterleaved (src: ArrayLike<number>, frames: number, ch: number, scale: number, offset: number, clipLevel: number, out: Float32Array, s: LevelStats) {
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
function mix16 (src: Int16Array, frames: number, ch: number, out: Float32Array, s: LevelStats) {
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

function mix24 (b: Uint8Array, frames: number, ch: number, out: Float32Array, s: LevelStats) {
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

// ---- FLAC ---------------------------------------------------------------------------------------

interface FlacInfo { sampleRate: number, channels: number, totalSamples: number, maxBlock: number, start: number }

function readFlacInfo (b: Uint8Array): FlacInfo {
  let start = 0
  if (!isAscii(b, 0, 'fLaC')) start = id3End(b)
  // 'fLaC', then the STREAMINFO block: 4-byte block header and 34 bytes of fields.
  if (!isAscii(b, start, 'fLaC') || b.length < start + 42 || (b[start + 4]! & 0x7f) !== 0) {
    throw new AnalysisError('corrupt', { format: 'flac', reason: 'streaminfo' })
  }
  const s = start + 8
  const maxBlock = (b[s + 2]! << 8) | b[s + 3]!
  const f = s + 10
  const sampleRate = (b[f]! << 12) | (b[f + 1]! << 4) | (b[f + 2]! >> 4)
  const channels = ((b[f + 2]! >> 1) & 7) + 1
  const totalSamples = (b[f + 3]! & 0x0f) * 2 ** 32 + ((b[f + 4]! << 24) >>> 0) + ((b[f + 5]! << 16) | (b[f + 6]! << 8) | b[f + 7]!)
  return { sampleRate, channels, totalSamples, maxBlock, start }
}

async function decodeFlac (b: Uint8Array, limits: Limits): Promise<DecodedAudio> {
  const info = readFlacInfo(b)
  checkSampleRate(info.sampleRate, 'flac')
  if (info.totalSamples > 0) checkDuration(info.totalSamples / info.sampleRate, limits, 'flac')
  const { decoder } = await import('@audio/decode-flac')
  const dec = await decoder()
  const mixer = new MonoMixer('flac', Math.ceil(limits.maxDurationS * info.sampleRate))
  let sampleRate = info.sampleRate
  let channels = info.channels
  try {
    const take = (r: DecodedChunk) => {
      failOnCodecErrors(r, 'flac')
      const n = framesOf(r)
      if (n > 0) { sampleRate = r.sampleRate || sampleRate; channels = r.channelData.length; mixer.push(r.channelData, n) }
    }
    const body = b.subarray(info.start)
    for (let p = 0; p < body.length; p += CHUNK_BYTES) take(dec.decode(body.subarray(p, p + CHUNK_BYTES)) as DecodedChunk)
    take(dec.flush() as DecodedChunk)
  } finally {
    dec.free()
  }
  // libFLAC stops quietly at damage it cannot resync past; STREAMINFO tells us how much is missing.
  let truncated = false
  if (info.totalSamples > 0 && mixer.frames < info.totalSamples) {
    const tail = flacTailSample(b, info)
    if (tail !== null && tail > mixer.frames + Math.max(info.maxBlock, 4096)) {
      throw new AnalysisError('corrupt', { format: 'flac', reason: 'frames_lost', decodedSamples: mixer.frames, totalSamples: info.totalSamples })
    }
    truncated = true
  }
  checkSampleRate(sampleRate, 'flac')
  requireFrames(mixer.frames, sampleRate, truncated, 'flac')
  return result(mixer, sampleRate, channels, truncated)
}

/**
 * First sample number of the last intact-looking frame header near the end of the file, or null.
 * Frames that exist beyond what the decoder delivered mean the middle was damaged, not the tail cut.
 */
function flacTailSample (b: Uint8Array, info: FlacInfo): number | null {
  const from = Math.max(info.start + 42, b.length - 65536)
  let found: number | null = null
  for (let p = from; p + 16 < b.length; p++) {
    if (b[p] !== 0xff || (b[p + 1]! & 0xfe) !== 0xf8) continue
    const n = parseFlacFrameHeader(b, p, info)
    if (n !== null) found = n
  }
  return found
}

function parseFlacFrameHeader (b: Uint8Array, p: number, info: FlacInfo): number | null {
  const variable = (b[p + 1]! & 1) === 1
  const bsCode = b[p + 2]! >> 4
  const srCode = b[p + 2]! & 0x0f
  if (bsCode === 0 || srCode === 15 || (b[p + 3]! & 1) !== 0 || (b[p + 3]! >> 4) > 10) return null
  // The frame or sample number uses the UTF-8 style variable-length code.
  let q = p + 4
  const lead = b[q]!
  let len = 0
  if (lead < 0x80) len = 1
  else if (lead >= 0xc0 && lead < 0xe0) len = 2
  else if (lead >= 0xe0 && lead < 0xf0) len = 3
  else if (lead >= 0xf0 && lead < 0xf8) len = 4
  else if (lead >= 0xf8 && lead < 0xfc) len = 5
  else if (lead >= 0xfc && lead < 0xfe) len = 6
  else if (lead === 0xfe) len = 7
  else return null
  let num = len === 1 ? lead : lead & (0x7f >> len)
  for (let i = 1; i < len; i++) {
    const c = b[q + i]
    if (c === undefined || (c & 0xc0) !== 0x80) return null
    num = num * 64 + (c & 0x3f)
  }
  q += len
  if (bsCode === 6) q += 1
  else if (bsCode === 7) q += 2
  if (srCode === 12) q += 1
  else if (srCode === 13 || srCode === 14) q += 2
  if (q >= b.length || crc8(b, p, q) !== b[q]) return null
  const blockSize = info.maxBlock || 4096
  return variable ? num : num * blockSize
}

function crc8 (b: Uint8Array, from: number, to: number): number {
  let crc = 0
  for (let i = from; i < to; i++) {
    crc ^= b[i]!
    for (let k = 0; k < 8; k++) crc = crc & 0x80 ? ((crc << 1) ^ 0x07) & 0xff : (crc << 1) & 0xff
  }
  return crc
}

// ---- MP3 (MPEG-1/2/2.5 audio, layers I–III) -----------------------------------------------------

const MPEG_RATES = [[11025, 12000, 8000], [0, 0, 0], [22050, 24000, 16000], [44100, 48000, 32000]]
const BITRATES: Record<string, number[]> = {
  '1-1': [0, 32, 64, 96, 128, 160, 192, 224, 256, 288, 320, 352, 384, 416, 448],
  '1-2': [0, 32, 48, 56, 64, 80, 96, 112, 128, 160, 192, 224, 256, 320, 384],
  '1-3': [0, 32, 40, 48, 56, 64, 80, 96, 112, 128, 160, 192, 224, 256, 320],
  '2-1': [0, 32, 48, 56, 64, 80, 96, 112, 128, 144, 160, 176, 192, 224, 256],
  '2-2': [0, 8, 16, 24, 32, 40, 48, 56, 64, 80, 96, 112, 128, 144, 160],
}

interface MpegFrame { sampleRate: number, channels: number, bitrate: number, length: number, samplesPerFrame: number }

function mpegFrame (b: Uint8Array, p: number): MpegFrame | null {
  if (p + 4 > b.length || b[p] !== 0xff || (b[p + 1]! & 0xe0) !== 0xe0) return null
  const version = (b[p + 1]! >> 3) & 3 // 0: 2.5, 2: 2, 3: 1
  const layer = 4 - ((b[p + 1]! >> 1) & 3) // 1..3; 4 = reserved
  const brIndex = b[p + 2]! >> 4
  const srIndex = (b[p + 2]! >> 2) & 3
  if (version === 1 || layer === 4 || brIndex === 0 || brIndex === 15 || srIndex === 3) return null
  const mpeg1 = version === 3
  const table = BITRATES[mpeg1 ? `1-${layer}` : layer === 1 ? '2-1' : '2-2']!
  const bitrate = table[brIndex]! * 1000
  const sampleRate = MPEG_RATES[version]![srIndex]!
  const pad = (b[p + 2]! >> 1) & 1
  const channels = (b[p + 3]! >> 6) === 3 ? 1 : 2
  let length: number
  let samplesPerFrame: number
  // Frame length in bytes and samples per frame (ISO/IEC 11172-3 and 13818-3; common practice).
  if (layer === 1) {
    length = (Math.floor((12 * bitrate) / sampleRate) + pad) * 4
    samplesPerFrame = 384
  } else if (layer === 2 || mpeg1) {
    length = Math.floor((144 * bitrate) / sampleRate) + pad
    samplesPerFrame = 1152
  } else {
    length = Math.floor((72 * bitrate) / sampleRate) + pad
    samplesPerFrame = 576
  }
  return { sampleRate, channels, bitrate, length, samplesPerFrame }
}

/** Offset just past an ID3v2 tag at the start, or 0. */
function id3End (b: Uint8Array): number {
  if (!isAscii(b, 0, 'ID3') || b.length < 10) return 0
  const size = ((b[6]! & 0x7f) << 21) | ((b[7]! & 0x7f) << 14) | ((b[8]! & 0x7f) << 7) | (b[9]! & 0x7f)
  const footer = (b[5]! & 0x10) ? 10 : 0
  return 10 + size + footer
}

/** Offset of the first MPEG audio frame confirmed by the next frame header (or the end of the file). */
function findMpegStart (b: Uint8Array, from: number): number {
  // After an ID3 tag some writers leave padding; without a tag, the frame must start the file.
  const limit = from > 0 ? Math.min(b.length, from + 65536) : 1
  for (let p = from; p < limit && p < b.length; p++) {
    const f = mpegFrame(b, p)
    if (!f) continue
    const next = p + f.length
    if (next === b.length || (next < b.length && mpegFrame(b, next) !== null)) return p
  }
  return -1
}

async function decodeMp3 (b: Uint8Array, limits: Limits): Promise<DecodedAudio> {
  const start = findMpegStart(b, id3End(b))
  const first = mpegFrame(b, start)!
  checkSampleRate(first.sampleRate, 'mp3')
  // Xing/Info frame count when the encoder wrote one, else the constant-bitrate estimate.
  const frameBytes = b.subarray(start, Math.min(b.length, start + first.length))
  let declaredFrames: number | null = null
  for (const tag of ['Xing', 'Info']) {
    const at = indexOfAscii(frameBytes, tag)
    if (at >= 0 && at + 12 <= frameBytes.length && (frameBytes[at + 7]! & 1)) {
      declaredFrames = new DataView(frameBytes.buffer, frameBytes.byteOffset + at + 8, 4).getUint32(0)
    }
  }
  const estimateS = declaredFrames !== null
    ? (declaredFrames * first.samplesPerFrame) / first.sampleRate
    : ((b.length - start) * 8) / first.bitrate
  checkDuration(estimateS, limits, 'mp3')

  const { decoder } = await import('@audio/decode-mp3')
  const dec = await decoder()
  // mpg123 always hands back two channels; a mono stream is the first of them.
  const channels = first.channels
  const mixer = new MonoMixer('mp3', Math.ceil(limits.maxDurationS * 1.05 * first.sampleRate))
  let sampleRate = first.sampleRate
  try {
    const body = b.subarray(start)
    for (let p = 0; p < body.length; p += CHUNK_BYTES) {
      const r = dec.decode(body.subarray(p, p + CHUNK_BYTES)) as DecodedChunk
      failOnCodecErrors(r, 'mp3')
      const n = framesOf(r)
      if (n > 0) { sampleRate = r.sampleRate || sampleRate; mixer.push(r.channelData, n, Math.min(channels, r.channelData.length)) }
    }
  } finally {
    dec.free()
  }
  checkSampleRate(sampleRate, 'mp3')
  const truncated = declaredFrames !== null && mixer.frames < (declaredFrames - 2) * first.samplesPerFrame - 2 * 1152
  requireFrames(mixer.frames, sampleRate, truncated, 'mp3')
  return result(mixer, sampleRate, channels, truncated)
}

function indexOfAscii (b: Uint8Array, s: string): number {
  outer: for (let i = 0; i + s.length <= b.length; i++) {
    for (let k = 0; k < s.length; k++) if (b[i + k] !== s.charCodeAt(k)) continue outer
    return i
  }
  return -1
}

// ---- Ogg (RFC 3533) with Vorbis or Opus (RFC 7845) ----------------------------------------------

function oggFirstPacket (b: Uint8Array): Uint8Array | null {
  if (b.length < 28 || !isAscii(b, 0, 'OggS')) return null
  const nseg = b[26]!
  let len = 0
  for (let i = 0; i < nseg && 27 + i < b.length; i++) {
    len += b[27 + i]!
    if (b[27 + i]! < 255) break
  }
  const at = 27 + nseg
  return b.subarray(at, Math.min(b.length, at + len))
}

let oggCrcTable: Uint32Array | null = null
function oggCrc (b: Uint8Array, from: number, to: number): number {
  if (!oggCrcTable) {
    oggCrcTable = new Uint32Array(256)
    for (let i = 0; i < 256; i++) {
      let r = i << 24
      for (let k = 0; k < 8; k++) r = r & 0x80000000 ? (r << 1) ^ 0x04c11db7 : r << 1
      oggCrcTable[i] = r >>> 0
    }
  }
  const t = oggCrcTable
  let crc = 0
  for (let i = from; i < to; i++) {
    // The CRC field itself (bytes 22–25 of the page) counts as zero.
    const byte = i - from >= 22 && i - from < 26 ? 0 : b[i]!
    crc = ((crc << 8) ^ t[((crc >>> 24) ^ byte) & 0xff]!) >>> 0
  }
  return crc
}

interface OggScan { lastGranule: number, truncated: boolean, packets: Uint8Array[] }

/**
 * Walks every page of the first logical stream: checks capture pattern and CRC, notes a cut-off
 * end and the last granule position, and (when asked) reassembles the packets.
 */
function scanOgg (b: Uint8Array, format: AudioFormat, wantPackets: boolean): OggScan {
  const v = new DataView(b.buffer, b.byteOffset, b.byteLength)
  const serial = b.length >= 18 ? v.getUint32(14, true) : 0
  const packets: Uint8Array[] = []
  let pending: Uint8Array[] = []
  let p = 0
  let lastGranule = -1
  let eos = false
  let truncated = false
  while (p < b.length) {
    if (p + 27 > b.length) { truncated = true; break }
    if (!isAscii(b, p, 'OggS') || b[p + 4] !== 0) throw new AnalysisError('corrupt', { format, reason: 'ogg_page', offset: p })
    const nseg = b[p + 26]!
    if (p + 27 + nseg > b.length) { truncated = true; break }
    let size = 27 + nseg
    for (let i = 0; i < nseg; i++) size += b[p + 27 + i]!
    if (p + size > b.length) { truncated = true; break }
    if (oggCrc(b, p, p + size) !== v.getUint32(p + 22, true)) throw new AnalysisError('corrupt', { format, reason: 'ogg_crc', offset: p })
    if (v.getUint32(p + 14, true) === serial) {
      const lo = v.getUint32(p + 6, true)
      const hi = v.getUint32(p + 10, true)
      if (!(lo === 0xffffffff && hi === 0xffffffff)) lastGranule = hi * 2 ** 32 + lo
      if (b[p + 5]! & 4) eos = true
      if (wantPackets) {
        if (!(b[p + 5]! & 1)) pending = [] // not a continuation: a dangling partial packet is dropped
        let q = p + 27 + nseg
        let start = q
        for (let i = 0; i < nseg; i++) {
          const len = b[p + 27 + i]!
          q += len
          if (len < 255) {
            const piece = b.subarray(start, q)
            packets.push(pending.length ? concat([...pending, piece]) : piece)
            pending = []
            start = q
          }
        }
        if (start < q) pending.push(b.subarray(start, q))
      }
    }
    p += size
  }
  return { lastGranule, truncated: truncated || !eos, packets }
}

function concat (parts: Uint8Array[]): Uint8Array {
  let n = 0
  for (const x of parts) n += x.length
  const out = new Uint8Array(n)
  let p = 0
  for (const x of parts) { out.set(x, p); p += x.length }
  return out
}

async function decodeOggVorbis (b: Uint8Array, limits: Limits): Promise<DecodedAudio> {
  const format = 'ogg-vorbis'
  const head = oggFirstPacket(b)!
  if (head.length < 30) throw new AnalysisError('corrupt', { format, reason: 'vorbis_id' })
  const headerRate = new DataView(head.buffer, head.byteOffset + 12, 4).getUint32(0, true)
  checkSampleRate(headerRate, format)
  const scan = scanOgg(b, format, false)
  if (scan.lastGranule > 0) checkDuration(scan.lastGranule / headerRate, limits, format)

  const { decoder } = await import('@audio/decode-vorbis')
  const dec = await decoder()
  const mixer = new MonoMixer(format, Math.ceil(limits.maxDurationS * headerRate))
  let sampleRate = headerRate
  let channels = head[11]!
  try {
    const take = (r: DecodedChunk) => {
      failOnCodecErrors(r, format)
      const n = framesOf(r)
      if (n > 0) { sampleRate = r.sampleRate || sampleRate; channels = r.channelData.length; mixer.push(r.channelData, n) }
    }
    for (let p = 0; p < b.length; p += CHUNK_BYTES) take(dec.decode(b.subarray(p, p + CHUNK_BYTES)) as DecodedChunk)
    take(dec.flush() as DecodedChunk)
  } finally {
    dec.free()
  }
  checkSampleRate(sampleRate, format)
  requireFrames(mixer.frames, sampleRate, scan.truncated, format)
  return result(mixer, sampleRate, channels, scan.truncated)
}

async function decodeOggOpus (b: Uint8Array, limits: Limits): Promise<DecodedAudio> {
  const format = 'ogg-opus'
  const scan = scanOgg(b, format, true)
  const head = parseOpusHead(scan.packets[0] ?? null, format)
  if (!head) throw new AnalysisError('corrupt', { format, reason: 'opus_head' })
  // Packet 0 is OpusHead, packet 1 OpusTags (RFC 7845 §3); audio follows.
  const audio = scan.packets.slice(2)
  // The last granule position counts 48-kHz samples including the pre-skip (RFC 7845 §4).
  const endSamples = scan.lastGranule > 0 ? scan.lastGranule - head.preSkip : Infinity
  return decodeOpusPackets(audio, head, format, limits, endSamples, scan.truncated)
}

// ---- WebM / Matroska with Opus ------------------------------------------------------------------

const EBML_ID = 0x1a45dfa3
const SEGMENT = 0x18538067
const CLUSTER = 0x1f43b675
// Elements that may follow a Cluster at Segment level: they end an unknown-size Cluster.
const SEGMENT_CHILDREN = new Set([0x114d9b74, 0x1549a966, 0x1654ae6b, CLUSTER, 0x1c53bb6b, 0x1254c367, 0x1043a770, 0x1941a469, SEGMENT, EBML_ID])
const CLUSTER_CHILDREN = new Set([0xe7, 0x5854, 0xa7, 0xab, 0xa3, 0xa0, 0xaf, 0xec, 0xbf])

interface MkvTrack {
  number: number
  codecId: string
  codecPrivate: Uint8Array | null
  channels: number
  sampleRate: number
  codecDelayNs: number
  encoded: boolean
}

interface MkvParse {
  docType: string
  track: MkvTrack | null
  packets: Uint8Array[]
  /** DiscardPadding of the last block, in ns (trims encoder padding at the end). */
  endPaddingNs: number
  truncated: boolean
}

interface ElHeader { id: number, size: number /* -1 = unknown */, data: number }

class Truncated extends Error {}

/** Reads an element header at p; Truncated when the file ends inside it, null when the bytes are not EBML. */
function readElement (b: Uint8Array, p: number): ElHeader | null {
  const first = b[p]
  if (first === undefined) throw new Truncated()
  const idLen = first >= 0x80 ? 1 : first >= 0x40 ? 2 : first >= 0x20 ? 3 : first >= 0x10 ? 4 : 0
  if (!idLen) return null
  if (p + idLen >= b.length) throw new Truncated()
  let id = 0
  for (let i = 0; i < idLen; i++) id = id * 256 + b[p + i]!
  const q = p + idLen
  const s0 = b[q]!
  if (s0 === 0) return null
  const sLen = Math.clz32(s0) - 23
  if (q + sLen > b.length) throw new Truncated()
  let size = s0 & (0xff >> sLen)
  let allOnes = size === 0xff >> sLen
  for (let i = 1; i < sLen; i++) {
    const c = b[q + i]!
    if (c !== 0xff) allOnes = false
    size = size * 256 + c
  }
  return { id, size: allOnes ? -1 : size, data: q + sLen }
}

function readUint (b: Uint8Array, from: number, to: number): number {
  let v = 0
  for (let i = from; i < to; i++) v = v * 256 + b[i]!
  return v
}

function readInt (b: Uint8Array, from: number, to: number): number {
  if (to <= from) return 0
  const u = readUint(b, from, to)
  const bits = 8 * (to - from)
  return b[from]! & 0x80 ? u - 2 ** bits : u
}

function readFloat (b: Uint8Array, from: number, to: number): number {
  const v = new DataView(b.buffer, b.byteOffset + from, to - from)
  return to - from === 4 ? v.getFloat32(0) : to - from === 8 ? v.getFloat64(0) : 0
}

function readString (b: Uint8Array, from: number, to: number): string {
  let s = ''
  for (let i = from; i < to && b[i] !== 0; i++) s += String.fromCharCode(b[i]!)
  return s
}

/** Iterates the sized children of [from, to). */
function * children (b: Uint8Array, from: number, to: number): Generator<ElHeader & { end: number }> {
  let p = from
  while (p < to) {
    const h = readElement(b, p)
    if (!h || h.size < 0) throw new AnalysisError('corrupt', { format: 'webm-opus', reason: 'ebml' })
    const end = h.data + h.size
    if (end > b.length) throw new Truncated()
    yield { ...h, end }
    p = end
  }
}

function parseTrack (b: Uint8Array, from: number, to: number): MkvTrack & { type: number } {
  const t = { number: 0, type: 0, codecId: '', codecPrivate: null as Uint8Array | null, channels: 1, sampleRate: 8000, codecDelayNs: 0, encoded: false }
  for (const c of children(b, from, to)) {
    switch (c.id) {
      case 0xd7: t.number = readUint(b, c.data, c.end); break
      case 0x83: t.type = readUint(b, c.data, c.end); break
      case 0x86: t.codecId = readString(b, c.data, c.end); break
      case 0x63a2: t.codecPrivate = b.subarray(c.data, c.end); break
      case 0x56aa: t.codecDelayNs = readUint(b, c.data, c.end); break
      case 0x6d80: t.encoded = true; break
      case 0xe1:
        for (const a of children(b, c.data, c.end)) {
          if (a.id === 0xb5) t.sampleRate = readFloat(b, a.data, a.end)
          else if (a.id === 0x9f) t.channels = readUint(b, a.data, a.end)
        }
        break
    }
  }
  return t
}

/**
 * Demuxes the first audio track's frames. Handles unknown-size Segment and Clusters, SimpleBlock
 * and BlockGroup, and Xiph, EBML and fixed lacing. A file that ends mid-element is `truncated`;
 * bytes that are not EBML where an element should start are damage.
 */
function parseMatroska (b: Uint8Array, headerOnly: boolean): MkvParse {
  const out: MkvParse = { docType: '', track: null, packets: [], endPaddingNs: 0, truncated: false }
  const damaged = (reason: string, offset: number): never => { throw new AnalysisError('corrupt', { format: 'webm-opus', reason, offset }) }
  try {
    const ebml = readElement(b, 0)
    if (!ebml || ebml.id !== EBML_ID || ebml.size < 0) return damaged('ebml_header', 0)
    for (const c of children(b, ebml.data, ebml.data + ebml.size)) if (c.id === 0x4282) out.docType = readString(b, c.data, c.end)
    if (out.docType !== 'webm' && out.docType !== 'matroska') throw new AnalysisError('not_audio', { reason: 'doctype', docType: out.docType })
    let p = ebml.data + ebml.size
    let seg = readElement(b, p)
    while (seg && seg.id === 0xec && seg.size >= 0) { p = seg.data + seg.size; seg = readElement(b, p) } // Void
    if (!seg || seg.id !== SEGMENT) return damaged('segment', p)
    const segEnd = seg.size < 0 ? b.length : Math.min(b.length, seg.data + seg.size)
    if (seg.size >= 0 && seg.data + seg.size > b.length) out.truncated = true
    p = seg.data
    while (p < segEnd) {
      const h = readElement(b, p)
      if (!h) return damaged('ebml', p)
      if (h.id === CLUSTER) {
        if (!out.track) return damaged('cluster_before_tracks', p)
        if (headerOnly) return out
        p = readCluster(b, h, segEnd, out)
        continue
      }
      if (h.size < 0) return damaged('unknown_size', p)
      const end = h.data + h.size
      if (end > b.length) {
        // A header-only sniff may hold just the first bytes of a file: anything running past them is "more to come".
        if (headerOnly || SEGMENT_CHILDREN.has(h.id) || h.id === 0xec || h.id === 0xbf) throw new Truncated()
        return damaged('element_size', p)
      }
      if (h.id === 0x1654ae6b && !out.track) {
        for (const c of children(b, h.data, end)) {
          if (c.id !== 0xae) continue
          const t = parseTrack(b, c.data, c.end)
          if (t.type === 2) { out.track = t; break }
        }
        if (headerOnly) return out
      }
      p = end
    }
  } catch (err) {
    if (!(err instanceof Truncated)) throw err
    out.truncated = true
  }
  return out
}

/** Reads one Cluster's blocks; returns where the next Segment child starts. */
function readCluster (b: Uint8Array, h: ElHeader, segEnd: number, out: MkvParse): number {
  const known = h.size >= 0
  const end = known ? h.data + h.size : segEnd
  if (known && end > b.length) out.truncated = true
  const stop = Math.min(end, b.length)
  let p = h.data
  while (p < stop) {
    const c = readElement(b, p)
    if (!c) throw new AnalysisError('corrupt', { format: 'webm-opus', reason: 'ebml', offset: p })
    // In an unknown-size Cluster, the next Segment-level element ends it.
    if (!known && SEGMENT_CHILDREN.has(c.id)) return p
    if (c.size < 0) throw new AnalysisError('corrupt', { format: 'webm-opus', reason: 'unknown_size', offset: p })
    const cEnd = c.data + c.size
    if (cEnd > b.length) {
      if (CLUSTER_CHILDREN.has(c.id)) throw new Truncated()
      throw new AnalysisError('corrupt', { format: 'webm-opus', reason: 'element_size', offset: p })
    }
    if (c.id === 0xa3) {
      readBlock(b, c.data, cEnd, out)
    } else if (c.id === 0xa0) {
      let padding = 0
      let had = false
      for (const g of children(b, c.data, cEnd)) {
        if (g.id === 0xa1) had = readBlock(b, g.data, g.end, out)
        else if (g.id === 0x75a2) padding = readInt(b, g.data, g.end)
      }
      if (had) out.endPaddingNs = padding
    }
    p = cEnd
  }
  return stop
}

/** Appends the frames of one (Simple)Block of the audio track; true when it was ours. */
function readBlock (b: Uint8Array, from: number, to: number, out: MkvParse): boolean {
  const t0 = b[from]
  if (t0 === undefined || t0 === 0) throw new AnalysisError('corrupt', { format: 'webm-opus', reason: 'block', offset: from })
  const tLen = Math.clz32(t0) - 23
  const track = readUint(b, from, from + tLen) - (0x80 >> (tLen - 1)) * 256 ** (tLen - 1)
  if (track !== out.track!.number) return false
  let p = from + tLen + 2 // 16-bit relative timecode
  const flags = b[p++]!
  const lacing = (flags >> 1) & 3
  out.endPaddingNs = 0
  if (lacing === 0) { out.packets.push(b.subarray(p, to)); return true }
  const count = b[p++]! + 1
  const sizes: number[] = []
  if (lacing === 1) { // Xiph
    for (let i = 0; i < count - 1; i++) {
      let s = 0
      let v: number
      do { v = b[p++]!; s += v } while (v === 255 && p < to)
      sizes.push(s)
    }
  } else if (lacing === 3) { // EBML: first size, then signed differences
    const first = readLaceVint(b, p)
    p = first.next
    sizes.push(first.value)
    for (let i = 1; i < count - 1; i++) {
      const d = readLaceVint(b, p)
      p = d.next
      const bias = 2 ** (7 * d.len - 1) - 1
      sizes.push(sizes[i - 1]! + d.value - bias)
    }
  } else { // fixed
    const each = (to - p) / count
    if (!Number.isInteger(each)) throw new AnalysisError('corrupt', { format: 'webm-opus', reason: 'lacing', offset: from })
    for (let i = 0; i < count - 1; i++) sizes.push(each)
  }
  for (const s of sizes) {
    if (s < 0 || p + s > to) throw new AnalysisError('corrupt', { format: 'webm-opus', reason: 'lacing', offset: from })
    out.packets.push(b.subarray(p, p + s))
    p += s
  }
  out.packets.push(b.subarray(p, to))
  return true
}

function readLaceVint (b: Uint8Array, p: number): { value: number, len: number, next: number } {
  const s0 = b[p]
  if (s0 === undefined || s0 === 0) throw new AnalysisError('corrupt', { format: 'webm-opus', reason: 'lacing', offset: p })
  const len = Math.clz32(s0) - 23
  let value = s0 & (0xff >> len)
  for (let i = 1; i < len; i++) value = value * 256 + b[p + i]!
  return { value, len, next: p + len }
}

/** Samples (at 48 kHz) in one Opus packet, from its TOC byte (RFC 6716 §3.1); 0 when malformed. */
export function opusPacketSamples (pkt: Uint8Array): number {
  if (pkt.length === 0) return 0
  const toc = pkt[0]!
  const config = toc >> 3
  let frame: number
  if (config < 12) frame = [480, 960, 1920, 2880][config & 3]!
  else if (config < 16) frame = (config & 1) ? 960 : 480
  else frame = [120, 240, 480, 960][config & 3]!
  const code = toc & 3
  const count = code === 0 ? 1 : code < 3 ? 2 : pkt.length > 1 ? pkt[1]! & 0x3f : 0
  return frame * count
}

interface OpusHead {
  channels: number
  preSkip: number
  outputGain: number
  streamCount?: number
  coupledStreamCount?: number
  channelMappingTable?: number[]
}

/** OpusHead (RFC 7845 §5.1): channel count, pre-skip, output gain and the channel mapping. */
function parseOpusHead (h: Uint8Array | null, format: AudioFormat): OpusHead | null {
  if (!h || h.length < 19 || !isAscii(h, 0, 'OpusHead')) return null
  const head: OpusHead = {
    channels: h[9]!,
    preSkip: h[10]! | (h[11]! << 8),
    outputGain: ((h[16]! | (h[17]! << 8)) << 16) >> 16, // Q7.8 dB, signed
  }
  if (head.channels < 1) throw new AnalysisError('corrupt', { format, reason: 'channels' })
  if (h[18]! !== 0) {
    if (h.length < 21 + head.channels) throw new AnalysisError('corrupt', { format, reason: 'opus_head' })
    head.streamCount = h[19]!
    head.coupledStreamCount = h[20]!
    head.channelMappingTable = Array.from(h.subarray(21, 21 + head.channels))
  } else if (head.channels > 2) {
    throw new AnalysisError('corrupt', { format, reason: 'opus_head' })
  }
  return head
}

/**
 * Decodes Opus packets with libopus. `endSamples` (48-kHz samples after pre-skip) trims the
 * encoder's end padding when the container says where the audio stops.
 */
async function decodeOpusPackets (packets: Uint8Array[], head: OpusHead, format: AudioFormat, limits: Limits, endSamples: number, truncated: boolean): Promise<DecodedAudio> {
  let total = 0
  for (const pkt of packets) total += opusPacketSamples(pkt)
  checkDuration((Math.min(total, endSamples + head.preSkip) - head.preSkip) / 48000, limits, format)
  const rate = limits.opusRate
  const { createOpusDecoder } = await import('@audio/decode-opus/core')
  const dec = await createOpusDecoder()
  const mixer = new MonoMixer(format, Math.ceil((limits.maxDurationS + 1) * rate))
  try {
    dec.configure({ ...head, sampleRate: rate, preSkip: Math.round((head.preSkip * rate) / 48000) })
    const batch = 250 // about 5 s of 20-ms packets per call keeps the wasm heap small
    for (let i = 0; i < packets.length; i += batch) {
      const r = dec.decodeFrames(packets.slice(i, i + batch)) as DecodedChunk
      failOnCodecErrors(r, format)
      const n = framesOf(r)
      if (n > 0) mixer.push(r.channelData, n)
    }
  } finally {
    dec.free()
  }
  let samples = mixer.finish()
  const keep = Math.round((endSamples * rate) / 48000)
  if (keep >= 0 && keep < samples.length) samples = samples.subarray(0, keep)
  requireFrames(samples.length, rate, truncated, format)
  const out: DecodedAudio = {
    samples,
    sampleRate: rate,
    channels: head.channels,
    durationS: samples.length / rate,
    clippedShare: mixer.values ? mixer.clipped / mixer.values : 0,
    peak: mixer.peak,
  }
  if (truncated) out.truncated = true
  return out
}

async function decodeWebmOpus (b: Uint8Array, limits: Limits): Promise<DecodedAudio> {
  const format = 'webm-opus'
  const mkv = parseMatroska(b, false)
  const track = mkv.track
  if (!track || track.codecId !== 'A_OPUS') throw new AnalysisError('not_audio', { format, reason: 'codec', codec: track?.codecId ?? null })
  if (track.encoded) throw new AnalysisError('not_audio', { format, reason: 'content_encoding' })
  // CodecPrivate holds the OpusHead; without one, the track's channels and CodecDelay stand in.
  const head = parseOpusHead(track.codecPrivate, format) ??
    { channels: track.channels, preSkip: Math.round((track.codecDelayNs * 48000) / 1e9), outputGain: 0 }
  if (!(head.channels >= 1 && head.channels <= 2) && head.channelMappingTable === undefined) {
    throw new AnalysisError('corrupt', { format, reason: 'channels' })
  }
  let total = 0
  for (const pkt of mkv.packets) total += opusPacketSamples(pkt)
  // DiscardPadding on the last block marks encoder padding at the end (Matroska spec).
  const endSamples = total - head.preSkip - Math.round((mkv.endPaddingNs * 48000) / 1e9)
  return decodeOpusPackets(mkv.packets, head, format, limits, endSamples, mkv.truncated)
}

// ---- MP4 / M4A with AAC (ISO/IEC 14496-12 boxes, 14496-14 esds, 14496-3 AAC) --------------------

// Brands of files that carry plain audio: iTunes/Apple audio, the ISO base and MP4 families, 3GPP
// (phone recorders), DASH/CMAF fragments (browser recorders) and QuickTime.
const MP4_BRANDS = new Set(['M4A ', 'M4B ', 'M4P ', 'mp41', 'mp42', 'isom', 'iso2', 'iso3', 'iso4', 'iso5', 'iso6', 'iso7', 'iso8', 'iso9',
  'avc1', 'dash', 'cmfc', 'cmf2', 'msdh', 'msix', '3gp4', '3gp5', '3gp6', '3g2a', 'qt  ', 'MSNV', 'mp4a', 'f4a '])
// objectTypeIndication values for AAC: MPEG-4 audio, and MPEG-2 AAC Main, LC and SSR profiles.
const AAC_OTI = new Set([0x40, 0x66, 0x67, 0x68])
const MP4_CONTAINERS = new Set(['trak', 'mdia', 'minf', 'stbl'])

interface Mp4Track { codec: string, oti: number | null, channels: number, sampleRate: number, timescale: number, duration: number }
interface Mp4Info { track: Mp4Track | null, moov: boolean, truncated: boolean }

function u32 (b: Uint8Array, at: number): number {
  return ((b[at]! << 24) >>> 0) + ((b[at + 1]! << 16) | (b[at + 2]! << 8) | b[at + 3]!)
}

function boxType (b: Uint8Array, at: number): string {
  return String.fromCharCode(b[at]!, b[at + 1]!, b[at + 2]!, b[at + 3]!)
}

/** An ISO BMFF file: an 'ftyp' box first whose major or a compatible brand is one we take. */
function isMp4 (b: Uint8Array): boolean {
  if (b.length < 16 || !isAscii(b, 4, 'ftyp')) return false
  const size = u32(b, 0)
  if (size < 16 || size > 4096) return false
  const end = Math.min(size, b.length)
  if (MP4_BRANDS.has(boxType(b, 8))) return true
  for (let p = 16; p + 4 <= end; p += 4) if (MP4_BRANDS.has(boxType(b, p))) return true
  return false
}

/** Iterates the boxes of [from, to): type, body start and end (clipped to the bytes we have). */
function * mp4Boxes (b: Uint8Array, from: number, to: number, out: Mp4Info): Generator<{ type: string, body: number, end: number }> {
  let p = from
  while (p + 8 <= to) {
    let size = u32(b, p)
    let body = p + 8
    if (size === 1) {
      if (p + 16 > b.length) { out.truncated = true; return }
      size = u32(b, p + 8) * 2 ** 32 + u32(b, p + 12)
      body = p + 16
    } else if (size === 0) {
      size = to - p // runs to the end of the enclosing box or file
    }
    if (size < body - p) throw new AnalysisError('corrupt', { format: 'mp4-aac', reason: 'box_size', offset: p })
    const end = p + size
    if (end > b.length) out.truncated = true
    yield { type: boxType(b, p + 4), body, end: Math.min(end, to) }
    p = end
  }
  if (p < to && to === b.length) out.truncated = true
}

/** The first sound track's codec and rates, from the moov box; `truncated` when a box runs past the end. */
function readMp4Info (b: Uint8Array): Mp4Info {
  const out: Mp4Info = { track: null, moov: false, truncated: false }
  for (const top of mp4Boxes(b, 0, b.length, out)) {
    if (top.type !== 'moov') continue
    out.moov = true
    if (top.end > b.length || out.truncated) { out.truncated = true; continue } // moov cut short: no track to trust
    for (const t of mp4Boxes(b, top.body, top.end, out)) {
      if (t.type !== 'trak') continue
      const track = readMp4Track(b, t.body, t.end, out)
      if (track) { out.track = track; break }
    }
  }
  return out
}

function readMp4Track (b: Uint8Array, from: number, to: number, out: Mp4Info): Mp4Track | null {
  let handler = ''
  const t: Mp4Track = { codec: '', oti: null, channels: 0, sampleRate: 0, timescale: 0, duration: 0 }
  const walk = (a: number, z: number) => {
    for (const x of mp4Boxes(b, a, z, out)) {
      if (MP4_CONTAINERS.has(x.type)) walk(x.body, x.end)
      else if (x.type === 'hdlr' && x.body + 12 <= x.end) handler = boxType(b, x.body + 8)
      else if (x.type === 'mdhd' && x.body + 24 <= x.end) {
        const v1 = b[x.body] === 1
        if (v1 && x.body + 36 <= x.end) { t.timescale = u32(b, x.body + 20); t.duration = u32(b, x.body + 24) * 2 ** 32 + u32(b, x.body + 28) }
        else if (!v1) { t.timescale = u32(b, x.body + 12); t.duration = u32(b, x.body + 16) }
      } else if (x.type === 'stsd' && x.body + 16 <= x.end && !t.codec) {
        const e = x.body + 8 // first sample entry
        const eEnd = Math.min(x.end, e + u32(b, e))
        t.codec = boxType(b, e + 4)
        if (e + 36 <= eEnd) {
          t.channels = (b[e + 24]! << 8) | b[e + 25]!
          t.sampleRate = (b[e + 32]! << 8) | b[e + 33]! // 16.16 fixed point, integer part
          const version = (b[e + 16]! << 8) | b[e + 17]!
          const children = e + (version === 1 ? 52 : version === 2 ? 72 : 36)
          for (const c of mp4Boxes(b, children, eEnd, out)) if (c.type === 'esds') t.oti = esdsObjectType(b, c.body + 4, c.end)
        }
      }
    }
  }
  walk(from, to)
  return handler === 'soun' ? t : null
}

/** objectTypeIndication of the DecoderConfigDescriptor (tag 4) inside an ES_Descriptor (tag 3). */
function esdsObjectType (b: Uint8Array, from: number, to: number): number | null {
  let p = from
  while (p < to) {
    const tag = b[p++]!
    let len = 0
    for (let i = 0; i < 4 && p < to; i++) { const c = b[p++]!; len = len * 128 + (c & 0x7f); if (!(c & 0x80)) break }
    if (tag === 0x03) { const flags = b[p + 2]!; p += 3 + (flags & 0x80 ? 2 : 0) + (flags & 0x20 ? 1 + b[p + 3]! : 0) + (flags & 0x40 ? 2 : 0); continue }
    if (tag === 0x04) return p < to ? b[p]! : null
    p += len
  }
  return null
}

function isAacTrack (t: Mp4Track): boolean {
  return t.codec === 'mp4a' && (t.oti === null || AAC_OTI.has(t.oti))
}

/** An MP4 we do not take: another codec is not ours; damage before the audio track is corrupt. */
function explainMp4 (b: Uint8Array) {
  if (!isMp4(b)) return
  const info = readMp4Info(b)
  if (info.track && !isAacTrack(info.track)) {
    throw new AnalysisError('not_audio', { format: 'mp4-aac', reason: 'codec', codec: info.track.codec, objectType: info.track.oti })
  }
}

async function decodeMp4Aac (b: Uint8Array, limits: Limits): Promise<DecodedAudio> {
  const format = 'mp4-aac'
  const info = readMp4Info(b)
  if (!info.moov || (!info.track && info.truncated)) {
    throw new AnalysisError('corrupt', { format, reason: info.truncated ? 'truncated_before_audio' : 'no_moov' })
  }
  const track = info.track
  if (!track) throw new AnalysisError('corrupt', { format, reason: 'no_audio_track' })
  if (!isAacTrack(track)) throw new AnalysisError('not_audio', { format, reason: 'codec', codec: track.codec, objectType: track.oti })
  const headerRate = track.sampleRate || track.timescale
  checkSampleRate(headerRate, format)
  // Fragmented files (recorders) leave the duration 0 in mdhd; the mixer's frame cap still holds.
  if (track.timescale > 0 && track.duration > 0) checkDuration(track.duration / track.timescale, limits, format)

  const { decoder } = await import('@audio/decode-mp4')
  const dec = await decoder()
  // SBR (HE-AAC) doubles the output rate over the core rate the sample entry gives.
  const mixer = new MonoMixer(format, Math.ceil(limits.maxDurationS * 2 * headerRate))
  let sampleRate = headerRate
  let channels = track.channels
  let errors = 0
  let first = true
  try {
    const take = (r: { channelData: Float32Array[], sampleRate: number, errors?: number }) => {
      // FAAD2 gives no output for the first access unit it sees (decoder delay) and counts it as an error.
      if (typeof r.errors === 'number') { errors += Math.max(0, r.errors - (first && r.channelData.length ? 1 : 0)); if (r.channelData.length) first = false }
      const n = framesOf({ channelData: r.channelData, sampleRate: r.sampleRate })
      if (n > 0) { sampleRate = r.sampleRate || sampleRate; channels = r.channelData.length; mixer.push(r.channelData, n) }
    }
    for (let p = 0; p < b.length; p += CHUNK_BYTES) take(await dec.decode(b.subarray(p, p + CHUNK_BYTES)))
    take(await dec.flush())
  } finally {
    dec.free()
  }
  if (errors > 0) throw new AnalysisError('corrupt', { format, reason: 'decoder_errors', count: errors })
  checkSampleRate(sampleRate, format)
  if (sampleRate !== headerRate && sampleRate !== 2 * headerRate) {
    throw new AnalysisError('corrupt', { format, reason: 'sample_rate_mismatch', headerRate, sampleRate })
  }
  checkDuration(mixer.frames / sampleRate, limits, format)
  requireFrames(mixer.frames, sampleRate, info.truncated, format)
  return result(mixer, sampleRate, channels, info.truncated)
}

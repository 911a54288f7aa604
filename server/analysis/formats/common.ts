// Shared by the container readers: limits, checks, the streaming mono mixer and codec results.
import { AnalysisError } from '../errors'

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
export const CLIP_LEVEL = 0.999
/** Float samples beyond ±1000 (60 dB over full scale) are damage, treated like NaN. */
export const MAX_MAGNITUDE = 1000
/** More non-finite samples than this share means the stream is damaged, not just odd. */
export const MAX_NON_FINITE_SHARE = 0.001
export const CHUNK_BYTES = 1 << 20

// ---- shared helpers -----------------------------------------------------------------------------

export interface Limits { maxDurationS: number, opusRate: OpusRate }

export function isAscii (b: Uint8Array, at: number, s: string): boolean {
  if (at + s.length > b.length) return false
  for (let i = 0; i < s.length; i++) if (b[at + i] !== s.charCodeAt(i)) return false
  return true
}

export function checkSampleRate (sampleRate: number, format: AudioFormat) {
  if (!Number.isFinite(sampleRate) || sampleRate <= 0) throw new AnalysisError('corrupt', { format, reason: 'sample_rate', sampleRate })
  if (sampleRate < MIN_SAMPLE_RATE || sampleRate > MAX_SAMPLE_RATE) {
    throw new AnalysisError('not_audio', { format, reason: 'unsupported_sample_rate', sampleRate })
  }
}

export function checkDuration (durationS: number, limits: Limits, format: AudioFormat) {
  if (durationS > limits.maxDurationS) throw new AnalysisError('too_long', { format, durationS, maxDurationS: limits.maxDurationS })
}

/** Accumulates decoded chunks as a mono mix with level statistics, so memory stays one mono copy. */
export class MonoMixer {
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

export function result (mixer: MonoMixer, sampleRate: number, channels: number, truncated: boolean): DecodedAudio {
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
export function requireFrames (frames: number, sampleRate: number, truncated: boolean, format: AudioFormat) {
  if (frames === 0) throw new AnalysisError('corrupt', { format, reason: 'no_audio_frames' })
  if (truncated && frames / sampleRate < MIN_TRUNCATED_S) {
    throw new AnalysisError('corrupt', { format, reason: 'truncated', decodedS: frames / sampleRate })
  }
}

export interface CodecErrorLike { message: string }
export interface DecodedChunk { channelData: Float32Array[], samplesDecoded?: number, sampleRate: number, errors?: CodecErrorLike[] }

export function framesOf (r: DecodedChunk): number {
  const len = r.channelData?.[0]?.length ?? 0
  return r.samplesDecoded != null ? Math.min(r.samplesDecoded, len) : len
}

export function failOnCodecErrors (r: DecodedChunk, format: AudioFormat) {
  if (r.errors && r.errors.length > 0) {
    throw new AnalysisError('corrupt', { format, reason: 'decoder_errors', first: r.errors[0]!.message, count: r.errors.length })
  }
}

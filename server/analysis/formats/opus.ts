// Opus packets and their OpusHead, decoded by the libopus core of @audio/decode-opus.
import { AnalysisError } from '../errors'
import { type AudioFormat, type DecodedAudio, type DecodedChunk, type Limits, MonoMixer, checkDuration, failOnCodecErrors, framesOf, isAscii, requireFrames } from './common'

// ---- Opus packets (RFC 6716) and the OpusHead (RFC 7845), shared by Ogg and WebM ---------------

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

export interface OpusHead {
  channels: number
  preSkip: number
  outputGain: number
  streamCount?: number
  coupledStreamCount?: number
  channelMappingTable?: number[]
}

/** OpusHead (RFC 7845 §5.1): channel count, pre-skip, output gain and the channel mapping. */
export function parseOpusHead (h: Uint8Array | null, format: AudioFormat): OpusHead | null {
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
export async function decodeOpusPackets (packets: Uint8Array[], head: OpusHead, format: AudioFormat, limits: Limits, endSamples: number, truncated: boolean): Promise<DecodedAudio> {
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

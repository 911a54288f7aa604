// Decodes an uploaded take to a mono Float32 signal at the file's own sample rate.
// The container is sniffed from the bytes (never from a file name). WAV is read by hand (fast,
// exact, checks sizes from the header before touching samples). FLAC, MP3 and Ogg Vorbis go to
// the WebAssembly decoders of the @audio/decode family (libFLAC, mpg123, libvorbis). Opus is
// demuxed here, from Ogg (pages CRC-checked, end trimmed by granule position) or from
// WebM/Matroska (what browser recorders stream: unknown-size Segment and Clusters, no Duration,
// no Cues), and its packets go to the libopus core of @audio/decode-opus. AAC in MP4/M4A (what
// Safari's recorder writes, and phone voice memos) is checked here (ftyp, moov, the audio track's
// codec) and demuxed and decoded by @audio/decode-mp4 with FAAD2 from @audio/decode-aac.
// One reader per container lives in formats/; this file sniffs the format and dispatches.

import { AnalysisError } from './errors'
import { type AudioFormat, DEFAULT_MAX_BYTES, DEFAULT_MAX_DURATION_S, type DecodeOptions, type DecodedAudio, type Limits, isAscii } from './formats/common'
import { decodeWavBytes, readWavHeader } from './formats/wav'
import { decodeFlac, readFlacInfo } from './formats/flac'
import { decodeMp3, findMpegStart, id3End } from './formats/mp3'
import { decodeOggOpus, decodeOggVorbis, oggFirstPacket } from './formats/ogg'
import { decodeWebmOpus, parseMatroska } from './formats/matroska'
import { decodeMp4Aac, explainMp4, isAacTrack, isMp4, readMp4Info } from './formats/mp4'

export type { AudioFormat, DecodedAudio, DecodeOptions, OpusRate } from './formats/common'
export { DEFAULT_MAX_BYTES, DEFAULT_MAX_DURATION_S, MAX_SAMPLE_RATE, MIN_SAMPLE_RATE, MIN_TRUNCATED_S } from './formats/common'
export { opusPacketSamples } from './formats/opus'

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

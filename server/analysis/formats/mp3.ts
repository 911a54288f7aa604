// MP3: MPEG-1/2/2.5 audio frames found here, decoded by mpg123 (@audio/decode-mp3).
import { CHUNK_BYTES, type DecodedAudio, type DecodedChunk, type Limits, MonoMixer, checkDuration, checkSampleRate, failOnCodecErrors, framesOf, isAscii, requireFrames, result } from './common'

// ---- MP3 (MPEG-1/2/2.5 audio, layers I–III) -----------------------------------------------------

export const MPEG_RATES = [[11025, 12000, 8000], [0, 0, 0], [22050, 24000, 16000], [44100, 48000, 32000]]
export const BITRATES: Record<string, number[]> = {
  '1-1': [0, 32, 64, 96, 128, 160, 192, 224, 256, 288, 320, 352, 384, 416, 448],
  '1-2': [0, 32, 48, 56, 64, 80, 96, 112, 128, 160, 192, 224, 256, 320, 384],
  '1-3': [0, 32, 40, 48, 56, 64, 80, 96, 112, 128, 160, 192, 224, 256, 320],
  '2-1': [0, 32, 48, 56, 64, 80, 96, 112, 128, 144, 160, 176, 192, 224, 256],
  '2-2': [0, 8, 16, 24, 32, 40, 48, 56, 64, 80, 96, 112, 128, 144, 160],
}

export interface MpegFrame { sampleRate: number, channels: number, bitrate: number, length: number, samplesPerFrame: number }

export function mpegFrame (b: Uint8Array, p: number): MpegFrame | null {
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
export function id3End (b: Uint8Array): number {
  if (!isAscii(b, 0, 'ID3') || b.length < 10) return 0
  const size = ((b[6]! & 0x7f) << 21) | ((b[7]! & 0x7f) << 14) | ((b[8]! & 0x7f) << 7) | (b[9]! & 0x7f)
  const footer = (b[5]! & 0x10) ? 10 : 0
  return 10 + size + footer
}

/** Offset of the first MPEG audio frame confirmed by the next frame header (or the end of the file). */
export function findMpegStart (b: Uint8Array, from: number): number {
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

export async function decodeMp3 (b: Uint8Array, limits: Limits): Promise<DecodedAudio> {
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

export function indexOfAscii (b: Uint8Array, s: string): number {
  outer: for (let i = 0; i + s.length <= b.length; i++) {
    for (let k = 0; k < s.length; k++) if (b[i + k] !== s.charCodeAt(k)) continue outer
    return i
  }
  return -1
}

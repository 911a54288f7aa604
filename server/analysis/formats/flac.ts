// FLAC: stream info and frame headers read here, audio decoded by libFLAC (@audio/decode-flac).
import { AnalysisError } from '../errors'
import { CHUNK_BYTES, type DecodedAudio, type DecodedChunk, type Limits, MonoMixer, checkDuration, checkSampleRate, failOnCodecErrors, framesOf, isAscii, requireFrames, result } from './common'
import { id3End } from './mp3'

// ---- FLAC ---------------------------------------------------------------------------------------

export interface FlacInfo { sampleRate: number, channels: number, totalSamples: number, maxBlock: number, start: number }

export function readFlacInfo (b: Uint8Array): FlacInfo {
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

export async function decodeFlac (b: Uint8Array, limits: Limits): Promise<DecodedAudio> {
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
export function flacTailSample (b: Uint8Array, info: FlacInfo): number | null {
  const from = Math.max(info.start + 42, b.length - 65536)
  let found: number | null = null
  for (let p = from; p + 16 < b.length; p++) {
    if (b[p] !== 0xff || (b[p + 1]! & 0xfe) !== 0xf8) continue
    const n = parseFlacFrameHeader(b, p, info)
    if (n !== null) found = n
  }
  return found
}

export function parseFlacFrameHeader (b: Uint8Array, p: number, info: FlacInfo): number | null {
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

export function crc8 (b: Uint8Array, from: number, to: number): number {
  let crc = 0
  for (let i = from; i < to; i++) {
    crc ^= b[i]!
    for (let k = 0; k < 8; k++) crc = crc & 0x80 ? ((crc << 1) ^ 0x07) & 0xff : (crc << 1) & 0xff
  }
  return crc
}

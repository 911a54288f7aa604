// Ogg (RFC 3533) pages with Vorbis (libvorbis) or Opus (RFC 7845) packets.
import { AnalysisError } from '../errors'
import { type AudioFormat, CHUNK_BYTES, type DecodedAudio, type DecodedChunk, type Limits, MonoMixer, checkDuration, checkSampleRate, failOnCodecErrors, framesOf, isAscii, requireFrames, result } from './common'
import { decodeOpusPackets, parseOpusHead } from './opus'

// ---- Ogg (RFC 3533) with Vorbis or Opus (RFC 7845) ----------------------------------------------

export function oggFirstPacket (b: Uint8Array): Uint8Array | null {
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
export function oggCrc (b: Uint8Array, from: number, to: number): number {
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

export interface OggScan { lastGranule: number, truncated: boolean, packets: Uint8Array[] }

/**
 * Walks every page of the first logical stream: checks capture pattern and CRC, notes a cut-off
 * end and the last granule position, and (when asked) reassembles the packets.
 */
export function scanOgg (b: Uint8Array, format: AudioFormat, wantPackets: boolean): OggScan {
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

export function concat (parts: Uint8Array[]): Uint8Array {
  let n = 0
  for (const x of parts) n += x.length
  const out = new Uint8Array(n)
  let p = 0
  for (const x of parts) { out.set(x, p); p += x.length }
  return out
}

export async function decodeOggVorbis (b: Uint8Array, limits: Limits): Promise<DecodedAudio> {
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

export async function decodeOggOpus (b: Uint8Array, limits: Limits): Promise<DecodedAudio> {
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

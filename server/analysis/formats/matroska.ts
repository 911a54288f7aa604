// WebM / Matroska with Opus: what browser recorders stream (unknown sizes, no Duration, no Cues).
import { AnalysisError } from '../errors'
import { type DecodedAudio, type Limits } from './common'
import { decodeOpusPackets, opusPacketSamples, parseOpusHead } from './opus'

// ---- WebM / Matroska with Opus ------------------------------------------------------------------

export const EBML_ID = 0x1a45dfa3
export const SEGMENT = 0x18538067
export const CLUSTER = 0x1f43b675
// Elements that may follow a Cluster at Segment level: they end an unknown-size Cluster.
export const SEGMENT_CHILDREN = new Set([0x114d9b74, 0x1549a966, 0x1654ae6b, CLUSTER, 0x1c53bb6b, 0x1254c367, 0x1043a770, 0x1941a469, SEGMENT, EBML_ID])
export const CLUSTER_CHILDREN = new Set([0xe7, 0x5854, 0xa7, 0xab, 0xa3, 0xa0, 0xaf, 0xec, 0xbf])

export interface MkvTrack {
  number: number
  codecId: string
  codecPrivate: Uint8Array | null
  channels: number
  sampleRate: number
  codecDelayNs: number
  encoded: boolean
}

export interface MkvParse {
  docType: string
  track: MkvTrack | null
  packets: Uint8Array[]
  /** DiscardPadding of the last block, in ns (trims encoder padding at the end). */
  endPaddingNs: number
  truncated: boolean
}

export interface ElHeader { id: number, size: number /* -1 = unknown */, data: number }

export class Truncated extends Error {}

/** Reads an element header at p; Truncated when the file ends inside it, null when the bytes are not EBML. */
export function readElement (b: Uint8Array, p: number): ElHeader | null {
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

export function readUint (b: Uint8Array, from: number, to: number): number {
  let v = 0
  for (let i = from; i < to; i++) v = v * 256 + b[i]!
  return v
}

export function readInt (b: Uint8Array, from: number, to: number): number {
  if (to <= from) return 0
  const u = readUint(b, from, to)
  const bits = 8 * (to - from)
  return b[from]! & 0x80 ? u - 2 ** bits : u
}

export function readFloat (b: Uint8Array, from: number, to: number): number {
  const v = new DataView(b.buffer, b.byteOffset + from, to - from)
  return to - from === 4 ? v.getFloat32(0) : to - from === 8 ? v.getFloat64(0) : 0
}

export function readString (b: Uint8Array, from: number, to: number): string {
  let s = ''
  for (let i = from; i < to && b[i] !== 0; i++) s += String.fromCharCode(b[i]!)
  return s
}

/** Iterates the sized children of [from, to). */
export function * children (b: Uint8Array, from: number, to: number): Generator<ElHeader & { end: number }> {
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

export function parseTrack (b: Uint8Array, from: number, to: number): MkvTrack & { type: number } {
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
export function parseMatroska (b: Uint8Array, headerOnly: boolean): MkvParse {
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
export function readCluster (b: Uint8Array, h: ElHeader, segEnd: number, out: MkvParse): number {
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
export function readBlock (b: Uint8Array, from: number, to: number, out: MkvParse): boolean {
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

export function readLaceVint (b: Uint8Array, p: number): { value: number, len: number, next: number } {
  const s0 = b[p]
  if (s0 === undefined || s0 === 0) throw new AnalysisError('corrupt', { format: 'webm-opus', reason: 'lacing', offset: p })
  const len = Math.clz32(s0) - 23
  let value = s0 & (0xff >> len)
  for (let i = 1; i < len; i++) value = value * 256 + b[p + i]!
  return { value, len, next: p + len }
}

/** Samples (at 48 kHz) in one Opus packet, from its TOC byte (RFC 6716 §3.1); 0 when malformed. */
export async function decodeWebmOpus (b: Uint8Array, limits: Limits): Promise<DecodedAudio> {
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

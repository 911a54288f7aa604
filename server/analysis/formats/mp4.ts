// MP4 / M4A with AAC: checked here (ftyp, moov, the track's codec), demuxed and decoded by @audio/decode-mp4 with FAAD2.
import { AnalysisError } from '../errors'
import { CHUNK_BYTES, type DecodedAudio, type Limits, MonoMixer, checkDuration, checkSampleRate, framesOf, isAscii, requireFrames, result } from './common'

// ---- MP4 / M4A with AAC (ISO/IEC 14496-12 boxes, 14496-14 esds, 14496-3 AAC) --------------------

// Brands of files that carry plain audio: iTunes/Apple audio, the ISO base and MP4 families, 3GPP
// (phone recorders), DASH/CMAF fragments (browser recorders) and QuickTime.
export const MP4_BRANDS = new Set(['M4A ', 'M4B ', 'M4P ', 'mp41', 'mp42', 'isom', 'iso2', 'iso3', 'iso4', 'iso5', 'iso6', 'iso7', 'iso8', 'iso9',
  'avc1', 'dash', 'cmfc', 'cmf2', 'msdh', 'msix', '3gp4', '3gp5', '3gp6', '3g2a', 'qt  ', 'MSNV', 'mp4a', 'f4a '])
// objectTypeIndication values for AAC: MPEG-4 audio, and MPEG-2 AAC Main, LC and SSR profiles.
export const AAC_OTI = new Set([0x40, 0x66, 0x67, 0x68])
export const MP4_CONTAINERS = new Set(['trak', 'mdia', 'minf', 'stbl'])

export interface Mp4Track { codec: string, oti: number | null, channels: number, sampleRate: number, timescale: number, duration: number }
export interface Mp4Info { track: Mp4Track | null, moov: boolean, truncated: boolean }

export function u32 (b: Uint8Array, at: number): number {
  return ((b[at]! << 24) >>> 0) + ((b[at + 1]! << 16) | (b[at + 2]! << 8) | b[at + 3]!)
}

export function boxType (b: Uint8Array, at: number): string {
  return String.fromCharCode(b[at]!, b[at + 1]!, b[at + 2]!, b[at + 3]!)
}

/** An ISO BMFF file: an 'ftyp' box first whose major or a compatible brand is one we take. */
export function isMp4 (b: Uint8Array): boolean {
  if (b.length < 16 || !isAscii(b, 4, 'ftyp')) return false
  const size = u32(b, 0)
  if (size < 16 || size > 4096) return false
  const end = Math.min(size, b.length)
  if (MP4_BRANDS.has(boxType(b, 8))) return true
  for (let p = 16; p + 4 <= end; p += 4) if (MP4_BRANDS.has(boxType(b, p))) return true
  return false
}

/** Iterates the boxes of [from, to): type, body start and end (clipped to the bytes we have). */
export function * mp4Boxes (b: Uint8Array, from: number, to: number, out: Mp4Info): Generator<{ type: string, body: number, end: number }> {
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
export function readMp4Info (b: Uint8Array): Mp4Info {
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

export function readMp4Track (b: Uint8Array, from: number, to: number, out: Mp4Info): Mp4Track | null {
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
export function esdsObjectType (b: Uint8Array, from: number, to: number): number | null {
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

export function isAacTrack (t: Mp4Track): boolean {
  return t.codec === 'mp4a' && (t.oti === null || AAC_OTI.has(t.oti))
}

/** An MP4 we do not take: another codec is not ours; damage before the audio track is corrupt. */
export function explainMp4 (b: Uint8Array) {
  if (!isMp4(b)) return
  const info = readMp4Info(b)
  if (info.track && !isAacTrack(info.track)) {
    throw new AnalysisError('not_audio', { format: 'mp4-aac', reason: 'codec', codec: info.track.codec, objectType: info.track.oti })
  }
}

export async function decodeMp4Aac (b: Uint8Array, limits: Limits): Promise<DecodedAudio> {
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

// WAV writer for synthetic takes, fixtures and benchmarks. Follows the Microsoft RIFF/WAVE
// specification (Multimedia Programming Interface and Data Specifications 1.0) and its
// WAVE_FORMAT_EXTENSIBLE addendum: little-endian, 8-bit PCM unsigned, wider PCM signed.

export interface WavFormat {
  /** Bits per sample: 8/16/24/32 for PCM, 32/64 for float. Default 16 (32 when float). */
  bits?: 8 | 16 | 24 | 32 | 64
  /** IEEE float samples (format tag 3) instead of integer PCM (tag 1). */
  float?: boolean
  /** Write a WAVE_FORMAT_EXTENSIBLE header (tag 0xFFFE). Default: only for more than two channels. */
  extensible?: boolean
}

export const WAVE_FORMAT_PCM = 0x0001
export const WAVE_FORMAT_IEEE_FLOAT = 0x0003
export const WAVE_FORMAT_EXTENSIBLE = 0xfffe

// Tail shared by the KSDATAFORMAT_SUBTYPE_* GUIDs: {0000xxxx-0000-0010-8000-00aa00389b71}.
const GUID_TAIL = [0x00, 0x00, 0x00, 0x00, 0x10, 0x00, 0x80, 0x00, 0x00, 0xaa, 0x00, 0x38, 0x9b, 0x71]

// Speaker masks for the usual layouts (mono = front centre, stereo = FL|FR, 5.1 = 0x3F, 7.1 = 0x63F).
const CHANNEL_MASKS: Record<number, number> = { 1: 0x4, 2: 0x3, 3: 0x7, 4: 0x33, 5: 0x37, 6: 0x3f, 7: 0x13f, 8: 0x63f }

/** Encode float samples (−1…1, one array per channel, or one array for mono) as a WAV file. */
export function encodeWav (channels: Float32Array[] | Float32Array, sampleRate: number, format: WavFormat = {}): Uint8Array {
  const chans = channels instanceof Float32Array ? [channels] : channels
  if (chans.length < 1 || chans.length > 0xffff) throw new RangeError('encodeWav needs 1 to 65535 channels')
  const frames = chans[0]!.length
  for (const c of chans) if (c.length !== frames) throw new RangeError('encodeWav channels differ in length')
  if (!Number.isInteger(sampleRate) || sampleRate < 1 || sampleRate > 0xffffffff) throw new RangeError('encodeWav needs a positive integer sample rate')

  const float = format.float ?? false
  const bits = format.bits ?? (float ? 32 : 16)
  if (float ? bits !== 32 && bits !== 64 : ![8, 16, 24, 32].includes(bits)) {
    throw new RangeError(`encodeWav cannot write ${bits}-bit ${float ? 'float' : 'PCM'}`)
  }
  const nch = chans.length
  const extensible = format.extensible ?? nch > 2
  const bytesPer = bits / 8
  const blockAlign = nch * bytesPer
  const dataBytes = frames * blockAlign
  if (dataBytes > 0xffffffff - 100) throw new RangeError('encodeWav: data too large for a RIFF file')
  const pad = dataBytes & 1 // chunks are word aligned
  const tag = extensible ? WAVE_FORMAT_EXTENSIBLE : float ? WAVE_FORMAT_IEEE_FLOAT : WAVE_FORMAT_PCM
  // PCM has a 16-byte fmt body; non-PCM tags carry cbSize, extensible adds 22 bytes after it.
  const fmtBytes = tag === WAVE_FORMAT_PCM ? 16 : extensible ? 40 : 18
  // The spec asks for a 'fact' chunk (frame count) in every non-PCM file.
  const factBytes = tag === WAVE_FORMAT_PCM ? 0 : 12
  const total = 12 + 8 + fmtBytes + factBytes + 8 + dataBytes + pad
  const out = new Uint8Array(total)
  const v = new DataView(out.buffer)
  let p = 0
  const ascii = (s: string) => { for (let i = 0; i < s.length; i++) out[p++] = s.charCodeAt(i) }
  const u16 = (x: number) => { v.setUint16(p, x, true); p += 2 }
  const u32 = (x: number) => { v.setUint32(p, x, true); p += 4 }

  ascii('RIFF'); u32(total - 8); ascii('WAVE')
  ascii('fmt '); u32(fmtBytes)
  u16(tag); u16(nch); u32(sampleRate); u32(sampleRate * blockAlign); u16(blockAlign); u16(bits)
  if (tag !== WAVE_FORMAT_PCM) u16(extensible ? 22 : 0)
  if (extensible) {
    u16(bits) // valid bits per sample
    u32(CHANNEL_MASKS[nch] ?? 0)
    u16(float ? WAVE_FORMAT_IEEE_FLOAT : WAVE_FORMAT_PCM) // SubFormat GUID, first two bytes = format tag
    for (const b of GUID_TAIL) out[p++] = b
  }
  if (factBytes) { ascii('fact'); u32(4); u32(frames) }
  ascii('data'); u32(dataBytes)

  writeSamples(v, p, chans, frames, bits, float)
  return out
}

// Integer PCM: scale by 2^(bits−1) and clamp to the code range, so full scale −1 maps to the
// lowest code and +1 to the highest (0x7FFF for 16 bit); 8-bit is offset binary around 128.
function writeSamples (v: DataView, start: number, chans: Float32Array[], frames: number, bits: number, float: boolean) {
  const nch = chans.length
  let p = start
  const clean = (x: number) => (Number.isFinite(x) ? x : 0)
  if (float) {
    for (let i = 0; i < frames; i++) {
      for (let c = 0; c < nch; c++) {
        const x = clean(chans[c]![i]!)
        if (bits === 32) { v.setFloat32(p, x, true); p += 4 } else { v.setFloat64(p, x, true); p += 8 }
      }
    }
    return
  }
  const scale = 2 ** (bits - 1)
  const max = scale - 1
  const min = -scale
  for (let i = 0; i < frames; i++) {
    for (let c = 0; c < nch; c++) {
      let q = Math.round(clean(chans[c]![i]!) * scale)
      if (q > max) q = max
      else if (q < min) q = min
      switch (bits) {
        case 8: v.setUint8(p, q + 128); p += 1; break
        case 16: v.setInt16(p, q, true); p += 2; break
        case 24: v.setUint8(p, q & 0xff); v.setUint8(p + 1, (q >> 8) & 0xff); v.setUint8(p + 2, (q >> 16) & 0xff); p += 3; break
        default: v.setInt32(p, q, true); p += 4
      }
    }
  }
}

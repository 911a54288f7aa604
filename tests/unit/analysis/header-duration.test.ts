// The duration a WAV or FLAC header states, read from the first bytes as an upload arrives.
// WAV: data chunk size / (channels × bytes per sample) frames over the sample rate (Microsoft
// RIFF/WAVE; EBU Tech 3306 for RF64's ds64 size). FLAC: STREAMINFO total samples over its sample
// rate (RFC 9639 §8.2; 0 total samples means "unknown"). Fixture lengths are what the encoders were
// given, listed in tests/fixtures/audio/README.md.
import { readFileSync } from 'node:fs'
import { dirname, join } from 'node:path'
import { fileURLToPath } from 'node:url'
import { describe, expect, it } from 'vitest'
import { decodeAudio, headerDurationS } from '../../../server/analysis/decode'
import { encodeWav } from '../../../server/analysis/wav'

const dir = join(dirname(fileURLToPath(import.meta.url)), '..', '..', 'fixtures', 'audio')
const fixture = (name: string) => new Uint8Array(readFileSync(join(dir, name)))

/** Byte offset of the size field of the WAV's data chunk. */
function dataSizeAt (wav: Uint8Array): number {
  for (let p = 12; p + 8 <= wav.length; p++) {
    if (wav[p] === 0x64 && wav[p + 1] === 0x61 && wav[p + 2] === 0x74 && wav[p + 3] === 0x61) return p + 4
  }
  throw new Error('no data chunk')
}

describe('headerDurationS on WAV headers written by encodeWav', () => {
  it('reads frames / rate from the data chunk size, for PCM and float, mono and stereo', () => {
    // 8000 frames at 8 kHz is 1 s, whatever the sample width (frames = bytes / block align).
    expect(headerDurationS(encodeWav(new Float32Array(8000), 8000))).toBe(1)
    expect(headerDurationS(encodeWav(new Float32Array(8000), 8000, { bits: 24 }))).toBe(1)
    expect(headerDurationS(encodeWav(new Float32Array(4410), 44100, { float: true }))).toBeCloseTo(0.1, 12)
    const stereo = encodeWav([new Float32Array(24000), new Float32Array(24000)], 48000)
    expect(headerDurationS(stereo)).toBe(0.5)
  })

  it('needs only the header: the first 256 KB of a long file state its full length', () => {
    const wav = encodeWav(new Float32Array(6 * 44100), 44100) // 6 s, about 530 KB
    expect(headerDurationS(wav.subarray(0, 256 * 1024))).toBe(6)
    expect(headerDurationS(wav.subarray(0, 44 + 2))).toBe(6)
  })

  it('reports what a forged header claims, even with little audio behind it', () => {
    const wav = encodeWav(new Float32Array(8000), 8000)
    const v = new DataView(wav.buffer, wav.byteOffset, wav.byteLength)
    // 21 minutes of 16-bit mono at 8 kHz: 21 × 60 × 8000 × 2 bytes.
    v.setUint32(dataSizeAt(wav), 21 * 60 * 8000 * 2, true)
    expect(headerDurationS(wav)).toBe(21 * 60)
  })

  it('is null when a streaming writer left the size unset (0 or 0xFFFFFFFF)', () => {
    for (const size of [0, 0xffffffff]) {
      const wav = encodeWav(new Float32Array(8000), 8000)
      new DataView(wav.buffer, wav.byteOffset, wav.byteLength).setUint32(dataSizeAt(wav), size, true)
      expect(headerDurationS(wav), `size ${size}`).toBeNull()
    }
  })

  it('is null while the header is incomplete, and for bytes that are not a WAV header', () => {
    const wav = encodeWav(new Float32Array(8000), 8000)
    expect(headerDurationS(wav.subarray(0, 12))).toBeNull() // RIFF/WAVE only
    expect(headerDurationS(wav.subarray(0, 30))).toBeNull() // inside the fmt chunk
    expect(headerDurationS(new Uint8Array(0))).toBeNull()
    expect(headerDurationS(new TextEncoder().encode('RIFF....WAVEnot a header at all'))).toBeNull()
  })
})

describe('headerDurationS on the WAV and FLAC fixtures', () => {
  // [file, seconds from tests/fixtures/audio/README.md]
  const cases: [string, number][] = [
    ['wav-pcm16-mono-44100-440.wav', 1],
    ['wav-pcm16-stereo-48000-220.wav', 0.5],
    ['wav-ext-pcm24-stereo-44100-220.wav', 0.25],
    ['wav-rf64-pcm16-mono-8000-440.wav', 1], // size from the ds64 chunk
    ['wav-pcm16-mono-8000-220-list-chunk.wav', 1], // LIST chunk before data
    ['wav-truncated-1.5s-of-2s-8000-440.wav', 2], // the header still says 2 s
    ['flac-mono-44100-440.flac', 1],
    ['flac-stereo-96000-220.flac', 0.5],
    ['flac-24bit-mono-192000-440.flac', 0.25],
    ['flac-mono-8000-220.flac', 1],
    ['flac-truncated-70pct-of-2s-220.flac', 2], // STREAMINFO was written for the whole 2 s
  ]
  for (const [name, s] of cases) {
    it(`${name} states ${s} s`, () => {
      const bytes = fixture(name)
      expect(headerDurationS(bytes)).toBeCloseTo(s, 9)
      // The header alone is enough.
      expect(headerDurationS(bytes.subarray(0, Math.min(bytes.length, 4096)))).toBeCloseTo(s, 9)
    })
  }

  it('agrees with the full decode of the complete files', async () => {
    for (const [name] of cases.filter(([n]) => !n.includes('truncated'))) {
      const bytes = fixture(name)
      const decoded = await decodeAudio(bytes)
      expect(headerDurationS(bytes), name).toBeCloseTo(decoded.durationS, 9)
    }
  })

  it('is null for FLAC whose STREAMINFO gives 0 total samples (length unknown)', () => {
    const flac = fixture('flac-mono-44100-440.flac').slice()
    // STREAMINFO fields start at byte 8; total samples are the low 4 bits of byte 21 and bytes 22–25.
    flac[21] = flac[21]! & 0xf0
    flac.fill(0, 22, 26)
    expect(headerDurationS(flac)).toBeNull()
  })

  it('is null for formats whose length is left to the analysis', () => {
    for (const name of ['mp3-mono-44100-440.mp3', 'opus-mono-48000-440.opus', 'vorbis-mono-44100-440.ogg', 'webm-opus-mono-48000-440.webm', 'not-audio-noise.bin']) {
      expect(headerDurationS(fixture(name)), name).toBeNull()
    }
  })
})

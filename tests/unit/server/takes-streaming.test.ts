// Pure helpers of the take upload and audio routes: byte ranges and format sniffing.
import { readFileSync } from 'node:fs'
import { join } from 'node:path'
import { describe, expect, it } from 'vitest'
import { parseByteRange } from '../../../server/utils/range'
import { sniffAudio, AUDIO_MIME } from '../../../server/utils/audio-sniff'

/** The range as the explicit "bytes=a-b" asked of the store. */
function normaliseRange (header: string | undefined, size: number) {
  const r = parseByteRange(header, size)
  return r === null || r === 'unsatisfiable' ? r : `bytes=${r.start}-${r.end}`
}

const FIXTURES = join(import.meta.dirname, '../../fixtures/audio')

describe('parseByteRange (RFC 9110 §14.1.2, examples for a 10000-byte representation)', () => {
  it.each([
    ['bytes=0-499', 'bytes=0-499'], // "The first 500 bytes"
    ['bytes=500-999', 'bytes=500-999'], // "The second 500 bytes"
    ['bytes=-500', 'bytes=9500-9999'], // "The final 500 bytes" (suffix range)
    ['bytes=9500-', 'bytes=9500-9999'], // "The final 500 bytes" (open range)
    ['bytes=0-0', 'bytes=0-0'], // "The first byte only"
    ['bytes=-1', 'bytes=9999-9999'], // "The last byte only"
    ['bytes=9500-20000', 'bytes=9500-9999'], // last-pos past the end: the remainder (§14.1.2)
    ['bytes=-20000', 'bytes=0-9999'], // suffix longer than the data: the whole representation
    ['BYTES = 10 - 20', 'bytes=10-20'], // case-insensitive unit, optional whitespace
  ])('%s → %s', (header, want) => {
    expect(normaliseRange(header, 10000)).toBe(want)
  })

  it.each([
    ['bytes=10000-'], // first-pos at the length: unsatisfiable (§14.1.1)
    ['bytes=-0'], // a zero-length suffix is unsatisfiable (§14.1.1)
  ])('%s → unsatisfiable', (header) => {
    expect(normaliseRange(header, 10000)).toBe('unsatisfiable')
  })

  it.each([
    [undefined], ['bytes=0-1,5-6'], ['items=0-5'], ['bytes=-'], ['bytes=20-10'],
  ])('%s → the whole representation', (header) => {
    expect(normaliseRange(header, 10000)).toBeNull()
  })
})

describe('sniffAudio', () => {
  const head = (name: string, n = 256 * 1024) => new Uint8Array(readFileSync(join(FIXTURES, name))).subarray(0, n)

  it.each([
    ['wav-pcm16-mono-44100-440.wav', 'wav'],
    ['flac-mono-44100-440.flac', 'flac'],
    ['mp3-id3-mono-44100-220.mp3', 'mp3'],
    ['vorbis-mono-44100-440.ogg', 'ogg-vorbis'],
    ['opus-mono-48000-440.opus', 'ogg-opus'],
    ['webm-recorder-opus-mono-48000-440.webm', 'webm-opus'],
  ])('%s is %s from its first bytes', (name, format) => {
    expect(sniffAudio(head(name), true)).toBe(format)
    expect(AUDIO_MIME[format as keyof typeof AUDIO_MIME]).toMatch(/^audio\//)
  })

  it('names text and noise as unknown once the file is complete, and waits for more bytes before that', () => {
    expect(sniffAudio(head('not-audio-text.wav'), true)).toBe('unknown')
    expect(sniffAudio(head('not-audio-noise.bin'), true)).toBe('unknown')
    expect(sniffAudio(head('not-audio-text.wav', 3), false)).toBeNull()
  })

  it('reads past an ID3 tag before deciding', () => {
    // ID3v2 header declaring a 1 MiB tag (syncsafe size 0x00400000), then nothing yet.
    const tag = new Uint8Array(4096)
    tag.set([0x49, 0x44, 0x33, 4, 0, 0, 0x00, 0x40, 0x00, 0x00])
    expect(sniffAudio(tag, false)).toBeNull()
    expect(sniffAudio(tag, true)).toBe('unknown')
  })
})

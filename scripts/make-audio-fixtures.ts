// Generates the small audio fixtures in tests/fixtures/audio/ that the decoder tests read.
//
// Run:   npx tsx scripts/make-audio-fixtures.ts
// Needs: Debian's command-line encoders, for generating fixtures only (never used at run time):
//          apt-get install -y flac lame vorbis-tools opus-tools mkvtoolnix ffmpeg
//        (calls flac, lame, oggenc, opusenc, mkvmerge and ffmpeg; made with flac 1.4.2, LAME 3.100,
//        vorbis-tools 1.4.2, opus-tools 0.2 / libopus 1.3.1, mkvmerge 74.0.0, ffmpeg 5.1 from Debian 12).
// Output: every file listed in tests/fixtures/audio/README.md, rewritten in place. WAV files come
//         from our own encoder (server/analysis/wav.ts); compressed ones are encoded from WAV
//         sources built the same way. Serial numbers and seeds are fixed so a re-run gives the
//         same WAVs and, with the same encoder versions, the same compressed files.
// Budget: the whole folder stays under about 1.5 MB (high sample rates get shorter tones).

import { execFileSync } from 'node:child_process'
import { mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync, readdirSync, statSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { dirname, join } from 'node:path'
import { fileURLToPath } from 'node:url'
import { encodeWav, type WavFormat } from '../server/analysis/wav'

const root = join(dirname(fileURLToPath(import.meta.url)), '..')
const outDir = join(root, 'tests', 'fixtures', 'audio')
const work = mkdtempSync(join(tmpdir(), 'driftline-fixtures-'))

/** A sine per channel: same frequency and phase, its own amplitude, 10 ms fades against clicks. */
function tone (sampleRate: number, durationS: number, hz: number, amps: number[]): Float32Array[] {
  const n = Math.round(sampleRate * durationS)
  const fade = Math.round(sampleRate * 0.01)
  return amps.map((a) => {
    const x = new Float32Array(n)
    for (let i = 0; i < n; i++) {
      const env = Math.min(1, i / fade, (n - 1 - i) / fade)
      x[i] = a * env * Math.sin(2 * Math.PI * hz * i / sampleRate)
    }
    return x
  })
}

function write (name: string, bytes: Uint8Array) {
  writeFileSync(join(outDir, name), bytes)
}

function run (cmd: string, args: string[]) {
  execFileSync(cmd, args, { stdio: ['ignore', 'ignore', 'inherit'] })
}

/** Writes a 16-bit (or 24-bit) WAV source into the scratch folder and returns its path. */
function source (name: string, sampleRate: number, durationS: number, hz: number, amps: number[], format: WavFormat = { bits: 16 }) {
  const path = join(work, name + '.wav')
  writeFileSync(path, encodeWav(tone(sampleRate, durationS, hz, amps), sampleRate, format))
  return path
}

// ---- Ogg page reader and a recorder-style WebM writer ---------------------------------------

/** Splits an Ogg stream into its packets (RFC 3533 page layout). */
function oggPackets (bytes: Uint8Array): Uint8Array[] {
  const packets: Uint8Array[] = []
  let pending: number[] = []
  let p = 0
  while (p + 27 <= bytes.length) {
    if (bytes[p] !== 0x4f || bytes[p + 1] !== 0x67 || bytes[p + 2] !== 0x67 || bytes[p + 3] !== 0x53) throw new Error('bad Ogg page')
    const nseg = bytes[p + 26]!
    const lacing = bytes.subarray(p + 27, p + 27 + nseg)
    let q = p + 27 + nseg
    for (const len of lacing) {
      for (let i = 0; i < len; i++) pending.push(bytes[q + i]!)
      q += len
      if (len < 255) { packets.push(Uint8Array.from(pending)); pending = [] }
    }
    p = q
  }
  return packets
}

const UNKNOWN = -1
function vint (n: number): number[] {
  if (n === UNKNOWN) return [0x01, 0xff, 0xff, 0xff, 0xff, 0xff, 0xff, 0xff]
  for (let len = 1; len <= 8; len++) {
    if (n < 2 ** (7 * len) - 1) {
      const out: number[] = []
      let v = n
      for (let i = len - 1; i >= 0; i--) { out[i] = v & 0xff; v = Math.floor(v / 256) }
      out[0]! |= 0x80 >> (len - 1)
      return out
    }
  }
  throw new Error('EBML size too large')
}
function el (id: number[], body: number[] | Uint8Array, size = body.length): number[] {
  return [...id, ...vint(size), ...body]
}
const uint = (v: number, bytes = 1) => Array.from({ length: bytes }, (_, i) => (v >> (8 * (bytes - 1 - i))) & 0xff)
const str = (s: string) => Array.from(s, c => c.charCodeAt(0))
const f64 = (v: number) => { const b = new Uint8Array(8); new DataView(b.buffer).setFloat64(0, v); return Array.from(b) }

/**
 * Writes Opus packets the way a browser recorder streams them: Segment and Clusters of unknown
 * size, no SeekHead, no Cues, no Duration, SimpleBlocks, a new Cluster every `clusterMs`.
 */
function recorderWebm (opusHead: Uint8Array, packets: Uint8Array[], channels: number, frameMs: number, clusterMs: number): Uint8Array {
  const ebmlHeader = el([0x1a, 0x45, 0xdf, 0xa3], [
    ...el([0x42, 0x86], uint(1)), ...el([0x42, 0xf7], uint(1)), ...el([0x42, 0xf2], uint(4)),
    ...el([0x42, 0xf3], uint(8)), ...el([0x42, 0x82], str('webm')), ...el([0x42, 0x87], uint(4)),
    ...el([0x42, 0x85], uint(2)),
  ])
  const info = el([0x15, 0x49, 0xa9, 0x66], [
    ...el([0x2a, 0xd7, 0xb1], uint(1000000, 3)), ...el([0x4d, 0x80], str('Driftline fixture')),
    ...el([0x57, 0x41], str('Driftline fixture')),
  ])
  const tracks = el([0x16, 0x54, 0xae, 0x6b], el([0xae], [
    ...el([0xd7], uint(1)), ...el([0x73, 0xc5], uint(0x2a2a2a2a, 4)), ...el([0x83], uint(2)),
    ...el([0x86], str('A_OPUS')), ...el([0x63, 0xa2], opusHead),
    ...el([0xe1], [...el([0xb5], f64(48000)), ...el([0x9f], uint(channels))]),
  ]))
  const body: number[] = [...info, ...tracks]
  let clusterStart = -Infinity
  packets.forEach((pkt, i) => {
    const t = Math.round(i * frameMs)
    if (t - clusterStart >= clusterMs) {
      clusterStart = t
      body.push(0x1f, 0x43, 0xb6, 0x75, ...vint(UNKNOWN), ...el([0xe7], uint(t, 2)))
    }
    const rel = t - clusterStart
    body.push(...el([0xa3], [0x81, (rel >> 8) & 0xff, rel & 0xff, 0x80, ...pkt]))
  })
  return Uint8Array.from([...ebmlHeader, 0x18, 0x53, 0x80, 0x67, ...vint(UNKNOWN), ...body])
}

/** Turns a RIFF WAV into RF64 (EBU Tech 3306): 'RF64', a ds64 chunk with the real sizes, 0xFFFFFFFF placeholders. */
function toRf64 (wav: Uint8Array): Uint8Array {
  const v = new DataView(wav.buffer, wav.byteOffset, wav.byteLength)
  const fmtSize = v.getUint32(16, true)
  const dataAt = 20 + fmtSize // 'data' chunk header of an encodeWav PCM file
  const dataSize = v.getUint32(dataAt + 4, true)
  const frames = dataSize / v.getUint16(32, true)
  const out = new Uint8Array(wav.length + 36)
  const o = new DataView(out.buffer)
  out.set(wav.subarray(0, 12)); out.set([0x52, 0x46, 0x36, 0x34], 0); o.setUint32(4, 0xffffffff, true)
  out.set([0x64, 0x73, 0x36, 0x34], 12); o.setUint32(16, 28, true)
  o.setBigUint64(20, BigInt(out.length - 8), true); o.setBigUint64(28, BigInt(dataSize), true)
  o.setBigUint64(36, BigInt(frames), true); o.setUint32(44, 0, true)
  out.set(wav.subarray(12), 48)
  o.setUint32(48 + dataAt - 12 + 4, 0xffffffff, true)
  return out
}

// ---- the fixtures ----------------------------------------------------------------------------

mkdirSync(outDir, { recursive: true })
for (const f of readdirSync(outDir)) if (f !== 'README.md') rmSync(join(outDir, f), { force: true })

// WAV variants from our own writer.
write('wav-pcm8-mono-8000-440.wav', encodeWav(tone(8000, 1, 440, [0.5]), 8000, { bits: 8 }))
write('wav-pcm16-mono-44100-440.wav', encodeWav(tone(44100, 1, 440, [0.5]), 44100, { bits: 16 }))
write('wav-pcm16-stereo-48000-220.wav', encodeWav(tone(48000, 0.5, 220, [0.5, 0.3]), 48000, { bits: 16 }))
write('wav-pcm24-mono-96000-440.wav', encodeWav(tone(96000, 0.25, 440, [0.5]), 96000, { bits: 24 }))
write('wav-pcm32-mono-22050-220.wav', encodeWav(tone(22050, 0.5, 220, [0.5]), 22050, { bits: 32 }))
write('wav-float32-stereo-16000-440.wav', encodeWav(tone(16000, 0.5, 440, [0.5, 0.3]), 16000, { float: true, bits: 32 }))
write('wav-float64-mono-11025-220.wav', encodeWav(tone(11025, 0.5, 220, [0.5]), 11025, { float: true, bits: 64 }))
write('wav-pcm16-mono-192000-440.wav', encodeWav(tone(192000, 0.25, 440, [0.5]), 192000, { bits: 16 }))
write('wav-ext-pcm16-6ch-8000-440.wav', encodeWav(tone(8000, 0.5, 440, [0.6, 0.5, 0.4, 0.3, 0.2, 0.1]), 8000, { bits: 16, extensible: true }))
write('wav-ext-pcm24-stereo-44100-220.wav', encodeWav(tone(44100, 0.25, 220, [0.5, 0.3]), 44100, { bits: 24, extensible: true }))
write('wav-ext-float32-stereo-32000-440.wav', encodeWav(tone(32000, 0.25, 440, [0.5, 0.3]), 32000, { float: true, bits: 32, extensible: true }))
write('wav-rf64-pcm16-mono-8000-440.wav', toRf64(encodeWav(tone(8000, 1, 440, [0.5]), 8000, { bits: 16 })))

// A WAV with a LIST chunk of odd length (padded) before 'data', as editors write them.
{
  const plain = encodeWav(tone(8000, 1, 220, [0.5]), 8000, { bits: 16 })
  const text = str('INFOINAM\x05\x00\x00\x00tone\x00') // 17 bytes: odd, so one pad byte follows
  const list = [...str('LIST'), ...uint(text.length, 1), 0, 0, 0, ...text, 0]
  const out = new Uint8Array(plain.length + list.length)
  out.set(plain.subarray(0, 36)); out.set(list, 36); out.set(plain.subarray(36), 36 + list.length)
  new DataView(out.buffer).setUint32(4, out.length - 8, true)
  write('wav-pcm16-mono-8000-220-list-chunk.wav', out)
}

// Truncated WAVs: the header promises 2 s; one keeps 1.5 s of samples, one only 0.25 s.
{
  const full = encodeWav(tone(8000, 2, 440, [0.5]), 8000, { bits: 16 })
  write('wav-truncated-1.5s-of-2s-8000-440.wav', full.subarray(0, 44 + 8000 * 2 * 1.5))
  write('wav-truncated-0.25s-of-2s-8000-440.wav', full.subarray(0, 44 + 8000 * 2 * 0.25))
}

// A WAV header with no sample frames, a WAV whose fmt chunk is nonsense, and non-audio inputs.
write('wav-no-frames.wav', encodeWav(new Float32Array(0), 44100, { bits: 16 }))
{
  const bad = encodeWav(tone(8000, 0.5, 440, [0.5]), 8000, { bits: 16 })
  new DataView(bad.buffer).setUint16(22, 0, true) // zero channels
  write('corrupt-zero-channels.wav', bad)
}
write('empty.wav', new Uint8Array(0))
write('not-audio-text.wav', new TextEncoder().encode('Driftline fixture: this is a plain text file renamed to .wav.\n'.repeat(8)))
{
  // Deterministic noise (a linear congruential generator): not any known format.
  const noise = new Uint8Array(4096)
  let s = 12345
  for (let i = 0; i < noise.length; i++) { s = (s * 1103515245 + 12345) >>> 0; noise[i] = s >>> 24 }
  write('not-audio-noise.bin', noise)
}

// FLAC (libFLAC's command-line encoder).
function flac (name: string, src: string) {
  run('flac', ['--silent', '--best', '--force', '-o', join(outDir, name), src])
}
flac('flac-mono-44100-440.flac', source('f1', 44100, 1, 440, [0.5]))
flac('flac-stereo-96000-220.flac', source('f2', 96000, 0.5, 220, [0.5, 0.3]))
flac('flac-24bit-mono-192000-440.flac', source('f3', 192000, 0.25, 440, [0.5], { bits: 24, extensible: true }))
flac('flac-mono-8000-220.flac', source('f4', 8000, 1, 220, [0.5]))

// MP3 (LAME). The 8 kHz file is MPEG 2.5; one file starts with an ID3v2 tag.
run('lame', ['--quiet', '-b', '64', source('m1', 44100, 1, 440, [0.5]), join(outDir, 'mp3-mono-44100-440.mp3')])
run('lame', ['--quiet', '-b', '128', '--resample', '48', '-m', 's', source('m2', 48000, 1, 220, [0.5, 0.3]), join(outDir, 'mp3-stereo-48000-220.mp3')])
run('lame', ['--quiet', '-b', '16', '--resample', '8', source('m3', 8000, 1, 440, [0.5]), join(outDir, 'mp3-mono-8000-440.mp3')])
run('lame', ['--quiet', '-b', '64', '--add-id3v2', '--tt', 'Fixture tone', source('m4', 44100, 1, 220, [0.5]), join(outDir, 'mp3-id3-mono-44100-220.mp3')])

// Ogg Vorbis (oggenc), fixed serial numbers.
run('oggenc', ['--quiet', '-q', '2', '-s', '1001', '-o', join(outDir, 'vorbis-mono-44100-440.ogg'), source('v1', 44100, 1, 440, [0.5])])
run('oggenc', ['--quiet', '-q', '2', '-s', '1002', '-o', join(outDir, 'vorbis-stereo-48000-220.ogg'), source('v2', 48000, 1, 220, [0.5, 0.3])])
run('oggenc', ['--quiet', '-q', '2', '-s', '1003', '-o', join(outDir, 'vorbis-mono-8000-220.ogg'), source('v3', 8000, 1, 220, [0.5])])

// Ogg Opus (opusenc). Opus always decodes at 48 kHz; the source rate is only recorded in OpusHead.
function opus (name: string, src: string, serial: string, bitrate = '32', extra: string[] = []) {
  const path = join(outDir, name)
  run('opusenc', ['--quiet', '--bitrate', bitrate, '--serial', serial, ...extra, src, path])
  return path
}
const opusMono = opus('opus-mono-48000-440.opus', source('o1', 48000, 1, 440, [0.5]), '2001')
const opusStereo = opus('opus-stereo-44100src-220.opus', source('o2', 44100, 1, 220, [0.5, 0.3]), '2002', '48')
opus('opus-mono-8000src-440.opus', source('o3', 8000, 1, 440, [0.5]), '2003', '16')

// WebM Opus: one muxed by mkvmerge (sizes known, Cues and Duration present) and two written the
// way a browser recorder streams them (unknown sizes, no Duration, no Cues).
run('mkvmerge', ['--quiet', '--webm', '--no-date', '--deterministic', '42', '--disable-track-statistics-tags', '-o', join(outDir, 'webm-opus-mono-48000-440.webm'), opusMono])
{
  const frameMs = 20 // opusenc's default frame size
  for (const [src, name, channels] of [[opusMono, 'webm-recorder-opus-mono-48000-440.webm', 1], [opusStereo, 'webm-recorder-opus-stereo-48000-220.webm', 2]] as const) {
    const pk = oggPackets(readFileSync(src))
    const head = pk[0]!
    const audio = pk.slice(2) // skip OpusHead and OpusTags
    write(name, recorderWebm(head, audio, channels, frameMs, 400))
  }
}

// AAC in MP4/M4A (ffmpeg's own AAC-LC encoder; its 'fast' coder, as the default one overshoots on
// the onset of a tone). One file with the moov before the samples (+faststart), one fragmented
// the way a browser recorder writes it (empty moov, then moof/mdat pairs every 250 ms).
function m4a (name: string, src: string, bitrate: string, movflags: string[]) {
  const path = join(outDir, name)
  run('ffmpeg', ['-hide_banner', '-loglevel', 'error', '-y', '-i', src, '-map_metadata', '-1', '-fflags', '+bitexact', '-flags:a', '+bitexact',
    '-c:a', 'aac', '-aac_coder', 'fast', '-b:a', bitrate, ...movflags, path])
  return path
}
const m4aMono = m4a('aac-mono-44100-440.m4a', source('a1', 44100, 1, 440, [0.5]), '96k', ['-movflags', '+faststart'])
m4a('aac-fragmented-stereo-48000-220.m4a', source('a2', 48000, 1, 220, [0.5, 0.3]), '128k', ['-movflags', '+frag_keyframe+empty_moov+default_base_moof', '-frag_duration', '250000'])

// Files cut off at 70 % of their bytes (an upload or a recording that stopped abruptly), from
// 2-s sources, so about 1.4 s survives: enough to be used, flagged as truncated.
{
  const cut = (bytes: Uint8Array, name: string) => write(name, bytes.subarray(0, Math.floor(bytes.length * 0.7)))
  // Short Ogg pages (opusenc --max-delay) so a cut loses little more than the page it falls in.
  const opus2 = opus('opus-scratch-2s.opus', source('t1', 48000, 2, 440, [0.5]), '2004', '32', ['--max-delay', '100'])
  const pk = oggPackets(readFileSync(opus2))
  const webm2 = recorderWebm(pk[0]!, pk.slice(2), 1, 20, 400)
  cut(webm2, 'webm-recorder-truncated-70pct-of-2s-440.webm')
  cut(readFileSync(opus2), 'opus-truncated-70pct-of-2s-440.opus')
  rmSync(opus2)
  const flac2 = join(work, 't2.flac')
  run('flac', ['--silent', '--best', '--force', '-o', flac2, source('t2', 44100, 2, 220, [0.5])])
  cut(readFileSync(flac2), 'flac-truncated-70pct-of-2s-220.flac')
  const mp32 = join(work, 't3.mp3')
  run('lame', ['--quiet', '-b', '64', source('t3', 44100, 2, 440, [0.5]), mp32])
  cut(readFileSync(mp32), 'mp3-truncated-70pct-of-2s-440.mp3')
  const m4a2 = m4a('t4.m4a', source('t4', 44100, 2, 440, [0.5]), '96k', ['-movflags', '+faststart'])
  cut(readFileSync(m4a2), 'aac-truncated-70pct-of-2s-440.m4a')
  rmSync(m4a2)
  // The same 2-s recorder-style WebM with its middle third overwritten (below).
  writeFileSync(join(work, 'webm2.webm'), webm2)
}

// Compressed streams damaged in the middle: every byte of the middle third overwritten.
{
  const damage = (from: string, to: string) => {
    const b = new Uint8Array(readFileSync(from.includes('/') ? from : join(outDir, from)))
    let s = 777
    for (let i = Math.floor(b.length / 3); i < Math.floor((2 * b.length) / 3); i++) { s = (s * 1103515245 + 12345) >>> 0; b[i] = s >>> 24 }
    write(to, b)
  }
  damage('flac-mono-44100-440.flac', 'corrupt-middle.flac')
  damage('mp3-mono-44100-440.mp3', 'corrupt-middle.mp3')
  damage('opus-mono-48000-440.opus', 'corrupt-middle.opus')
  damage(join(work, 'webm2.webm'), 'corrupt-middle.webm')
  damage(m4aMono, 'corrupt-middle.m4a')
  // A file that keeps only the format's magic and then stops.
  write('corrupt-flac-header-only.flac', readFileSync(join(outDir, 'flac-mono-44100-440.flac')).subarray(0, 20))
  write('corrupt-opus-headers-only.opus', readFileSync(opusMono).subarray(0, 200))
}

rmSync(work, { recursive: true, force: true })

let total = 0
for (const f of readdirSync(outDir).sort()) {
  if (f === 'README.md') continue
  const size = statSync(join(outDir, f)).size
  total += size
  console.log(`${String(size).padStart(8)}  ${f}`)
}
console.log(`${String(total).padStart(8)}  total bytes`)

// Decode speed in × real time on one core, for a 60-s WAV (mono 16-bit 48 kHz and stereo 24-bit
// 44.1 kHz) and a 60-s Opus take in WebM laid out the way browser recorders stream it.
//
// Run: npx tsx bench/decode.ts   (reads tests/fixtures/audio/webm-recorder-opus-mono-48000-440.webm)
// The WebM take is that 1-s fixture's Clusters repeated 60 times with their timecodes moved on,
// so the demuxer and libopus do the real work of a minute-long recording.

import { readFileSync } from 'node:fs'
import { dirname, join } from 'node:path'
import { fileURLToPath } from 'node:url'
import { decodeAudio, type DecodeOptions } from '../server/analysis/decode'
import { encodeWav } from '../server/analysis/wav'

const root = join(dirname(fileURLToPath(import.meta.url)), '..')
const SECONDS = 60

function tone (rate: number, channels: number): Float32Array[] {
  const n = rate * SECONDS
  return Array.from({ length: channels }, (_, c) => {
    const x = new Float32Array(n)
    for (let i = 0; i < n; i++) x[i] = (0.5 - 0.1 * c) * Math.sin((2 * Math.PI * 220 * i) / rate)
    return x
  })
}

/** Repeats the Clusters of a recorder-style WebM (8-byte unknown sizes, Timecode first) `times` times. */
function longWebm (one: Uint8Array, times: number, clipMs: number): Uint8Array {
  const isCluster = (p: number) => one[p] === 0x1f && one[p + 1] === 0x43 && one[p + 2] === 0xb6 && one[p + 3] === 0x75
  let first = 0
  while (!isCluster(first)) first++
  const head = one.subarray(0, first)
  const body = one.subarray(first)
  const out = new Uint8Array(head.length + body.length * times)
  out.set(head)
  for (let k = 0; k < times; k++) {
    const at = head.length + k * body.length
    out.set(body, at)
    for (let p = at; p < at + body.length - 16; p++) {
      // Cluster ID, 8-byte unknown size, then Timecode (0xE7) with a 2-byte value.
      if (isClusterAt(out, p) && out[p + 12] === 0xe7 && out[p + 13] === 0x82) {
        const t = ((out[p + 14]! << 8) | out[p + 15]!) + k * clipMs
        out[p + 14] = t >> 8
        out[p + 15] = t & 0xff
      }
    }
  }
  return out
}
const isClusterAt = (b: Uint8Array, p: number) => b[p] === 0x1f && b[p + 1] === 0x43 && b[p + 2] === 0xb6 && b[p + 3] === 0x75

async function measure (label: string, bytes: Uint8Array, opts: DecodeOptions = {}) {
  await decodeAudio(bytes, opts) // warm-up: JIT and WebAssembly instantiation
  const times: number[] = []
  let durationS = 0
  for (let i = 0; i < 5; i++) {
    const t0 = performance.now()
    const a = await decodeAudio(bytes, opts)
    times.push(performance.now() - t0)
    durationS = a.durationS
  }
  times.sort((a, b) => a - b)
  const ms = times[2]!
  console.log(`${label.padEnd(40)} ${(bytes.length / 1e6).toFixed(2).padStart(6)} MB ${durationS.toFixed(1).padStart(6)} s ${ms.toFixed(1).padStart(8)} ms ${(durationS / (ms / 1000)).toFixed(0).padStart(7)}× real time`)
}

console.log(`${'input'.padEnd(40)} ${'size'.padStart(9)} ${'audio'.padStart(8)} ${'median'.padStart(11)} ${'speed'.padStart(18)}`)
await measure('WAV PCM 16-bit mono 48 kHz', encodeWav(tone(48000, 1), 48000, { bits: 16 }))
await measure('WAV PCM 24-bit stereo 44.1 kHz', encodeWav(tone(44100, 2), 44100, { bits: 24 }))
await measure('WAV float 32 stereo 48 kHz', encodeWav(tone(48000, 2), 48000, { float: true, bits: 32 }))
const oneSecond = new Uint8Array(readFileSync(join(root, 'tests/fixtures/audio/webm-recorder-opus-mono-48000-440.webm')))
const webm = longWebm(oneSecond, SECONDS, 1020)
await measure('WebM Opus 32 kb/s mono (recorder layout)', webm)
await measure('  same, opusRate 24000', webm, { opusRate: 24000 })
await measure('  same, opusRate 16000', webm, { opusRate: 16000 })

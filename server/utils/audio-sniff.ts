// Which audio container a take is, from its first bytes (never its name or declared type).
import { detectFormat, type AudioFormat } from '../analysis/decode'

/** Bytes read before the format is decided (enough for any WAV/FLAC/Ogg/WebM header). */
export const SNIFF_BYTES = 256 * 1024
/** An ID3 tag in front of MP3 audio may be large (cover art); sniffing reads past it, up to this. */
const SNIFF_MAX_BYTES = 16 * 1024 * 1024
export const AUDIO_MIME: Readonly<Record<AudioFormat, string>> = {
  'wav': 'audio/wav',
  'flac': 'audio/flac',
  'mp3': 'audio/mpeg',
  'ogg-vorbis': 'audio/ogg',
  'ogg-opus': 'audio/ogg; codecs=opus',
  'webm-opus': 'audio/webm; codecs=opus',
  'mp4-aac': 'audio/mp4',
}

/** Sniffs the format of the first bytes; null while more bytes are needed to tell. */
export function sniffAudio (head: Uint8Array, complete: boolean): AudioFormat | 'unknown' | null {
  const format = detectFormat(head)
  if (format) return format
  if (complete) return 'unknown'
  // An ID3v2 header says how long the tag is: read past it before deciding.
  if (head.length >= 10 && head[0] === 0x49 && head[1] === 0x44 && head[2] === 0x33) {
    const size = ((head[6]! & 0x7f) << 21) | ((head[7]! & 0x7f) << 14) | ((head[8]! & 0x7f) << 7) | (head[9]! & 0x7f)
    const need = Math.min(SNIFF_MAX_BYTES, 10 + size + 10 + 64 * 1024)
    return head.length < need ? null : 'unknown'
  }
  return head.length < SNIFF_BYTES ? null : 'unknown'
}

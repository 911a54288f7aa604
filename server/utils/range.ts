// HTTP byte ranges (RFC 9110 §14) for the audio the object store holds.
import { Transform, type Readable } from 'node:stream'

/** One satisfiable range of bytes, both ends included. */
export interface ByteRange { start: number, end: number }

/**
 * A Range header (one range of bytes) within an object of `size` bytes (RFC 9110 §14.1.2):
 * null = send the whole object (no header, several ranges, junk); 'unsatisfiable' = answer 416.
 */
export function parseByteRange (header: string | undefined, size: number): ByteRange | 'unsatisfiable' | null {
  if (!header) return null
  const m = /^\s*bytes\s*=\s*(\d*)\s*-\s*(\d*)\s*$/i.exec(header)
  if (!m || (m[1] === '' && m[2] === '')) return null
  if (m[1] === '') {
    const n = Number(m[2])
    if (n === 0 || size === 0) return 'unsatisfiable'
    return { start: Math.max(0, size - n), end: size - 1 }
  }
  const start = Number(m[1])
  if (start >= size) return 'unsatisfiable'
  const end = m[2] === '' ? size - 1 : Math.min(Number(m[2]), size - 1)
  if (end < start) return null
  return { start, end }
}

/** First and last byte of a Content-Range value ("bytes 0-99/1000"), or null. */
export function parseContentRange (value: string | null | undefined): ByteRange | null {
  const m = value ? /^bytes (\d+)-(\d+)\/(\d+|\*)$/.exec(value.trim()) : null
  return m ? { start: Number(m[1]), end: Number(m[2]) } : null
}

/** The bytes [skip, skip + take) of a stream; the rest is read and dropped. */
export function sliceStream (body: Readable, skip: number, take: number): Readable {
  let seen = 0
  const out = new Transform({
    transform (chunk: Buffer, _enc, done) {
      const from = Math.max(0, skip - seen)
      const to = Math.min(chunk.length, skip + take - seen)
      seen += chunk.length
      done(null, to > from ? chunk.subarray(from, to) : undefined)
    },
  })
  body.on('error', err => out.destroy(err))
  return body.pipe(out)
}

/**
 * Makes the body the store sent cover exactly `want`: some stores answer a range they read
 * differently (a last-byte position of 0 taken as "to the end") or the whole object.
 */
export function exactRange (body: Readable, sent: ByteRange | null, want: ByteRange): Readable {
  const from = sent ?? { start: 0, end: Number.MAX_SAFE_INTEGER }
  if (from.start === want.start && from.end === want.end) return body
  return sliceStream(body, want.start - from.start, want.end - want.start + 1)
}

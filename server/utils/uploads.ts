// Multipart uploads streamed straight into object storage. formidable parses the request; its
// `fileWriteStreamHandler` hands each chunk of the file to a writable that sniffs the format from
// the first bytes, then pipes everything into an S3 multipart upload (lib-storage keeps at most a
// few parts in memory). No temp file is written. An upload that is cut off, too large or not audio
// aborts the object-store upload, so no object is left behind.
import { randomUUID } from 'node:crypto'
import { PassThrough, Writable } from 'node:stream'
import type { IncomingMessage } from 'node:http'
import { isError, type H3Event } from 'h3'
import formidable, { errors as formidableErrors } from 'formidable'
import { headerDurationS, type AudioFormat } from '../analysis/decode'
import { apiError } from './errors'
import { cleanFileName } from '../../shared/text'
import { AUDIO_MIME, SNIFF_BYTES, sniffAudio } from './audio-sniff'

/** Room for the multipart framing and text fields around the file. */
export const FORM_OVERHEAD_BYTES = 256 * 1024

export interface StoredUpload {
  /** Opaque object key (random, never from the file name). */
  key: string
  bytes: number
  format: AudioFormat
  mime: string
  /** The name the client gave, kept for display only. */
  originalName: string | null
}

export interface UploadResult {
  fields: Record<string, string>
  file: StoredUpload | null
  /** Deletes the stored object (when the request is refused after the upload finished). */
  discard: () => Promise<void>
}

export interface UploadOptions {
  /** Name of the one file field accepted. */
  fileField: string
  maxBytes: number
  /** Prefix of the object key ("takes/"). */
  keyPrefix: string
  /** Largest total size of the text fields. */
  maxFieldsBytes?: number
  /** Longest take in seconds, refused here when the container's header states its length (WAV, FLAC). */
  maxDurationS?: number
  /**
   * Runs when the file part begins, with the text fields sent before it; nothing reaches the
   * store until it resolves, and an error it throws (an h3 error) refuses the upload as it is.
   */
  beforeFile?: (fields: Record<string, string>) => Promise<void>
}

/** An object store as uploads need it (server/utils/storage.ts provides one). */
export interface UploadStore {
  put: (key: string, body: PassThrough, opts: { contentType?: string, abortSignal?: AbortSignal }) => Promise<unknown>
  delete: (key: string) => Promise<void>
}

/** A refusal with its status and stable code, raised while the body is read. */
export class UploadRefused extends Error {
  constructor (readonly status: number, readonly code: string, message: string, readonly details: Record<string, unknown> = {}) {
    super(message)
  }
}

/**
 * Parses a multipart request: text fields in memory, the one file streamed into the store under
 * a random key. Throws h3 errors: 400 bad form, 413 too large or too long, 415 not audio, 422 empty file.
 */
export async function receiveUpload (event: H3Event, store: UploadStore, opts: UploadOptions): Promise<UploadResult> {
  const req = event.node.req as IncomingMessage
  const type = String(req.headers['content-type'] ?? '').toLowerCase()
  if (!type.startsWith('multipart/form-data')) {
    throw apiError(415, 'not_multipart', 'Expected a multipart form', { expected: 'multipart/form-data' })
  }
  const length = Number.parseInt(String(req.headers['content-length'] ?? ''), 10)
  if (Number.isFinite(length) && length > opts.maxBytes + FORM_OVERHEAD_BYTES) {
    event.node.res.setHeader('Connection', 'close')
    throw apiError(413, 'too_large', 'File too large', { maxBytes: opts.maxBytes })
  }

  let stored: StoredUpload | null = null
  let pending: { done: Promise<void>, abort: (why: Error) => void, key: string } | null = null
  const fieldsBefore: Record<string, string> = {}

  const form = formidable({
    maxFiles: 1,
    maxFileSize: opts.maxBytes,
    maxTotalFileSize: opts.maxBytes,
    maxFields: 20,
    maxFieldsSize: opts.maxFieldsBytes ?? 64 * 1024,
    allowEmptyFiles: true,
    minFileSize: 0,
    fileWriteStreamHandler: (file?: unknown) => {
      const f = file as unknown as { fieldName?: string, originalFilename?: string | null }
      if (f.fieldName !== opts.fileField) {
        return refusingWritable(new UploadRefused(400, 'unexpected_file', 'Unexpected file field', { field: f.fieldName ?? null, expected: opts.fileField }))
      }
      const key = `${opts.keyPrefix}${randomUUID()}`
      const gate = opts.beforeFile ? opts.beforeFile({ ...fieldsBefore }) : null
      gate?.catch(() => {}) // observed by the writable
      const sink = storeWritable(store, key, opts.maxDurationS, (format, bytes) => {
        stored = { key, bytes, format, mime: AUDIO_MIME[format], originalName: cleanName(f.originalFilename) }
      }, gate)
      pending = { done: sink.done, abort: sink.abort, key }
      return sink.writable
    },
  })
  form.on('fileBegin', (name, file) => { (file as unknown as { fieldName: string }).fieldName = name })
  form.on('field', (name, value) => { fieldsBefore[name] = String(value) })

  let fields: Record<string, string>
  try {
    const [raw] = await form.parse(req)
    // The store's upload settles only after formidable has seen the whole file.
    if (pending) await (pending as { done: Promise<void> }).done
    fields = {}
    for (const [k, v] of Object.entries(raw)) if (v && v.length) fields[k] = String(v[v.length - 1])
  } catch (err) {
    const p = pending as { done: Promise<void>, abort: (why: Error) => void } | null
    if (p) {
      p.abort(err instanceof Error ? err : new Error(String(err)))
      await p.done.catch(() => {})
    }
    // The file may have been complete before the form failed (a bad part after it), or its last
    // write may have reached the store as the abort went out: delete the key either way (a
    // delete of a missing key is a no-op in S3).
    const key = (pending as { key: string } | null)?.key
    if (key && (stored || p)) await store.delete(key).catch(e => console.warn(`[uploads] could not delete ${key}: ${(e as Error).message}`))
    throw uploadHttpError(event, err, opts)
  }
  const file = stored as StoredUpload | null
  return {
    fields,
    file,
    discard: async () => {
      if (file) await store.delete(file.key).catch(err => console.warn(`[uploads] could not delete ${file.key}: ${(err as Error).message}`))
    },
  }
}

/**
 * A client's file name for display only: no path, no control or bidirectional control
 * characters (which could show it as another name), at most 255 characters.
 */
export function cleanName (name: string | null | undefined): string | null {
  return cleanFileName(name)
}

/** A writable that refuses every byte with `err` (an unexpected file part). */
export function refusingWritable (err: Error): Writable {
  return new Writable({
    write (_chunk, _enc, cb) { cb(err) },
    final (cb) { cb(err) },
  })
}

/**
 * A writable that buffers the first bytes until the format is known, then streams into the
 * store. `done` settles when the object is complete (or the upload is aborted).
 */
function storeWritable (store: UploadStore, key: string, maxDurationS: number | undefined, onStored: (format: AudioFormat, bytes: number) => void, gate: Promise<void> | null) {
  const controller = new AbortController()
  let head: Buffer[] = []
  let headBytes = 0
  let total = 0
  let body: PassThrough | null = null
  let upload: Promise<unknown> | null = null
  let settle!: (err?: Error) => void
  const done = new Promise<void>((ok, fail) => {
    settle = err => (err ? fail(err) : ok())
  })
  done.catch(() => {}) // observed by the caller
  let format: AudioFormat | null = null

  const decide = (complete: boolean): Error | null => {
    const bytes = Buffer.concat(head, headBytes)
    if (complete && headBytes === 0) return new UploadRefused(422, 'empty', 'The audio file is empty')
    const sniffed = sniffAudio(bytes, complete)
    if (sniffed === null) return null
    if (sniffed === 'unknown') return new UploadRefused(415, 'not_audio', 'Not an audio file we read')
    if (maxDurationS !== undefined && (sniffed === 'wav' || sniffed === 'flac')) {
      const durationS = headerDurationS(bytes)
      // The first chunk may end inside the header (or before a WAV's data chunk): read on to tell.
      if (durationS === null && !complete && headBytes < SNIFF_BYTES) return null
      if (durationS !== null && durationS > maxDurationS) {
        return new UploadRefused(413, 'too_long', 'The recording is longer than the allowed length', {
          durationS: Math.round(durationS * 1000) / 1000, maxDurationS,
        })
      }
    }
    format = sniffed
    body = new PassThrough({ highWaterMark: 1024 * 1024 })
    upload = store.put(key, body, { contentType: AUDIO_MIME[sniffed], abortSignal: controller.signal })
    // The store failing mid-way must stop the request too (else the body would wait on it forever).
    upload.catch((e: Error) => { if (!writable.destroyed) writable.destroy(storeDown(e)) })
    body.write(bytes)
    head = []
    return null
  }

  // Nothing is written before the caller's check of the fields (if any) has passed.
  let waiting = gate
  const afterGate = (next: () => void, cb: (err?: Error | null) => void) => {
    if (!waiting) return next()
    waiting.then(() => { waiting = null; next() }, (err: Error) => { settle(err); cb(err) })
  }

  const writable = new Writable({
    highWaterMark: 256 * 1024,
    write (chunk: Buffer, _enc, cb) {
      afterGate(() => writeChunk(chunk, cb), cb)
    },
    final (cb) {
      afterGate(() => finish(cb), cb)
    },
    destroy (err, cb) {
      // Cut off, refused or failed: stop the store's upload so no part or object stays behind.
      const why = err ?? new Error('upload stopped')
      if (!controller.signal.aborted) controller.abort(why)
      body?.destroy()
      if (upload) upload.then(() => settle(), () => settle(why))
      else settle(why)
      cb(err)
    },
  })

  function writeChunk (chunk: Buffer, cb: (err?: Error | null) => void) {
    total += chunk.length
    if (!body) {
      head.push(chunk)
      headBytes += chunk.length
      const err = decide(false)
      return cb(err ?? undefined)
    }
    if (body.write(chunk)) cb()
    else body.once('drain', () => cb())
  }

  function finish (cb: (err?: Error | null) => void) {
    const err = body ? null : decide(true)
    if (err) { settle(err); return cb(err) }
    body!.end()
    upload!.then(() => {
      onStored(format!, total)
      settle()
      cb()
    }, (e: Error) => {
      const err = storeDown(e)
      settle(err)
      cb(err)
    })
  }
  return {
    writable,
    done,
    abort: (why: Error) => { if (!writable.destroyed) writable.destroy(why) },
  }
}

function storeDown (e: Error): Error {
  if (e instanceof UploadRefused || isError(e)) return e
  console.error(`[uploads] object store refused the upload: ${e?.message ?? String(e)}`)
  return new UploadRefused(503, 'storage_unavailable', 'Storage unavailable')
}

/** The h3 error for a failed multipart parse (413, 415, 400 …); internals only go to the log. */
export function uploadHttpError (event: H3Event, err: unknown, opts: Pick<UploadOptions, 'maxBytes'>) {
  if (isError(err)) {
    // The caller's check refused the fields before the file was read: do not wait for the rest.
    event.node.res.setHeader('Connection', 'close')
    return err
  }
  if (err instanceof UploadRefused) {
    // Refused before the body was read: do not wait for (or keep the socket for) the rest of it.
    if (err.code === 'too_long') event.node.res.setHeader('Connection', 'close')
    return apiError(err.status, err.code, err.message, err.details)
  }
  const e = err as { code?: number, httpCode?: number, message?: string }
  const fe = formidableErrors as Record<string, number>
  if (e?.code === fe.biggerThanMaxFileSize || e?.code === fe.biggerThanTotalMaxFileSize) {
    event.node.res.setHeader('Connection', 'close')
    return apiError(413, 'too_large', 'File too large', { maxBytes: opts.maxBytes })
  }
  if (e?.code === fe.maxFieldsSizeExceeded || e?.code === fe.maxFieldsExceeded) {
    return apiError(413, 'fields_too_large', 'Form fields too large')
  }
  if (e?.code === fe.maxFilesExceeded) return apiError(400, 'too_many_files', 'Only one file may be sent')
  if (e?.code === fe.aborted) return apiError(400, 'upload_aborted', 'Upload cut off')
  if (typeof e?.httpCode === 'number' && e.httpCode >= 400 && e.httpCode < 500) {
    return apiError(400, 'bad_form', 'Malformed multipart form')
  }
  if (e?.message && /abort/i.test(e.message)) return apiError(400, 'upload_aborted', 'Upload cut off')
  console.error(`[uploads] failed: ${e?.message ?? String(err)}`)
  return apiError(500, 'upload_failed', 'Upload could not be stored')
}

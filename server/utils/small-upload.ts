// Small multipart forms read into memory (a drill file): no temp file, no object store.
import { Writable } from 'node:stream'
import type { IncomingMessage } from 'node:http'
import type { H3Event } from 'h3'
import formidable from 'formidable'
import { apiError } from './errors'
import { cleanName, FORM_OVERHEAD_BYTES, refusingWritable, UploadRefused, uploadHttpError } from './uploads'

/**
 * Parses a small multipart form (a drill file): text fields and the one file, both in memory,
 * capped at `maxBytes` (413). No temp file is written.
 */
export async function receiveSmallFile (event: H3Event, opts: { fileField: string, maxBytes: number }): Promise<{ fields: Record<string, string>, file: { bytes: Uint8Array, name: string | null } | null }> {
  const req = event.node.req as IncomingMessage
  const type = String(req.headers['content-type'] ?? '').toLowerCase()
  if (!type.startsWith('multipart/form-data')) throw apiError(415, 'not_multipart', 'Expected a multipart form', { expected: 'multipart/form-data' })
  const length = Number.parseInt(String(req.headers['content-length'] ?? ''), 10)
  if (Number.isFinite(length) && length > opts.maxBytes + FORM_OVERHEAD_BYTES) {
    event.node.res.setHeader('Connection', 'close')
    throw apiError(413, 'too_large', 'File too large', { maxBytes: opts.maxBytes })
  }
  let file: { chunks: Buffer[], name: string | null } | null = null
  const form = formidable({
    maxFiles: 1,
    maxFileSize: opts.maxBytes,
    maxTotalFileSize: opts.maxBytes,
    maxFields: 20,
    maxFieldsSize: 64 * 1024,
    allowEmptyFiles: true,
    minFileSize: 0,
    fileWriteStreamHandler: (f?: unknown) => {
      const v = f as unknown as { fieldName?: string, originalFilename?: string | null }
      if (v.fieldName !== opts.fileField) {
        return refusingWritable(new UploadRefused(400, 'unexpected_file', 'Unexpected file field', { field: v.fieldName ?? null, expected: opts.fileField }))
      }
      const mine = { chunks: [] as Buffer[], name: cleanName(v.originalFilename) }
      file = mine
      return new Writable({ write (chunk: Buffer, _e, cb) { mine.chunks.push(chunk); cb() } })
    },
  })
  form.on('fileBegin', (name, f) => { (f as unknown as { fieldName: string }).fieldName = name })
  try {
    const [raw] = await form.parse(req)
    const fields: Record<string, string> = {}
    for (const [k, v] of Object.entries(raw)) if (v && v.length) fields[k] = String(v[v.length - 1])
    const got = file as { chunks: Buffer[], name: string | null } | null
    return { fields, file: got ? { bytes: new Uint8Array(Buffer.concat(got.chunks)), name: got.name } : null }
  } catch (err) {
    throw uploadHttpError(event, err, { maxBytes: opts.maxBytes })
  }
}

// The take upload checks the caller's fields before any audio reaches the object store: a
// refused request writes nothing, not even a part that is later deleted.
import { createServer, request, type Server } from 'node:http'
import type { AddressInfo } from 'node:net'
import type { PassThrough } from 'node:stream'
import type { H3Event } from 'h3'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { receiveUpload, type UploadStore } from '../../../server/utils/uploads'
import { apiError } from '../../../server/utils/errors'
import { encodeWav } from '../../../server/analysis/wav'

interface Call { kind: 'put' | 'delete', key: string, bytes: number }
const calls: Call[] = []
const seenFields: Record<string, string>[] = []

const store: UploadStore = {
  async put (key: string, body: PassThrough) {
    let bytes = 0
    for await (const c of body) bytes += (c as Buffer).length
    calls.push({ kind: 'put', key, bytes })
  },
  async delete (key: string) { calls.push({ kind: 'delete', key, bytes: 0 }) },
}

let server: Server
let port = 0

beforeAll(async () => {
  server = createServer((req, res) => {
    const event = { node: { req, res } } as unknown as H3Event
    receiveUpload(event, store, {
      fileField: 'audio', keyPrefix: 'takes/', maxBytes: 50 * 1024 * 1024,
      beforeFile: async (fields) => {
        seenFields.push(fields)
        // Stands in for the route's look-up: drill 7 is the caller's, anything else is not.
        if (fields.drillId !== '7') throw apiError(404, 'drill_not_found', 'Drill not found')
      },
    }).then((u) => {
      res.writeHead(200, { 'content-type': 'application/json' })
      res.end(JSON.stringify({ fields: u.fields, bytes: u.file?.bytes ?? null }))
    }, (err: { statusCode?: number, data?: { code?: string } }) => {
      res.writeHead(err.statusCode ?? 500, { 'content-type': 'application/json' })
      res.end(JSON.stringify({ code: err.data?.code ?? null }))
    })
  })
  await new Promise<void>(ok => server.listen(0, '127.0.0.1', ok))
  port = (server.address() as AddressInfo).port
})
afterAll(() => new Promise<void>(ok => server.close(() => ok())))

/** Posts a multipart body with node:http, reading the answer even if the server stops reading early. */
async function post (parts: [string, string | { name: string, bytes: Uint8Array }][]): Promise<{ status: number, body: any }> {
  const form = new FormData()
  for (const [k, v] of parts) {
    if (typeof v === 'string') form.append(k, v)
    else form.append(k, new Blob([new Uint8Array(v.bytes)]), v.name)
  }
  const res = new Response(form)
  const body = Buffer.from(await res.arrayBuffer())
  return new Promise((resolve, reject) => {
    const req = request({ host: '127.0.0.1', port, method: 'POST', path: '/', headers: { 'content-type': res.headers.get('content-type')!, 'content-length': String(body.length) } }, (r) => {
      const chunks: Buffer[] = []
      r.on('data', c => chunks.push(c))
      r.on('end', () => resolve({ status: r.statusCode ?? 0, body: JSON.parse(Buffer.concat(chunks).toString('utf8') || 'null') }))
    })
    req.on('error', (e: NodeJS.ErrnoException) => { if (e.code !== 'EPIPE' && e.code !== 'ECONNRESET') reject(e) })
    req.end(body)
  })
}

const wav = (seconds: number) => encodeWav(new Float32Array(Math.round(seconds * 8000)), 8000)

describe('receiveUpload with a check of the fields before the file', () => {
  it('refuses a drill that is not the caller\'s without writing anything to the store', async () => {
    calls.length = 0
    // About 4 MB of audio: more than the store would ever see before the refusal.
    const r = await post([['drillId', '999'], ['part', 'Alto'], ['audio', { name: 'big.wav', bytes: wav(250) }]])
    expect(r.status).toBe(404)
    expect(r.body.code).toBe('drill_not_found')
    expect(calls.filter(c => c.kind === 'put')).toEqual([])
    expect(seenFields.at(-1)).toEqual({ drillId: '999', part: 'Alto' })
  })

  it('stores the file once the check passes, with the fields sent before it', async () => {
    calls.length = 0
    const audio = wav(1)
    const r = await post([['drillId', '7'], ['part', 'Alto'], ['audio', { name: 'ok.wav', bytes: audio }]])
    expect(r.status).toBe(200)
    expect(r.body.bytes).toBe(audio.length)
    expect(calls.filter(c => c.kind === 'put').map(c => c.bytes)).toEqual([audio.length])
  })

  it('checks with no fields at all when the file comes first, so the route can refuse it', async () => {
    calls.length = 0
    const r = await post([['audio', { name: 'first.wav', bytes: wav(1) }], ['drillId', '7'], ['part', 'Alto']])
    expect(r.status).toBe(404)
    expect(seenFields.at(-1)).toEqual({})
    expect(calls.filter(c => c.kind === 'put')).toEqual([])
  })
})

// The object store module against the embedded S3-compatible fake, and the mail catcher.
import { mkdtempSync, readdirSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { Readable } from 'node:stream'
import nodemailer from 'nodemailer'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { createObjectStore, RangeNotSatisfiableError, startEmbeddedS3, type EmbeddedS3, type ObjectStore } from '../../../server/services/object-store'
import { listCaughtMail, readCaughtMail, startMailCatcher } from '../../../server/services/mail-catcher'
import { freePort } from '../../e2e/harness'

const dir = mkdtempSync(join(tmpdir(), 'driftline-services-'))
afterAll(() => rmSync(dir, { recursive: true, force: true }))

const settings = (endpoint: string) => ({ endpoint, region: 'us-east-1', bucket: 'unit', accessKeyId: 'S3RVER', secretAccessKey: 'S3RVER' })
const text = async (r: Readable) => { let s = ''; for await (const c of r) s += c; return s }

describe('object store', () => {
  let s3: EmbeddedS3
  let store: ObjectStore
  beforeAll(async () => {
    s3 = await startEmbeddedS3({ dir: join(dir, 'objects'), bucket: 'unit' })
    store = createObjectStore(settings(s3.endpoint))
  })
  afterAll(async () => { store?.destroy(); await s3?.close() })

  it('listens on loopback only', () => {
    expect(s3.endpoint).toMatch(/^http:\/\/127\.0\.0\.1:\d+$/)
  })

  it('puts, heads, gets whole and by range, and deletes', async () => {
    await store.ping()
    await store.put('a/key', new TextEncoder().encode('0123456789'), { contentType: 'text/plain' })
    expect(await store.head('a/key')).toMatchObject({ contentLength: 10, contentType: 'text/plain' })
    const whole = await store.get('a/key')
    expect(whole).toMatchObject({ status: 200, contentLength: 10, totalBytes: 10, contentRange: null })
    expect(await text(whole!.body)).toBe('0123456789')
    // HTTP range semantics (RFC 9110 §14): bytes=2-5 is four bytes, "bytes 2-5/10".
    const part = await store.get('a/key', { range: 'bytes=2-5' })
    expect(part).toMatchObject({ status: 206, contentLength: 4, totalBytes: 10, contentRange: 'bytes 2-5/10' })
    expect(await text(part!.body)).toBe('2345')
    await expect(store.get('a/key', { range: 'bytes=50-60' })).rejects.toBeInstanceOf(RangeNotSatisfiableError)
    await store.delete('a/key')
    expect(await store.head('a/key')).toBeNull()
    expect(await store.get('a/key')).toBeNull()
  })

  it('streams a body of unknown length as a multipart upload, byte for byte', async () => {
    const chunk = Buffer.alloc(1024 * 1024)
    for (let i = 0; i < chunk.length; i++) chunk[i] = (i * 31) & 0xff
    function * chunks () { for (let i = 0; i < 18; i++) yield chunk }
    let progress = 0
    await store.put('big', Readable.from(chunks()), { contentType: 'application/octet-stream', onProgress: n => { progress = n } })
    expect(progress).toBe(18 * chunk.length)
    const got = await store.get('big')
    let n = 0
    let same = true
    for await (const c of got!.body as AsyncIterable<Buffer>) {
      for (let i = 0; i < c.length; i++) if (c[i] !== (((n + i) % chunk.length) * 31 & 0xff)) same = false
      n += c.length
    }
    expect(n).toBe(18 * chunk.length)
    expect(same).toBe(true)
  })

  it('ping fails fast when nothing listens', async () => {
    const down = createObjectStore(settings(`http://127.0.0.1:${await freePort()}`))
    await expect(down.ping(1000)).rejects.toThrow()
    down.destroy()
  })
})

describe('mail catcher', () => {
  it('keeps each message as a file and reads it back', async () => {
    const mailDir = join(dir, 'mail')
    const catcher = await startMailCatcher({ dir: mailDir })
    try {
      expect(catcher.host).toBe('127.0.0.1')
      const t = nodemailer.createTransport({ host: catcher.host, port: catcher.port, secure: false, ignoreTLS: true })
      // A display name that looks like another address must not make the message theirs.
      await t.sendMail({ from: 'Driftline <no-reply@example.org>', to: '"bob@example.org" <Ann@example.org>', subject: 'Hello', text: 'Line one\nLine two', html: '<p>Line one</p>' })
      t.close()
      expect(readdirSync(mailDir).filter(f => f.endsWith('.eml'))).toHaveLength(1)
      const list = await listCaughtMail(mailDir)
      expect(list).toEqual([{ id: expect.stringMatching(/^\d{13}-[0-9a-f]{12}$/), to: expect.stringContaining('<Ann@example.org>'), subject: 'Hello', date: expect.any(String), recipients: ['ann@example.org'] }])
      const m = await readCaughtMail(mailDir, list[0]!.id)
      expect(m).toMatchObject({ from: expect.stringContaining('<no-reply@example.org>'), subject: 'Hello', text: 'Line one\nLine two', html: '<p>Line one</p>' })
      expect(await readCaughtMail(mailDir, '../../etc/passwd')).toBeNull()
      expect(await readCaughtMail(mailDir, '1234567890123-000000000000')).toBeNull()
    } finally {
      await catcher.close()
    }
  })

  it('lists nothing for a folder that does not exist', async () => {
    expect(await listCaughtMail(join(dir, 'none'))).toEqual([])
  })
})

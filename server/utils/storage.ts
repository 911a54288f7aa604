import { resolve } from 'node:path'
import type { Readable } from 'node:stream'
import { createObjectStore, embeddedCredentials, startEmbeddedS3, type EmbeddedS3, type ObjectStore } from '../services/object-store'

export type { ObjectStore, ObjectBody, ObjectInfo } from '../services/object-store'
export { RangeNotSatisfiableError } from '../services/object-store'

let store: Promise<ObjectStore> | null = null
let embedded: (EmbeddedS3 & { dir: string }) | null = null

/**
 * The object store of runtimeConfig.storage. With `embedded` on and no endpoint the S3-compatible
 * fake is started on 127.0.0.1 (a free port) with its data under storage.dir; it answers only
 * requests signed with the install's credentials (or the configured ones, when both are set).
 */
export function useObjectStore (): Promise<ObjectStore> {
  store ??= (async () => {
    const c = useRuntimeConfig().storage
    let endpoint = String(c.endpoint || '')
    let keys = { accessKeyId: String(c.accessKeyId || ''), secretAccessKey: String(c.secretAccessKey || '') }
    if (!endpoint && c.embedded) {
      const dir = resolve(String(c.dir))
      keys = embeddedCredentials(dir, keys)
      embedded = { ...await startEmbeddedS3({ dir, bucket: c.bucket, credentials: keys }), dir }
      endpoint = embedded.endpoint
    }
    const s = createObjectStore({ endpoint, region: c.region, bucket: c.bucket, ...keys })
    // A provider that is down at start must not hold start-up; put() retries the bucket check.
    s.ensureBucket().catch(err => console.warn(`[storage] bucket "${c.bucket}" not checked: ${(err as Error).message}`))
    return s
  })().catch((err) => {
    store = null
    throw err
  })
  return store
}

/** Where the embedded store listens, when it runs. */
export function embeddedObjectStore (): { endpoint: string, port: number, dir: string } | null {
  return embedded ? { endpoint: embedded.endpoint, port: embedded.port, dir: embedded.dir } : null
}

/** Closes the client and the embedded store (on shutdown). */
export async function stopObjectStore (): Promise<void> {
  const s = await store?.catch(() => null)
  store = null
  s?.destroy()
  const e = embedded
  embedded = null
  await e?.close()
}

/** Reads a whole object stream into one buffer. */
export async function readAll (body: Readable): Promise<Uint8Array> {
  const chunks: Uint8Array[] = []
  let n = 0
  for await (const c of body) { chunks.push(c as Uint8Array); n += (c as Uint8Array).length }
  // A buffer of its own (never a slice of Node's shared pool): it is transferred to the worker.
  const out = new Uint8Array(n)
  let at = 0
  for (const c of chunks) { out.set(c, at); at += c.length }
  return out
}

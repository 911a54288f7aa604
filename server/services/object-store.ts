/// <reference path="./s3rver.d.ts" />
// Object storage over the S3 API (a real provider in production, the embedded s3rver fake in
// development and tests). Plain Node: the knex seed CLI uses it too, so no Nitro imports here.
import { chmodSync, mkdirSync } from 'node:fs'
import { resolve } from 'node:path'
import type { Readable } from 'node:stream'
import { credentialsFileFor, installCredentials, verifySignedRequest, type S3Credentials } from './s3-auth'
import {
  CreateBucketCommand, DeleteObjectCommand, GetObjectCommand, HeadBucketCommand, HeadObjectCommand,
  S3Client, S3ServiceException,
} from '@aws-sdk/client-s3'
import { Upload } from '@aws-sdk/lib-storage'

export interface ObjectStoreSettings {
  endpoint: string
  region: string
  bucket: string
  accessKeyId: string
  secretAccessKey: string
}

export interface PutOptions {
  contentType?: string
  /** Called with the bytes sent so far (multipart uploads report per part). */
  onProgress?: (loadedBytes: number) => void
  abortSignal?: AbortSignal
}

export interface ObjectInfo {
  contentLength: number
  contentType: string | null
  etag: string | null
  lastModified: Date | null
}

export interface ObjectBody extends ObjectInfo {
  body: Readable
  /** 206 for a range, 200 for the whole object. */
  status: 200 | 206
  /** "bytes 0-99/1000" when a range was asked for. */
  contentRange: string | null
  /** Size of the whole object. */
  totalBytes: number
}

/** Thrown by get() when the range lies outside the object (answer 416). */
export class RangeNotSatisfiableError extends Error {
  override name = 'RangeNotSatisfiableError'
  code = 'range_not_satisfiable'
  constructor (public totalBytes: number | null) { super('Requested range not satisfiable') }
}

export interface ObjectStore {
  readonly bucket: string
  readonly endpoint: string
  /** Streams (or writes) an object; large or unknown-length bodies go up as a multipart upload. */
  put: (key: string, body: Readable | Uint8Array | string, opts?: PutOptions) => Promise<{ key: string, etag: string | null }>
  /** The object as a stream, or null when there is none. `range` is an HTTP Range value ("bytes=0-99"). */
  get: (key: string, opts?: { range?: string }) => Promise<ObjectBody | null>
  head: (key: string) => Promise<ObjectInfo | null>
  delete: (key: string) => Promise<void>
  /** Creates the bucket when it is missing. */
  ensureBucket: () => Promise<void>
  /** Resolves when the bucket answers within `timeoutMs`; throws otherwise. */
  ping: (timeoutMs?: number) => Promise<void>
  destroy: () => void
}

const isNotFound = (err: unknown) => {
  const e = err as S3ServiceException & { $metadata?: { httpStatusCode?: number } }
  return e?.name === 'NotFound' || e?.name === 'NoSuchKey' || e?.name === 'NoSuchBucket' || e?.$metadata?.httpStatusCode === 404
}

/** An object store client for one bucket. */
export function createObjectStore (settings: ObjectStoreSettings): ObjectStore {
  // The SDK version is pinned (STACK.md); its notice about future Node releases is known.
  process.env.AWS_SDK_JS_NODE_VERSION_SUPPORT_WARNING_DISABLED ??= 'true'
  const base = {
    region: settings.region || 'us-east-1',
    endpoint: settings.endpoint || undefined,
    // Without keys a real provider's own credential chain (environment, instance role) applies.
    credentials: settings.accessKeyId && settings.secretAccessKey
      ? { accessKeyId: settings.accessKeyId, secretAccessKey: settings.secretAccessKey }
      : undefined,
    // Path-style addressing and checksums only when required: s3rver otherwise stores streamed
    // bodies with the chunk signatures in them or rejects unknown-length streams.
    forcePathStyle: true,
    requestChecksumCalculation: 'WHEN_REQUIRED' as const,
    responseChecksumValidation: 'WHEN_REQUIRED' as const,
  }
  const client = new S3Client({ ...base, requestHandler: { connectionTimeout: 5000, requestTimeout: 120_000 } })
  // Health checks must answer fast: no retries, short timeouts.
  const pingClient = new S3Client({ ...base, maxAttempts: 1, requestHandler: { connectionTimeout: 1500, requestTimeout: 3000 } })
  const Bucket = settings.bucket

  let bucketReady: Promise<void> | null = null
  const ensureBucket = () => {
    bucketReady ??= (async () => {
      try {
        await client.send(new HeadBucketCommand({ Bucket }))
      } catch (err) {
        if (!isNotFound(err)) throw err
        await client.send(new CreateBucketCommand({ Bucket }))
      }
    })().catch((err) => { bucketReady = null; throw err })
    return bucketReady
  }

  return {
    bucket: Bucket,
    endpoint: settings.endpoint,
    ensureBucket,
    async put (key, body, opts = {}) {
      await ensureBucket()
      const upload = new Upload({
        client,
        params: { Bucket, Key: key, Body: body, ContentType: opts.contentType },
        queueSize: 2,
        partSize: 8 * 1024 * 1024,
        leavePartsOnError: false,
        abortController: opts.abortSignal ? signalToController(opts.abortSignal) : undefined,
      })
      if (opts.onProgress) upload.on('httpUploadProgress', p => opts.onProgress!(p.loaded ?? 0))
      const out = await upload.done()
      return { key, etag: ('ETag' in out && out.ETag) ? out.ETag : null }
    },
    async get (key, opts = {}) {
      try {
        const out = await client.send(new GetObjectCommand({ Bucket, Key: key, Range: opts.range }))
        const contentRange = out.ContentRange ?? null
        const total = contentRange ? Number(contentRange.split('/')[1]) : Number(out.ContentLength ?? 0)
        return {
          body: out.Body as Readable,
          status: contentRange ? 206 : 200,
          contentRange,
          contentLength: Number(out.ContentLength ?? 0),
          totalBytes: Number.isFinite(total) ? total : Number(out.ContentLength ?? 0),
          contentType: out.ContentType ?? null,
          etag: out.ETag ?? null,
          lastModified: out.LastModified ?? null,
        }
      } catch (err) {
        if (isNotFound(err)) return null
        const e = err as { name?: string, $metadata?: { httpStatusCode?: number } }
        if (e.name === 'InvalidRange' || e.$metadata?.httpStatusCode === 416) {
          const info = await this.head(key).catch(() => null)
          throw new RangeNotSatisfiableError(info?.contentLength ?? null)
        }
        throw err
      }
    },
    async head (key) {
      try {
        const out = await client.send(new HeadObjectCommand({ Bucket, Key: key }))
        return {
          contentLength: Number(out.ContentLength ?? 0),
          contentType: out.ContentType ?? null,
          etag: out.ETag ?? null,
          lastModified: out.LastModified ?? null,
        }
      } catch (err) {
        if (isNotFound(err)) return null
        throw err
      }
    },
    async delete (key) {
      await client.send(new DeleteObjectCommand({ Bucket, Key: key }))
    },
    async ping (timeoutMs = 2500) {
      await pingClient.send(new HeadBucketCommand({ Bucket }), { abortSignal: AbortSignal.timeout(timeoutMs) })
    },
    destroy () {
      client.destroy()
      pingClient.destroy()
    },
  }
}

function signalToController (signal: AbortSignal): AbortController {
  const c = new AbortController()
  if (signal.aborted) c.abort(signal.reason)
  else signal.addEventListener('abort', () => c.abort(signal.reason), { once: true })
  return c
}

export interface EmbeddedS3 {
  endpoint: string
  port: number
  close: () => Promise<void>
}

/**
 * The embedded store's credentials: the given pair when both are set (NUXT_STORAGE_ACCESS_KEY_ID
 * and NUXT_STORAGE_SECRET_ACCESS_KEY), else the install's own, generated on first start and kept
 * next to the store's folder.
 */
export function embeddedCredentials (dir: string, given: Partial<S3Credentials> = {}): S3Credentials {
  if (given.accessKeyId && given.secretAccessKey) return { accessKeyId: given.accessKeyId, secretAccessKey: given.secretAccessKey }
  return installCredentials(credentialsFileFor(dir))
}

const ACCESS_DENIED = '<?xml version="1.0" encoding="UTF-8"?>\n<Error><Code>AccessDenied</Code><Message>Access Denied</Message></Error>'

/**
 * Starts the S3-compatible fake on 127.0.0.1 (a free port) with its data under `dir`. Every
 * request must carry a version-4 signature made with `credentials`; anything else gets 403.
 */
export async function startEmbeddedS3 (opts: { dir: string, bucket: string, credentials: S3Credentials }): Promise<EmbeddedS3> {
  const directory = resolve(opts.dir)
  mkdirSync(directory, { recursive: true, mode: 0o700 })
  try { chmodSync(directory, 0o700) } catch { /* a folder we do not own keeps its mode */ }
  const mod = await import('s3rver') as unknown as { default: new (o: object) => S3rverInstance }
  const S3rver = mod.default
  const server = new S3rver({
    address: '127.0.0.1',
    port: 0,
    directory,
    silent: true,
    configureBuckets: [{ name: opts.bucket }],
  })
  // Koa composes its middleware when it starts listening: this check runs before any of the fake's own.
  server.middleware.unshift(async (ctx, next) => {
    const check = verifySignedRequest({ method: ctx.method, url: ctx.url, headers: ctx.req.headers }, opts.credentials)
    if (!check.ok) {
      ctx.status = 403
      ctx.type = 'application/xml'
      ctx.body = ACCESS_DENIED
      return
    }
    // Verified here; the fake's own (partial) signature handling is left out of it.
    delete ctx.req.headers.authorization
    await next()
  })
  const address = await server.run()
  const port = address.port
  return {
    endpoint: `http://127.0.0.1:${port}`,
    port,
    close: () => server.close().catch(() => {}),
  }
}

interface KoaContext {
  method: string
  url: string
  req: import('node:http').IncomingMessage
  status: number
  type: string
  body: unknown
}

interface S3rverInstance {
  middleware: ((ctx: KoaContext, next: () => Promise<void>) => Promise<void>)[]
  run: () => Promise<{ port: number, address: string }>
  close: () => Promise<void>
}


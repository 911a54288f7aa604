// Request signing for the embedded object store. The S3-compatible fake accepts unsigned requests
// and does not check version-4 signatures, so anyone on the machine could read or overwrite every
// recording. verifySignedRequest() checks the AWS Signature Version 4 header against the
// install's own credentials before the fake sees the request. Plain Node, no Nitro imports.
import { createHash, createHmac, randomBytes, timingSafeEqual } from 'node:crypto'
import { chmodSync, existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs'
import { dirname, join, resolve } from 'node:path'
import type { IncomingHttpHeaders } from 'node:http'

export interface S3Credentials {
  accessKeyId: string
  secretAccessKey: string
}

export type SignatureCheck = { ok: true } | { ok: false, reason: 'unsigned' | 'malformed' | 'unknown_key' | 'expired' | 'mismatch' }

/** Largest difference between the request's x-amz-date and the clock (as S3 itself allows). */
const MAX_SKEW_MS = 15 * 60_000

const hmac = (key: string | Buffer, data: string) => createHmac('sha256', key).update(data, 'utf8').digest()
const sha256Hex = (data: string) => createHash('sha256').update(data, 'utf8').digest('hex')

/** RFC 3986 encoding, as SigV4 wants it for query names and values. */
function encodeRfc3986 (s: string): string {
  return encodeURIComponent(s).replace(/[!'()*]/g, c => `%${c.charCodeAt(0).toString(16).toUpperCase()}`)
}

function canonicalQuery (query: string): string {
  if (!query) return ''
  const pairs = query.split('&').filter(Boolean).map((p) => {
    const i = p.indexOf('=')
    const k = i < 0 ? p : p.slice(0, i)
    const v = i < 0 ? '' : p.slice(i + 1)
    const dec = (x: string) => { try { return decodeURIComponent(x.replace(/\+/g, '%20')) } catch { return x } }
    return [encodeRfc3986(dec(k)), encodeRfc3986(dec(v))] as const
  })
  pairs.sort((a, b) => (a[0] === b[0] ? (a[1] < b[1] ? -1 : a[1] > b[1] ? 1 : 0) : a[0] < b[0] ? -1 : 1))
  return pairs.map(([k, v]) => `${k}=${v}`).join('&')
}

function headerValue (headers: IncomingHttpHeaders, name: string): string | null {
  const v = headers[name]
  if (v == null) return null
  return (Array.isArray(v) ? v.join(',') : String(v)).trim().replace(/\s+/g, ' ')
}

/**
 * Checks an `Authorization: AWS4-HMAC-SHA256 …` header (AWS Signature Version 4, header form) of
 * a request against the credentials. Query-string signatures and version 2 are refused: the app
 * never uses them. The payload hash is taken as the client declared it.
 */
export function verifySignedRequest (
  req: { method: string, url: string, headers: IncomingHttpHeaders },
  creds: S3Credentials,
  now = Date.now(),
): SignatureCheck {
  const auth = headerValue(req.headers, 'authorization')
  if (!auth) return { ok: false, reason: 'unsigned' }
  const m = /^AWS4-HMAC-SHA256 Credential=([^/,\s]+)\/(\d{8})\/([^/,\s]+)\/([^/,\s]+)\/aws4_request, ?SignedHeaders=([a-z0-9;-]+), ?Signature=([0-9a-f]{64})$/.exec(auth)
  if (!m) return { ok: false, reason: 'malformed' }
  const [, keyId, day, region, service, signedHeaderList, signature] = m as unknown as string[]
  if (keyId !== creds.accessKeyId) return { ok: false, reason: 'unknown_key' }
  const amzDate = headerValue(req.headers, 'x-amz-date') ?? ''
  const payloadHash = headerValue(req.headers, 'x-amz-content-sha256')
  const dm = /^(\d{4})(\d{2})(\d{2})T(\d{2})(\d{2})(\d{2})Z$/.exec(amzDate)
  if (!dm || !payloadHash || amzDate.slice(0, 8) !== day) return { ok: false, reason: 'malformed' }
  const signedAt = Date.UTC(+dm[1]!, +dm[2]! - 1, +dm[3]!, +dm[4]!, +dm[5]!, +dm[6]!)
  if (Math.abs(now - signedAt) > MAX_SKEW_MS) return { ok: false, reason: 'expired' }

  const signedHeaders = signedHeaderList!.split(';')
  if (!signedHeaders.includes('host') || !signedHeaders.includes('x-amz-date')) return { ok: false, reason: 'malformed' }
  const lines: string[] = []
  for (const h of signedHeaders) {
    const v = headerValue(req.headers, h)
    if (v == null) return { ok: false, reason: 'malformed' }
    lines.push(`${h}:${v}\n`)
  }
  const q = req.url.indexOf('?')
  const path = q < 0 ? req.url : req.url.slice(0, q)
  const query = q < 0 ? '' : req.url.slice(q + 1)
  // S3 signs the path as it is sent (already encoded once), unlike other AWS services.
  const canonical = [req.method.toUpperCase(), path || '/', canonicalQuery(query), lines.join(''), signedHeaderList, payloadHash].join('\n')
  const scope = `${day}/${region}/${service}/aws4_request`
  const toSign = ['AWS4-HMAC-SHA256', amzDate, scope, sha256Hex(canonical)].join('\n')
  const key = hmac(hmac(hmac(hmac(`AWS4${creds.secretAccessKey}`, day!), region!), service!), 'aws4_request')
  const expected = createHmac('sha256', key).update(toSign, 'utf8').digest()
  const given = Buffer.from(signature!, 'hex')
  return given.length === expected.length && timingSafeEqual(given, expected) ? { ok: true } : { ok: false, reason: 'mismatch' }
}

/**
 * The embedded store's credentials for this install: read from `file`, or generated and written
 * there (mode 0600) on first use, like the session secret.
 */
export function installCredentials (file: string): S3Credentials {
  if (existsSync(file)) {
    try {
      const saved = JSON.parse(readFileSync(file, 'utf8')) as Partial<S3Credentials>
      if (typeof saved.accessKeyId === 'string' && saved.accessKeyId.length >= 16
        && typeof saved.secretAccessKey === 'string' && saved.secretAccessKey.length >= 32) {
        return { accessKeyId: saved.accessKeyId, secretAccessKey: saved.secretAccessKey }
      }
    } catch { /* unreadable: replaced below */ }
  }
  const creds = {
    accessKeyId: `DL${randomBytes(9).toString('hex').toUpperCase()}`,
    secretAccessKey: randomBytes(30).toString('base64url'),
  }
  mkdirSync(dirname(file), { recursive: true })
  writeFileSync(file, JSON.stringify(creds) + '\n', { mode: 0o600 })
  try { chmodSync(file, 0o600) } catch { /* not our file system's business */ }
  return creds
}

/** Where the credentials of the embedded store whose data lives in `dir` are kept: next to that folder. */
export function credentialsFileFor (dir: string): string {
  return join(dirname(resolve(dir)), 'object-store-credentials')
}

// Request bodies: under /api/ a body is JSON or a multipart upload, anything else is refused with
// 415 before it is read (a text/plain post is the one kind another site can send without asking).
// Every non-multipart body is capped at runtimeConfig.maxJsonBytes (413), read here with the cap
// and handed to h3, so routes read it as usual. Multipart uploads are streamed by their own
// routes, which enforce their own limit (and JSON routes refuse them: readJsonBody).
const RAW_BODY = Symbol.for('h3RawBody')
const PAYLOAD_METHODS = new Set(['POST', 'PUT', 'PATCH', 'DELETE'])

export default defineEventHandler(async (event) => {
  if (!PAYLOAD_METHODS.has(event.method)) return
  const req = event.node.req as typeof event.node.req & Record<string | symbol, unknown>
  if ('__unenv__' in req || RAW_BODY in req || req.body !== undefined) return // in-process request
  const type = String(req.headers['content-type'] ?? '').toLowerCase()
  if (type.startsWith('multipart/form-data')) return
  const declaredLength = Number.parseInt(String(req.headers['content-length'] ?? ''), 10)
  const hasBody = declaredLength > 0 || /\bchunked\b/i.test(String(req.headers['transfer-encoding'] ?? ''))
  if (hasBody && event.path.startsWith('/api/') && !isJsonContentType(type)) throw unsupportedMediaType()

  const max = Number(useRuntimeConfig().maxJsonBytes)
  const tooLarge = () => {
    setResponseHeader(event, 'Connection', 'close')
    return apiError(413, 'body_too_large', 'Request body too large', { maxBytes: max })
  }
  const length = Number.parseInt(String(req.headers['content-length'] ?? ''), 10)
  if (Number.isFinite(length) && length > max) throw tooLarge()
  const chunked = /\bchunked\b/i.test(String(req.headers['transfer-encoding'] ?? ''))
  if (!(length > 0) && !chunked) return

  const body = await new Promise<Buffer>((ok, fail) => {
    const chunks: Buffer[] = []
    let size = 0
    const onData = (chunk: Buffer) => {
      size += chunk.length
      if (size > max) {
        req.off('data', onData)
        req.resume() // drain the rest without keeping it
        fail(tooLarge())
        return
      }
      chunks.push(chunk)
    }
    req.on('data', onData)
    req.once('end', () => ok(Buffer.concat(chunks)))
    req.once('error', fail)
  })
  req[RAW_BODY] = Promise.resolve(body)
})

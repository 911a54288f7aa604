// Development mail catcher: an SMTP server on loopback that keeps every message as a .eml file,
// and readers for the development mailbox. Plain Node (no Nitro imports).
import { mkdirSync } from 'node:fs'
import { readdir, readFile, rename, writeFile } from 'node:fs/promises'
import { join, resolve } from 'node:path'
import { randomBytes } from 'node:crypto'

export interface MailCatcher {
  host: string
  port: number
  dir: string
  close: () => Promise<void>
}

export interface CaughtMailSummary { id: string, to: string, subject: string, date: string }
export interface CaughtMail extends CaughtMailSummary { from: string, text: string, html: string | null }
/** A message with its recipients' bare addresses (lower-case), for deciding who may read it. */
export type WithRecipients<T> = T & { recipients: string[] }

const MAX_MESSAGE_BYTES = 10 * 1024 * 1024
/** Message ids are the file names we wrote: time, then random hex. */
const ID_PATTERN = /^\d{13}-[0-9a-f]{12}$/

/** Starts the catcher on 127.0.0.1 (a free port); each message lands in `dir` as <id>.eml. */
export async function startMailCatcher (opts: { dir: string }): Promise<MailCatcher> {
  const dir = resolve(opts.dir)
  mkdirSync(dir, { recursive: true })
  const { SMTPServer } = await import('smtp-server')
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['AUTH', 'STARTTLS'],
    logger: false,
    size: MAX_MESSAGE_BYTES,
    onData (stream, _session, callback) {
      const chunks: Buffer[] = []
      stream.on('data', (c: Buffer) => chunks.push(c))
      stream.on('error', callback)
      stream.on('end', () => {
        if ((stream as unknown as { sizeExceeded?: boolean }).sizeExceeded) {
          callback(Object.assign(new Error('Message too large'), { responseCode: 552 }))
          return
        }
        const id = `${Date.now()}-${randomBytes(6).toString('hex')}`
        const tmp = join(dir, `.${id}.tmp`)
        // Write then rename, so a reader never sees half a message.
        writeFile(tmp, Buffer.concat(chunks))
          .then(() => rename(tmp, join(dir, `${id}.eml`)))
          .then(() => callback(), callback)
      })
    },
  })
  await new Promise<void>((ok, fail) => {
    server.once('error', fail)
    server.listen(0, '127.0.0.1', () => { server.off('error', fail); ok() })
  })
  server.on('error', err => console.error('[mail] catcher error:', err.message))
  const port = (server.server.address() as { port: number }).port
  return {
    host: '127.0.0.1',
    port,
    dir,
    close: () => new Promise<void>(ok => server.close(() => ok())),
  }
}

async function parseFile (dir: string, id: string) {
  const { simpleParser } = await import('mailparser')
  const raw = await readFile(join(dir, `${id}.eml`))
  return simpleParser(raw)
}

const addressText = (a: unknown): string => {
  if (!a) return ''
  const list = Array.isArray(a) ? a : [a]
  return list.map((x: { text?: string }) => x.text ?? '').filter(Boolean).join(', ')
}

interface AddressNode { address?: string, group?: AddressNode[] }
const recipientsOf = (...fields: unknown[]): string[] => {
  const out: string[] = []
  const walk = (n: AddressNode) => {
    if (n.address) out.push(n.address.toLowerCase())
    n.group?.forEach(walk)
  }
  for (const f of fields) {
    if (!f) continue
    for (const a of (Array.isArray(f) ? f : [f]) as { value?: AddressNode[] }[]) a.value?.forEach(walk)
  }
  return [...new Set(out)]
}

/** Newest first, at most `limit` messages. */
export async function listCaughtMail (dir: string, limit = 200): Promise<WithRecipients<CaughtMailSummary>[]> {
  let files: string[]
  try {
    files = await readdir(resolve(dir))
  } catch {
    return []
  }
  const ids = files.filter(f => f.endsWith('.eml')).map(f => f.slice(0, -4)).filter(id => ID_PATTERN.test(id))
  ids.sort().reverse()
  const out: WithRecipients<CaughtMailSummary>[] = []
  for (const id of ids.slice(0, limit)) {
    try {
      const m = await parseFile(resolve(dir), id)
      out.push({ id, to: addressText(m.to), subject: m.subject ?? '', date: (m.date ?? new Date(Number(id.slice(0, 13)))).toISOString(), recipients: recipientsOf(m.to, m.cc, m.bcc) })
    } catch {
      // A message we cannot parse is skipped, not fatal for the list.
    }
  }
  return out
}

/** One message, or null when the id is unknown or malformed. */
export async function readCaughtMail (dir: string, id: string): Promise<WithRecipients<CaughtMail> | null> {
  if (!ID_PATTERN.test(id)) return null
  try {
    const m = await parseFile(resolve(dir), id)
    return {
      id,
      to: addressText(m.to),
      from: addressText(m.from),
      subject: m.subject ?? '',
      date: (m.date ?? new Date(Number(id.slice(0, 13)))).toISOString(),
      text: m.text ?? '',
      html: typeof m.html === 'string' ? m.html : null,
      recipients: recipientsOf(m.to, m.cc, m.bcc),
    }
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code === 'ENOENT') return null
    throw err
  }
}

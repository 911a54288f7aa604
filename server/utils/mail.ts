import { resolve } from 'node:path'
import nodemailer, { type Transporter } from 'nodemailer'
import { startMailCatcher, type MailCatcher } from '../services/mail-catcher'

export { listCaughtMail, readCaughtMail } from '../services/mail-catcher'

let catcher: Promise<MailCatcher | null> | null = null
let transport: Transporter | null = null

export interface OutgoingMail {
  to: string
  subject: string
  text: string
  html?: string
}

/** Starts the mail catcher on 127.0.0.1 when it is on (server/utils/service-mode.ts). */
export function startMail (): Promise<MailCatcher | null> {
  catcher ??= (async () => {
    const c = useRuntimeConfig().mail
    if (!mailCatcherEnabled()) return null
    return startMailCatcher({ dir: resolve(String(c.dir)) })
  })().catch((err) => {
    catcher = null
    throw err
  })
  return catcher
}

/** The folder of caught messages while the embedded catcher runs and the mailbox is on, else null. */
export async function caughtMailDir (): Promise<string | null> {
  if (!devMailboxEnabled()) return null
  const m = await catcher?.catch(() => null)
  return m?.dir ?? null
}

/** Sends one message through the catcher (development) or the configured SMTP server. */
export async function sendMail (mail: OutgoingMail): Promise<void> {
  const c = useRuntimeConfig().mail
  if (!transport) {
    const local = await startMail()
    if (local) {
      transport = nodemailer.createTransport({ host: local.host, port: local.port, secure: false, ignoreTLS: true })
    } else if (c.host) {
      transport = nodemailer.createTransport({
        host: c.host,
        port: Number(c.port),
        secure: Boolean(c.secure),
        auth: c.user ? { user: c.user, pass: c.pass } : undefined,
      })
    } else {
      console.warn(`[mail] no SMTP host and the catcher is off: "${mail.subject}" to ${mail.to} was not sent`)
      return
    }
  }
  await transport.sendMail({ from: c.from, to: mail.to, subject: mail.subject, text: mail.text, html: mail.html })
}

/** Stops the catcher (on shutdown). */
export async function stopMail (): Promise<void> {
  transport?.close()
  transport = null
  const m = await catcher?.catch(() => null)
  catcher = null
  await m?.close()
}

/** Whether a caught message's recipients (bare addresses) include the address. */
export function mailIsFor (message: { recipients: string[] }, email: string): boolean {
  return message.recipients.includes(email.trim().toLowerCase())
}

/** A caught message without its internal recipients list (the shape the API answers). */
export function publicMail<T extends { recipients: string[] }> (message: T): Omit<T, 'recipients'> {
  const { recipients: _, ...rest } = message
  return rest
}

/** The password-reset message. */
export function passwordResetMail (to: string, name: string, link: string): OutgoingMail {
  const text = [
    `Hello ${name},`,
    '',
    'Someone (we hope you) asked to set a new Driftline password for this address.',
    `Open this link within an hour to choose one: ${link}`,
    '',
    'If it was not you, ignore this message: your password stays as it is.',
  ].join('\n')
  const entities: Record<string, string> = { '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;' }
  const esc = (s: string) => s.replace(/[&<>"]/g, c => entities[c]!)
  const html = `<p>Hello ${esc(name)},</p><p>Someone (we hope you) asked to set a new Driftline password for this address.</p>`
    + `<p><a href="${esc(link)}">Choose a new password</a> (the link works for an hour).</p>`
    + '<p>If it was not you, ignore this message: your password stays as it is.</p>'
  return { to, subject: 'Set a new Driftline password', text, html }
}

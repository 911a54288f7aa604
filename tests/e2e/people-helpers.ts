// Helpers for the ensemble, member and invitation tests against the built app.
import Database from 'better-sqlite3'
import { join } from 'node:path'
import type { App } from './harness'

export const json = (method: string, body: unknown, cookie?: string) => ({ method, headers: { 'content-type': 'application/json' }, body: JSON.stringify(body), cookie })

export async function errorOf (r: Response) {
  const b = await r.json() as { statusMessage?: string, message?: string, data?: Record<string, any> }
  return { status: r.status, message: b.message ?? b.statusMessage ?? '', data: b.data ?? {} }
}

/** The id of the ensemble with this name as the signed-in user lists it. */
export async function ensembleId (app: App, cookie: string, name: string): Promise<number> {
  const list = await (await app.fetch('/api/ensembles', { cookie })).json() as { id: number, name: string }[]
  const e = list.find(x => x.name === name)
  if (!e) throw new Error(`no ensemble ${name}`)
  return e.id
}

/** The text of the newest caught message to the address (polls: mail goes out after the answer). */
export async function latestMailTo (app: App, adminCookie: string, to: string, after = 0): Promise<{ text: string, subject: string, count: number }> {
  for (let i = 0; i < 60; i++) {
    const list = await (await app.fetch('/api/dev/mail', { cookie: adminCookie })).json() as { id: string, to: string, subject: string }[]
    const mine = list.filter(m => m.to.toLowerCase().includes(to.toLowerCase()))
    if (mine.length > after) {
      const m = await (await app.fetch(`/api/dev/mail/${mine[0]!.id}`, { cookie: adminCookie })).json() as { text: string, subject: string }
      return { ...m, count: mine.length }
    }
    await new Promise(r => setTimeout(r, 250))
  }
  throw new Error(`no mail to ${to}`)
}

/** How many caught messages went to the address. */
export async function mailCount (app: App, adminCookie: string, to: string): Promise<number> {
  const list = await (await app.fetch('/api/dev/mail', { cookie: adminCookie })).json() as { to: string }[]
  return list.filter(m => m.to.toLowerCase().includes(to.toLowerCase())).length
}

/** Runs SQL on the app's throwaway database (to age an invitation past its expiry). */
export function withDb<T> (app: App, fn: (db: Database.Database) => T): T {
  const db = new Database(join(app.dir, 'driftline.sqlite'))
  try {
    db.pragma('busy_timeout = 5000')
    return fn(db)
  } finally {
    db.close()
  }
}

/** Every link in a text. */
export const linksIn = (text: string) => [...text.matchAll(/https?:\/\/[^\s<>"]+/g)].map(m => m[0])

// nuxt-auth-utils seals the session cookie with NUXT_SESSION_PASSWORD (≥ 32 characters), read
// on the first request. When it is missing we generate one and keep it next to the database, so
// sessions survive a restart. This runs synchronously, before the server takes requests.
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs'
import { randomBytes } from 'node:crypto'
import { dirname, join, resolve } from 'node:path'

const MIN = 32

export default defineNitroPlugin(() => {
  const config = useRuntimeConfig()
  const envName = `${(config.nitro as { envPrefix?: string } | undefined)?.envPrefix || 'NUXT_'}SESSION_PASSWORD`
  const session = config.session as { password?: string } | undefined
  const given = process.env[envName] || session?.password || ''
  if (given.length >= MIN) return
  if (given) console.warn(`[session] ${envName} is shorter than ${MIN} characters; using a generated secret instead`)

  const file = config.dbFile === ':memory:' ? null : join(dirname(resolve(config.dbFile)), 'session-secret')
  let secret = ''
  if (file && existsSync(file)) secret = readFileSync(file, 'utf8').trim()
  if (secret.length < MIN) {
    secret = randomBytes(32).toString('base64url')
    if (file) {
      mkdirSync(dirname(file), { recursive: true })
      writeFileSync(file, secret + '\n', { mode: 0o600 })
    }
  }
  // Runtime config is read-only here; nuxt-auth-utils reads the variable first, on the first request.
  process.env[envName] = secret
  console.warn(`[session] ${envName} is not set: sessions are sealed with a generated secret${file ? ` kept in ${file}` : ''}. Set it in production.`)
})

// `npm run db:seed`: the demo scenario into the database of knexfile.ts (NUXT_DB_FILE), with the
// take audio in the object store of the NUXT_STORAGE_* settings (the embedded fake under
// storage/objects by default, started for the seed and stopped again). Skips a database that
// already has accounts.
import type { Knex } from 'knex'
import { Hash } from '@adonisjs/hash'
import { Scrypt } from '@adonisjs/hash/drivers/scrypt'
import { createObjectStore, embeddedCredentials, startEmbeddedS3 } from '../server/services/object-store'
import { seedDemoIfEmpty } from './demo/index'

const env = (name: string, fallback: string) => process.env[name] ?? fallback

export async function seed (knex: Knex): Promise<void> {
  const t0 = performance.now()
  const bucket = env('NUXT_STORAGE_BUCKET', 'driftline')
  let endpoint = env('NUXT_STORAGE_ENDPOINT', '')
  const embedded = !endpoint && env('NUXT_STORAGE_EMBEDDED', 'true') !== 'false'
  let keys = { accessKeyId: env('NUXT_STORAGE_ACCESS_KEY_ID', ''), secretAccessKey: env('NUXT_STORAGE_SECRET_ACCESS_KEY', '') }
  const dir = env('NUXT_STORAGE_DIR', './storage/objects')
  if (embedded) keys = embeddedCredentials(dir, keys)
  const s3 = embedded ? await startEmbeddedS3({ dir, bucket, credentials: keys }) : null
  if (s3) endpoint = s3.endpoint
  const store = createObjectStore({ endpoint, region: env('NUXT_STORAGE_REGION', 'us-east-1'), bucket, ...keys })
  // Same scrypt settings as nuxt-auth-utils' hashPassword defaults, so the server verifies these hashes.
  const hasher = new Hash(new Scrypt({}))
  try {
    const result = await seedDemoIfEmpty(knex, {
      hashPassword: p => hasher.make(p),
      put: async (key, bytes, contentType) => { await store.put(key, bytes, { contentType }) },
      remove: key => store.delete(key),
      log: m => console.log(m),
    })
    if (result) console.log(`Demo scenario: ${result.users} people, ${result.drills} drills, ${result.takes} takes in ${Math.round(performance.now() - t0)} ms`)
    else console.log('The database already has accounts: demo seed skipped.')
  } finally {
    store.destroy()
    await s3?.close()
  }
}

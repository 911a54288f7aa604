// knex CLI settings (npm run db:migrate | db:rollback | db:seed). The server migrates itself on
// start from server/database/migrations.ts; both use the same knex_migrations table.
import type { Knex } from 'knex'
import { DEFAULT_DB_FILE, knexConfig } from './server/database/knex'

const config: Knex.Config = {
  ...knexConfig(process.env.NUXT_DB_FILE || DEFAULT_DB_FILE),
  migrations: { directory: './migrations', extension: 'ts', loadExtensions: ['.ts'] },
  seeds: { directory: './seeds', extension: 'ts', loadExtensions: ['.ts'] },
}

export default config

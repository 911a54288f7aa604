#!/usr/bin/env node
// `npm test`: makes sure Debian's Chromium is there for the browser tests (installs it with apt
// when running as root, fails with a clear message otherwise — never a silent skip), builds the
// app for the end-to-end tests, runs every vitest project, and ends with a plain summary line.
import { spawnSync } from 'node:child_process'
import { existsSync, readFileSync, rmSync } from 'node:fs'

const CHROMIUM = process.env.CHROMIUM_PATH || '/usr/bin/chromium'
const extra = process.argv.slice(2)

function sh(cmd, args, opts = {}) {
  const r = spawnSync(cmd, args, { stdio: 'inherit', ...opts })
  return r.status ?? 1
}

if (!existsSync(CHROMIUM)) {
  const isRoot = typeof process.getuid === 'function' && process.getuid() === 0
  if (isRoot && existsSync('/usr/bin/apt-get')) {
    console.log(`Chromium is missing at ${CHROMIUM}; installing Debian's package…`)
    const env = { ...process.env, DEBIAN_FRONTEND: 'noninteractive' }
    if (sh('apt-get', ['update', '-q'], { env }) !== 0 || sh('apt-get', ['install', '-y', '-q', 'chromium'], { env }) !== 0) {
      console.error('Could not install Chromium with apt-get; the browser tests cannot run.')
      process.exit(1)
    }
  } else {
    console.error(`Chromium is missing at ${CHROMIUM}. Install it (as root: apt-get update && apt-get install -y chromium) or set CHROMIUM_PATH.`)
    process.exit(1)
  }
}

if (!process.env.SKIP_BUILD) {
  console.log('Building the app for the end-to-end tests…')
  if (sh('npx', ['nuxt', 'build'], { env: { ...process.env, NODE_ENV: 'production' } }) !== 0) {
    console.error('The build failed.')
    console.log('0 passed, 1 failed')
    process.exit(1)
  }
}

const results = '.vitest-results.json'
rmSync(results, { force: true })
const status = sh('npx', ['vitest', 'run', '--reporter=default', '--reporter=json', `--outputFile=${results}`, ...extra])
let passed = 0
let failed = 0
if (existsSync(results)) {
  const json = JSON.parse(readFileSync(results, 'utf8'))
  passed = json.numPassedTests ?? 0
  failed = (json.numFailedTests ?? 0) + (json.testResults ?? []).filter(f => f.status === 'failed' && (f.assertionResults ?? []).length === 0).length
} else {
  failed = 1
}
if (status !== 0 && failed === 0) failed = 1
console.log(`${passed} passed, ${failed} failed`)
process.exit(failed > 0 || status !== 0 ? 1 : 0)

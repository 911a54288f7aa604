// `npm run bench:charts`: the built server on the volume ensemble (scripts/seed-volume.ts, seeded
// into NUXT_DB_FILE first when it is not there), loaded from loopback with autocannon at 20
// concurrent clients. Prints latency percentiles and requests per second for the statistics and
// the holds CSV, the time to stream every hold of the ensemble, and the server's memory growth.
// Needs `npm run build` first. Figures, not assertions: nothing here fails on a slow machine.
import { spawn } from 'node:child_process'
import { randomBytes } from 'node:crypto'
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs'
import { createServer } from 'node:net'
import { tmpdir } from 'node:os'
import { join, resolve } from 'node:path'
import autocannon from 'autocannon'
import Database from 'better-sqlite3'
import { DEFAULT_DB_FILE } from '../server/database/knex'
import { DEMO_PASSWORD } from '../seeds/demo/scenario'
import { seedVolume, VOLUME_DIRECTOR } from '../scripts/seed-volume'
import { quantileSorted } from '../shared/stats'

const ROOT = resolve(import.meta.dirname, '..')
const DURATION_S = Number(process.env.BENCH_SECONDS ?? 10)
const CONNECTIONS = 20

function freePort(): Promise<number> {
  return new Promise((ok, fail) => {
    const s = createServer().listen(0, '127.0.0.1', () => { const p = (s.address() as { port: number }).port; s.close(() => ok(p)) })
    s.on('error', fail)
  })
}

function rssKb(pid: number): number {
  const m = readFileSync(`/proc/${pid}/status`, 'utf8').match(/VmRSS:\s+(\d+)/)
  return m ? Number(m[1]) : Number.NaN
}

async function main() {
  const entry = join(ROOT, '.output/server/index.mjs')
  if (!existsSync(entry)) throw new Error('No built app: run `npm run build` first.')
  const file = resolve(process.env.NUXT_DB_FILE ?? DEFAULT_DB_FILE)
  const seeded = await seedVolume({ file, log: m => console.log(m) })
  if (!seeded) console.log(`Using the volume ensemble already in ${file}.`)

  const ro = new Database(file, { readonly: true })
  const ensembleId = (ro.prepare('select m.ensemble_id as id from memberships m join users u on u.id = m.user_id where u.email = ?').get(VOLUME_DIRECTOR) as { id: number }).id
  const section = ro.prepare('select id, name from sections where ensemble_id = ? order by position limit 1').get(ensembleId) as { id: number, name: string }
  const counts = ro.prepare(`select count(distinct t.id) as takes, count(h.id) as holds from takes t join analyses a on a.take_id = t.id and a.is_current = 1
    join hold_results h on h.analysis_id = a.id and h.cents_from_target is not null where t.ensemble_id = ?`).get(ensembleId) as { takes: number, holds: number }
  ro.close()

  const dir = mkdtempSync(join(tmpdir(), 'driftline-bench-'))
  const port = await freePort()
  const url = `http://127.0.0.1:${port}`
  const child = spawn(process.execPath, [entry], {
    env: {
      ...process.env, NODE_ENV: 'production', PORT: String(port), HOST: '127.0.0.1', NITRO_HOST: '127.0.0.1',
      NUXT_DB_FILE: file, NUXT_SEED_DEMO: 'false', NUXT_STORAGE_DIR: join(dir, 'objects'), NUXT_MAIL_DIR: join(dir, 'mail'),
      NUXT_SESSION_PASSWORD: randomBytes(24).toString('hex'), NUXT_BASE_URL: url, NUXT_ANALYSIS_WORKERS: '1',
    },
    stdio: ['ignore', 'ignore', 'inherit'],
  })
  try {
    for (let i = 0; ; i++) {
      try { if ((await fetch(`${url}/api/health`)).status === 200) break } catch { /* starting */ }
      if (i > 240) throw new Error('the server did not start in 60 s')
      await new Promise(r => setTimeout(r, 250))
    }
    const login = await fetch(`${url}/api/auth/login`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ email: VOLUME_DIRECTOR, password: DEMO_PASSWORD }) })
    if (login.status !== 200) throw new Error(`sign-in failed: ${login.status}`)
    const cookie = login.headers.getSetCookie().map(c => c.split(';')[0]).join('; ')
    const headers = { cookie }
    const statsPath = (q: string) => `/api/ensembles/${ensembleId}/stats${q}`
    const chartsPath = (q: string) => `/api/ensembles/${ensembleId}/charts${q}`

    const timeOne = async (path: string) => {
      const t0 = performance.now()
      const r = await fetch(url + path, { headers })
      await r.arrayBuffer()
      if (r.status !== 200) throw new Error(`${path} → ${r.status}`)
      return performance.now() - t0
    }
    console.log(`\nVolume ensemble ${ensembleId}: ${counts.takes} takes, ${counts.holds} scored holds; section "${section.name}" (${section.id}). ${CONNECTIONS} connections, ${DURATION_S} s per run, loopback.`)
    const cold = {
      section: await timeOne(statsPath(`?sectionId=${section.id}`)),
      ensemble: await timeOne(statsPath('')),
    }

    // The server may still be finishing requests a run left in flight (autocannon stops at its
    // deadline, the server does not): wait until a small request is answered quickly again.
    const settle = async () => {
      for (let i = 0, quick = 0; i < 240 && quick < 3; i++) {
        const t0 = performance.now()
        await fetch(`${url}/api/health`)
        quick = performance.now() - t0 < 30 ? quick + 1 : 0
        await new Promise(r => setTimeout(r, 250))
      }
    }

    // The whole ensemble's CSV first, alone, with the server's resident memory sampled while it streams.
    const rss0 = rssKb(child.pid!)
    let rssMax = rss0
    const sampler = setInterval(() => { rssMax = Math.max(rssMax, rssKb(child.pid!)) }, 20)
    const t0 = performance.now()
    const res = await fetch(`${url}/api/ensembles/${ensembleId}/holds.csv`, { headers })
    let bytes = 0
    let lines = 0
    for await (const chunk of res.body as unknown as AsyncIterable<Uint8Array>) {
      bytes += chunk.length
      for (let i = chunk.indexOf(10); i >= 0; i = chunk.indexOf(10, i + 1)) lines++
    }
    const csvS = (performance.now() - t0) / 1000
    clearInterval(sampler)
    // The chart series' first answers after the CSV, which is measured on a server that has
    // answered only the two statistics so far.
    const coldCharts = { section: await timeOne(chartsPath(`?sectionId=${section.id}`)), ensemble: await timeOne(chartsPath('')) }

    const rows: string[][] = []
    const run = async (label: string, opts: Partial<autocannon.Options>) => {
      await settle()
      const times: number[] = []
      const instance = autocannon({ url, connections: CONNECTIONS, duration: DURATION_S, headers, ...opts })
      instance.on('response', (_client: unknown, _status: number, _bytes: number, ms: number) => { times.push(ms) })
      const r = await instance
      const bad = r.non2xx + r.errors + r.timeouts
      const sorted = Float64Array.from(times).sort()
      const p = (q: number) => (sorted.length ? quantileSorted(sorted, q).toFixed(0) : '–')
      rows.push([label, p(0.5), p(0.95), p(0.99), r.requests.average.toFixed(1), String(r.requests.total), String(bad)])
    }
    // Every request a new date range: no two share a cached result (the worst case, not a target).
    let n = 0
    const uncached = (q: string) => ({ requests: [{ setupRequest: (req: { path: string }) => ({ ...req, path: statsPath(`${q}${q ? '&' : '?'}to=${new Date(Date.UTC(2030, 0, 1) + (n++) * 1000).toISOString()}`) }) }] })
    await run('stats, one section, all time (repeated)', { url: url + statsPath(`?sectionId=${section.id}`) })
    await run('stats, whole ensemble, all time (repeated)', { url: url + statsPath('') })
    await run('chart series, one section, all time (repeated)', { url: url + chartsPath(`?sectionId=${section.id}`) })
    await run('chart series, whole ensemble, all time (repeated)', { url: url + chartsPath('') })
    await run('CSV, one section, all time', { url: `${url}/api/ensembles/${ensembleId}/holds.csv?sectionId=${section.id}`, duration: Math.max(5, DURATION_S / 2) })
    await run('stats, one section, a new range each request', uncached(`?sectionId=${section.id}`))
    await run('stats, whole ensemble, a new range each request', uncached(''))

    console.log(`\nFirst request after start (nothing cached): stats of one section ${cold.section.toFixed(0)} ms, of the whole ensemble ${cold.ensemble.toFixed(0)} ms; ` +
      `chart series of one section ${coldCharts.section.toFixed(0)} ms, of the whole ensemble ${coldCharts.ensemble.toFixed(0)} ms`)
    console.log('\n| run | p50 ms | p95 ms | p99 ms | req/s | requests | non-2xx/errors |')
    console.log('| --- | --- | --- | --- | --- | --- | --- |')
    for (const r of rows) console.log(`| ${r.join(' | ')} |`)
    console.log('(percentiles over every answered request of the run, linear interpolation between ranks.)')
    console.log(`\nCSV of every hold: ${lines - 1} rows, ${(bytes / 1e6).toFixed(1)} MB in ${csvS.toFixed(2)} s; server memory ${Math.round(rss0 / 1024)} MB before, peak ${Math.round(rssMax / 1024)} MB (growth ${((rssMax - rss0) / 1024).toFixed(1)} MB)`)
    console.log(`Machine: ${(await import('node:os')).cpus().length} cores, load ${(await import('node:os')).loadavg().map(l => l.toFixed(2)).join(' ')}`)
  } finally {
    child.kill('SIGTERM')
    rmSync(dir, { recursive: true, force: true })
  }
}

main().catch((e) => { console.error(`bench:charts failed: ${(e as Error).message}`); process.exit(1) })

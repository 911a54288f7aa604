export interface StartupInfo {
  ms: number
  migrations: string[]
  seeded: boolean
}

let ready: Promise<StartupInfo> | null = null
let state: 'starting' | 'ready' | 'failed' = 'starting'
let failure: Error | null = null

/** Registers the start-up work (server/plugins/10.startup.ts). */
export function setStartup (p: Promise<StartupInfo>): void {
  state = 'starting'
  ready = p.then((info) => { state = 'ready'; return info }, (err) => { state = 'failed'; failure = err; throw err })
  ready.catch(() => {}) // failure is reported by the plugin and by whenReady()
}

/** Resolves when migrations (and the demo seed) are done; rejects when start-up failed or took longer than timeoutMs. */
export function whenReady (timeoutMs = 60_000): Promise<StartupInfo> {
  if (!ready) return Promise.reject(new Error('start-up not registered'))
  let timer: ReturnType<typeof setTimeout> | undefined
  const timeout = new Promise<never>((_, fail) => {
    timer = setTimeout(() => fail(new Error(`start-up not finished after ${timeoutMs} ms`)), timeoutMs)
    timer.unref?.()
  })
  return Promise.race([ready, timeout]).finally(() => clearTimeout(timer))
}

export function startupState (): { state: typeof state, error: string | null } {
  return { state, error: failure?.message ?? null }
}

import type { ToneEvent } from '#shared/practice/mix'

// Practice tones: every sound goes voice → master gain → limiter → speakers/headphones, so no
// chord, however many parts, can reach full scale, and the default level is quiet.

/** Master gain at full volume: about −6 dBFS before the limiter. */
export const PRACTICE_MAX_GAIN = 0.5
/** Volume (0..1 of the slider) a new listener starts at: gain 0.125, about −18 dBFS. */
export const PRACTICE_DEFAULT_VOLUME = 0.25
/** A brick-wall-like limiter: fast attack, high ratio, threshold below full scale. */
export const LIMITER_SETTINGS = { threshold: -10, knee: 0, ratio: 20, attack: 0.002, release: 0.2 } as const

export type { ToneEvent }
export type PracticeTimbre = 'soft' | 'sine' | 'bright'

export const TIMBRE_LABELS: Record<PracticeTimbre, string> = {
  soft: 'Soft (a few overtones, beats easy to hear)',
  sine: 'Pure sine',
  bright: 'Bright (many overtones)',
}

/** Relative strengths of harmonics 1..n for each timbre. */
const HARMONICS: Record<PracticeTimbre, number[]> = {
  sine: [1],
  soft: [1, 0.4, 0.18, 0.08, 0.04],
  bright: [1, 0.6, 0.45, 0.32, 0.24, 0.17, 0.12, 0.08],
}

/** Master gain for a slider volume 0..1 (clamped, never above PRACTICE_MAX_GAIN). */
export function volumeToGain(volume: number): number {
  const v = Number.isFinite(volume) ? Math.min(1, Math.max(0, volume)) : PRACTICE_DEFAULT_VOLUME
  return v * PRACTICE_MAX_GAIN
}

/** The output chain every practice sound passes through: master gain → limiter → destination. */
export function buildOutputChain(ctx: BaseAudioContext, gain: number): { master: GainNode, limiter: DynamicsCompressorNode } {
  const master = ctx.createGain()
  master.gain.value = Math.min(PRACTICE_MAX_GAIN, Math.max(0, gain))
  const limiter = ctx.createDynamicsCompressor()
  limiter.threshold.value = LIMITER_SETTINGS.threshold
  limiter.knee.value = LIMITER_SETTINGS.knee
  limiter.ratio.value = LIMITER_SETTINGS.ratio
  limiter.attack.value = LIMITER_SETTINGS.attack
  limiter.release.value = LIMITER_SETTINGS.release
  master.connect(limiter)
  limiter.connect(ctx.destination)
  return { master, limiter }
}


/** A drone fades in and out over this long, and stops by itself after DRONE_MAX_S. */
export const DRONE_FADE_S = 0.5
export const DRONE_MAX_S = 600

interface Voice { osc: OscillatorNode, env: GainNode, endAt: number }

const VOLUME_KEY = 'driftline.practice.volume'
const ATTACK_S = 0.04
const RELEASE_S = 0.15

export const usePracticeStore = defineStore('practice', () => {
  const volume = ref(PRACTICE_DEFAULT_VOLUME)
  const timbre = ref<PracticeTimbre>('soft')
  /** Length of a chord or note played on its own, in seconds. */
  const holdS = ref(2.5)
  /** What is sounding now (a chord or cell key), for the pressed state of its control. */
  const activeKey = ref<string | null>(null)
  const error = ref<string | null>(null)

  // Audio objects live in this closure, one per store (per app), never at module scope.
  let ctx: AudioContext | null = null
  let chain: { master: GainNode, limiter: DynamicsCompressorNode } | null = null
  const waves = new Map<PracticeTimbre, PeriodicWave>()
  const voices = new Set<Voice>()
  let clearTimer: ReturnType<typeof setTimeout> | null = null
  let loopTimer: ReturnType<typeof setInterval> | null = null

  function loadSaved() {
    if (!import.meta.client) return
    try {
      const saved = Number(localStorage.getItem(VOLUME_KEY))
      if (localStorage.getItem(VOLUME_KEY) !== null && Number.isFinite(saved)) volume.value = Math.min(1, Math.max(0, saved))
    }
    catch { /* storage may be blocked; the default stands */ }
  }

  function context(): AudioContext | null {
    if (ctx) return ctx
    const Ctor = typeof window !== 'undefined'
      ? (window.AudioContext ?? (window as unknown as { webkitAudioContext?: typeof AudioContext }).webkitAudioContext)
      : undefined
    if (!Ctor) {
      error.value = 'This browser cannot play practice tones (no Web Audio).'
      return null
    }
    ctx = new Ctor()
    chain = buildOutputChain(ctx, volumeToGain(volume.value))
    return ctx
  }

  /** The audio context, created on first use (call from a click or key press). */
  async function ready(): Promise<AudioContext | null> {
    const c = context()
    if (c && c.state === 'suspended') {
      try { await c.resume() }
      catch { /* a later gesture resumes it */ }
    }
    return c
  }

  function setVolume(v: number) {
    volume.value = Math.min(1, Math.max(0, Number.isFinite(v) ? v : PRACTICE_DEFAULT_VOLUME))
    if (ctx && chain) chain.master.gain.setTargetAtTime(volumeToGain(volume.value), ctx.currentTime, 0.02)
    if (import.meta.client) {
      try { localStorage.setItem(VOLUME_KEY, String(volume.value)) }
      catch { /* not kept; still applied */ }
    }
  }

  function wave(c: AudioContext, t: PracticeTimbre): PeriodicWave | null {
    if (t === 'sine') return null
    let w = waves.get(t)
    if (!w) {
      const h = HARMONICS[t]
      const real = new Float32Array(h.length + 1)
      const imag = new Float32Array(h.length + 1)
      h.forEach((a, i) => { imag[i + 1] = a })
      w = c.createPeriodicWave(real, imag)
      waves.set(t, w)
    }
    return w
  }

  function voice(c: AudioContext, hz: number, at: number, durationS: number, amp: number, fadeS = { in: ATTACK_S, out: RELEASE_S }) {
    if (!chain || !Number.isFinite(hz) || hz <= 0) return
    const osc = c.createOscillator()
    const w = wave(c, timbre.value)
    if (w) osc.setPeriodicWave(w)
    else osc.type = 'sine'
    osc.frequency.value = hz
    const env = c.createGain()
    const end = at + Math.max(durationS, fadeS.in + fadeS.out)
    env.gain.setValueAtTime(0, at)
    env.gain.linearRampToValueAtTime(amp, at + fadeS.in)
    env.gain.setValueAtTime(amp, end - fadeS.out)
    env.gain.linearRampToValueAtTime(0, end)
    osc.connect(env)
    env.connect(chain.master)
    osc.start(at)
    osc.stop(end + 0.02)
    const v: Voice = { osc, env, endAt: end }
    voices.add(v)
    osc.onended = () => {
      voices.delete(v)
      env.disconnect()
    }
  }

  /** Schedules frequencies sounding together; each voice shares the headroom so a chord never sums past 0.9. */
  function sound(c: AudioContext, hz: number[], at: number, durationS: number, weights?: number[], fadeS?: { in: number, out: number }) {
    const valid = hz.map((f, i) => ({ f, w: weights?.[i] ?? 1 }))
      .filter(v => Number.isFinite(v.f) && v.f > 0 && Number.isFinite(v.w) && v.w > 0)
    const total = valid.reduce((s, v) => s + v.w, 0)
    for (const v of valid) voice(c, v.f, at, durationS, 0.9 * v.w / Math.max(1, total), fadeS)
  }

  function markActive(key: string | null, forS: number) {
    if (clearTimer) clearTimeout(clearTimer)
    activeKey.value = key
    if (key) clearTimer = setTimeout(() => { activeKey.value = null }, forS * 1000)
  }

  /** Stops every sounding and scheduled tone with a short fade (no click). */
  function stop() {
    if (loopTimer) { clearInterval(loopTimer); loopTimer = null }
    if (ctx) {
      const now = ctx.currentTime
      for (const v of voices) {
        v.env.gain.cancelScheduledValues(now)
        v.env.gain.setTargetAtTime(0, now, 0.02)
        try { v.osc.stop(now + 0.1) }
        catch { /* already stopped */ }
      }
    }
    markActive(null, 0)
  }

  /** Plays frequencies together now for `durationS` (default holdS). */
  async function play(hz: number[], opts: { key?: string, durationS?: number } = {}) {
    const c = await ready()
    if (!c) return
    stop()
    const d = opts.durationS ?? holdS.value
    sound(c, hz, c.currentTime + 0.02, d)
    markActive(opts.key ?? null, d)
  }

  /** Plays a timeline of tone events starting `delayS` from now; returns the context time of its start. */
  async function playSequence(events: ToneEvent[], opts: { key?: string, delayS?: number } = {}): Promise<number | null> {
    const c = await ready()
    if (!c) return null
    stop()
    const start = c.currentTime + (opts.delayS ?? 0.05)
    let last = 0
    for (const e of events) {
      sound(c, e.hz, start + e.atS, e.durationS, e.weights)
      last = Math.max(last, e.atS + e.durationS)
    }
    markActive(opts.key ?? null, last + (opts.delayS ?? 0.05))
    return start
  }

  /**
   * Holds frequencies (a drone) until stop(), fading in and out over DRONE_FADE_S; it ends by
   * itself after DRONE_MAX_S so a forgotten drone does not play all day.
   */
  async function drone(hz: number[], key: string): Promise<boolean> {
    const c = await ready()
    if (!c) return false
    stop()
    sound(c, hz, c.currentTime + 0.02, DRONE_MAX_S, undefined, { in: DRONE_FADE_S, out: DRONE_FADE_S })
    markActive(key, DRONE_MAX_S)
    return true
  }

  /**
   * Repeats `events` every `periodS` seconds until stop(), scheduling about a second ahead (a timer
   * alone would drift and stutter; the audio clock keeps the turns exact).
   */
  async function loop(events: ToneEvent[], periodS: number, key: string): Promise<boolean> {
    const c = await ready()
    if (!c || !(periodS > 0) || !events.length) return false
    stop()
    let next = c.currentTime + 0.05
    const ahead = () => {
      while (next < c.currentTime + 1.2) {
        for (const e of events) sound(c, e.hz, next + e.atS, e.durationS, e.weights)
        next += periodS
      }
    }
    ahead()
    loopTimer = setInterval(ahead, 250)
    if (clearTimer) clearTimeout(clearTimer)
    activeKey.value = key
    return true
  }

  function clicks(c: AudioContext, beats: number, spb: number, start: number) {
    if (!chain) return
    for (let i = 0; i < beats; i++) {
      const at = start + i * spb
      const osc = c.createOscillator()
      const env = c.createGain()
      osc.type = 'triangle'
      osc.frequency.value = i === 0 ? 1760 : 1320
      env.gain.setValueAtTime(0, at)
      env.gain.linearRampToValueAtTime(0.5, at + 0.002)
      env.gain.exponentialRampToValueAtTime(0.001, at + 0.06)
      osc.connect(env)
      env.connect(chain.master)
      osc.start(at)
      osc.stop(at + 0.08)
      const v: Voice = { osc, env, endAt: at + 0.08 }
      voices.add(v)
      osc.onended = () => { voices.delete(v); env.disconnect() }
    }
  }

  /**
   * Count-in clicks (`beats` at `tempo`, the first higher), then optionally the tone events from
   * the first chord on. Returns the context times of the first click and of the first chord.
   */
  async function countIn(beats: number, tempo: number, events: ToneEvent[] = [], key: string | null = null): Promise<{ startAt: number, firstChordAt: number } | null> {
    const c = await ready()
    if (!c || !chain) return null
    stop()
    const spb = 60 / tempo
    const startAt = c.currentTime + 0.1
    clicks(c, Math.max(0, Math.floor(beats)), spb, startAt)
    const firstChordAt = startAt + Math.max(0, Math.floor(beats)) * spb
    let last = 0
    for (const e of events) {
      sound(c, e.hz, firstChordAt + e.atS, e.durationS, e.weights)
      last = Math.max(last, e.atS + e.durationS)
    }
    markActive(key, firstChordAt - c.currentTime + last)
    return { startAt, firstChordAt }
  }

  /** Context time now (null before the first sound). */
  function now(): number | null {
    return ctx ? ctx.currentTime : null
  }

  /** Closes the audio context (when leaving the app's practice screens). */
  async function dispose() {
    stop()
    const c = ctx
    ctx = null
    chain = null
    waves.clear()
    voices.clear()
    if (c) {
      try { await c.close() }
      catch { /* already closed */ }
    }
  }

  /** The output chain, for checks: master gain value and limiter settings. */
  function inspect() {
    return chain ? { gain: chain.master.gain.value, limiter: chain.limiter } : null
  }

  return { volume, timbre, holdS, activeKey, error, loadSaved, ready, setVolume, play, playSequence, countIn, drone, loop, stop, now, dispose, inspect }
})

// A recording stand-in for the Web Audio graph: every node remembers what it is connected to
// and every parameter its value and automation, so a test can walk the chain a tone takes.

export class FakeParam {
  value: number
  events: [string, ...number[]][] = []
  constructor(v = 0) { this.value = v }
  setValueAtTime(v: number, t: number) { this.events.push(['set', v, t]); this.value = v; return this }
  linearRampToValueAtTime(v: number, t: number) { this.events.push(['linear', v, t]); return this }
  exponentialRampToValueAtTime(v: number, t: number) { this.events.push(['exp', v, t]); return this }
  setTargetAtTime(v: number, t: number, c: number) { this.events.push(['target', v, t, c]); this.value = v; return this }
  cancelScheduledValues(t: number) { this.events.push(['cancel', t]); return this }
  /** Highest level the automation reaches (the initial value included). */
  peak(): number { return Math.max(this.value, ...this.events.filter(e => e[0] !== 'cancel').map(e => e[1] as number)) }
}

export class FakeNode {
  outputs: FakeNode[] = []
  constructor(readonly kind: string, readonly ctx: FakeAudioContext) { ctx.nodes.push(this) }
  connect(n: FakeNode) { this.outputs.push(n); return n }
  disconnect() { this.outputs = [] }
}

export class FakeGain extends FakeNode {
  gain = new FakeParam(1)
  constructor(ctx: FakeAudioContext) { super('gain', ctx) }
}

export class FakeCompressor extends FakeNode {
  threshold = new FakeParam(-24)
  knee = new FakeParam(30)
  ratio = new FakeParam(12)
  attack = new FakeParam(0.003)
  release = new FakeParam(0.25)
  constructor(ctx: FakeAudioContext) { super('compressor', ctx) }
}

export class FakeOscillator extends FakeNode {
  frequency = new FakeParam(440)
  type = 'sine'
  wave: unknown = null
  started: number | null = null
  stopped: number | null = null
  onended: (() => void) | null = null
  constructor(ctx: FakeAudioContext) { super('oscillator', ctx) }
  setPeriodicWave(w: unknown) { this.wave = w; this.type = 'custom' }
  start(t = 0) { this.started = t }
  stop(t = 0) { this.stopped = t }
}

export class FakeAnalyser extends FakeNode {
  fftSize = 2048
  level = 0
  constructor(ctx: FakeAudioContext) { super('analyser', ctx) }
  getFloatTimeDomainData(buf: Float32Array) { buf.fill(this.level) }
}

export class FakeStreamSource extends FakeNode {
  constructor(ctx: FakeAudioContext, readonly mediaStream: unknown) { super('stream-source', ctx) }
}

export class FakeAudioContext {
  static instances: FakeAudioContext[] = []
  nodes: FakeNode[] = []
  currentTime = 0
  state: 'suspended' | 'running' | 'closed' = 'running'
  destination: FakeNode
  constructor() {
    FakeAudioContext.instances.push(this)
    this.destination = new FakeNode('destination', this)
  }
  createGain() { return new FakeGain(this) }
  createDynamicsCompressor() { return new FakeCompressor(this) }
  createOscillator() { return new FakeOscillator(this) }
  createAnalyser() { return new FakeAnalyser(this) }
  createMediaStreamSource(stream: unknown) { return new FakeStreamSource(this, stream) }
  createPeriodicWave(real: Float32Array, imag: Float32Array) { return { real, imag } }
  async resume() { this.state = 'running' }
  async close() { this.state = 'closed' }
  of<T extends FakeNode>(kind: string): T[] { return this.nodes.filter(n => n.kind === kind) as T[] }
}

// The part of autocannon's interface the chart benchmark uses (the package ships no types).
declare module 'autocannon' {
  namespace autocannon {
    interface Options {
      url: string
      connections?: number
      duration?: number
      headers?: Record<string, string>
      method?: string
      body?: string
      [option: string]: unknown
    }
    interface Histogram { average: number, total: number, p50: number, p90: number, p97_5: number, p99: number }
    interface Result { latency: Histogram, requests: Histogram, non2xx: number, errors: number, timeouts: number }
    /** A running load: awaitable for its result; 'response' gives each answer's latency in ms. */
    interface Instance extends PromiseLike<Result> {
      on (event: 'response', listener: (client: unknown, statusCode: number, resBytes: number, responseTime: number) => void): Instance
    }
  }
  function autocannon (opts: autocannon.Options): autocannon.Instance
  export = autocannon
}

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
  }
  function autocannon (opts: autocannon.Options): Promise<autocannon.Result>
  export = autocannon
}

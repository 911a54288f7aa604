// Byte ranges of the audio route, the page policy's script hashes, and the API route table.
import { Readable } from 'node:stream'
import { createHash } from 'node:crypto'
import { describe, expect, it } from 'vitest'
import { exactRange, parseByteRange, parseContentRange } from '../../../server/utils/range'
import { inlineScriptHashes, pagePolicy } from '../../../server/utils/csp'
import { routePattern, routeTable } from '../../../server/utils/api-routes'
import { explicitSwitch } from '../../../server/utils/service-mode'

const collect = async (r: Readable) => { const parts: Buffer[] = []; for await (const c of r) parts.push(Buffer.from(c)); return Buffer.concat(parts).toString() }

describe('parseByteRange (RFC 9110 §14.1.2 examples for a 10000-byte representation)', () => {
  it.each([
    ['bytes=0-0', { start: 0, end: 0 }], // "The first byte only"
    ['bytes=-1', { start: 9999, end: 9999 }], // "The last byte only"
    ['bytes=0-499', { start: 0, end: 499 }], // "The first 500 bytes"
    ['bytes=-500', { start: 9500, end: 9999 }], // "The final 500 bytes"
    ['bytes=9500-', { start: 9500, end: 9999 }],
  ])('%s', (header, want) => {
    expect(parseByteRange(header, 10000)).toEqual(want)
  })
  it('is unsatisfiable past the end and for an empty object', () => {
    expect(parseByteRange('bytes=10000-', 10000)).toBe('unsatisfiable')
    expect(parseByteRange('bytes=-5', 0)).toBe('unsatisfiable')
  })
})

describe('exactRange', () => {
  const body = () => Readable.from([Buffer.from('0123'), Buffer.from('4567'), Buffer.from('89')])
  it('cuts a store answer that covers more than was asked down to the range', async () => {
    // A store that reads "bytes=0-0" as "from 0 to the end" sends everything.
    expect(await collect(exactRange(body(), parseContentRange('bytes 0-9/10'), { start: 0, end: 0 }))).toBe('0')
    expect(await collect(exactRange(body(), null, { start: 3, end: 6 }))).toBe('3456')
  })
  it('passes an exact answer through', async () => {
    const b = body()
    expect(exactRange(b, { start: 2, end: 5 }, { start: 2, end: 5 })).toBe(b)
  })
})

describe('page policy', () => {
  it('hashes the inline scripts a browser runs, not data blocks or external scripts', () => {
    const boot = 'window.__NUXT__={};window.__NUXT__.config={public:{}}'
    const html = `<html><head><script type="module" src="/_nuxt/entry.js"></script></head><body>`
      + `<script type="application/json" id="__NUXT_DATA__">[{"a":1}]</script><script>${boot}</script></body></html>`
    // A CSP hash source is the base64 SHA-256 of the script's text (CSP Level 3, §8.4 "hash-source").
    const want = `'sha256-${createHash('sha256').update(boot).digest('base64')}'`
    expect(inlineScriptHashes(html)).toEqual([want])
    const policy = pagePolicy(html)
    expect(policy).toContain(`script-src 'self' ${want}`)
    expect(policy).toContain("frame-ancestors 'none'")
    expect(policy).not.toContain('unsafe-eval')
    expect(policy).not.toMatch(/script-src[^;]*unsafe-inline/)
  })
})

describe('API route table', () => {
  const table = routeTable([
    { route: '/api/home', method: 'get' },
    { route: '/api/takes', method: 'get' },
    { route: '/api/takes', method: 'post' },
    { route: '/api/takes/:id', method: 'get' },
    { route: '/api/files/**', method: 'get' },
    { route: '/api/any' },
    { route: '/api/mw', middleware: true },
    { route: '/**' },
  ])
  it('lists the methods for a path, HEAD with GET', () => {
    expect([...table.methodsFor('/api/home') as Set<string>].sort()).toEqual(['GET', 'HEAD'])
    expect([...table.methodsFor('/api/takes?page=2') as Set<string>].sort()).toEqual(['GET', 'HEAD', 'POST'])
    expect([...table.methodsFor('/api/takes/%201') as Set<string>]).toContain('GET')
    expect([...table.methodsFor('/api/files/a/b.wav') as Set<string>]).toContain('GET')
    expect(table.methodsFor('/api/any')).toBe('all')
  })
  it('knows no route for other paths, and ignores middleware and page routes', () => {
    expect((table.methodsFor('/api/nothing') as Set<string>).size).toBe(0)
    expect((table.methodsFor('/api/takes/1/x') as Set<string>).size).toBe(0)
    expect((table.methodsFor('/api/mw') as Set<string>).size).toBe(0)
    expect(routePattern('/api/takes/:id').test('/api/takes/')).toBe(false)
  })
})

describe('explicitSwitch', () => {
  it.each([[true, true], ['true', true], [false, false], ['false', false], ['auto', null], ['', null], [undefined, null]])('%j → %j', (v, want) => {
    expect(explicitSwitch(v)).toBe(want)
  })
})

import { createHash } from 'node:crypto'

/** Script types a browser runs (an empty type is JavaScript); JSON data blocks are never run. */
const RUNNABLE = /^(|text\/javascript|application\/javascript|module|importmap)$/i

/** sha256 sources ('sha256-…') of every inline script of the page a browser would run. */
export function inlineScriptHashes (html: string): string[] {
  const hashes = new Set<string>()
  for (const m of html.matchAll(/<script\b([^>]*)>([\s\S]*?)<\/script\s*>/gi)) {
    const attrs = m[1] ?? ''
    if (/\bsrc\s*=/i.test(attrs)) continue
    const type = /\btype\s*=\s*["']?([^"'\s>]*)/i.exec(attrs)?.[1] ?? ''
    if (!RUNNABLE.test(type)) continue
    hashes.add(`'sha256-${createHash('sha256').update(m[2] ?? '', 'utf8').digest('base64')}'`)
  }
  return [...hashes]
}

/**
 * The content security policy of a rendered page: scripts only from the app's own origin plus
 * the page's own inline scripts by hash (Nuxt's start-up data), styles from the origin and
 * inline (Vue style bindings, the waveform's shadow styles), audio and images also from blob:
 * (a recording heard back before it is sent), and no framing by any site.
 */
export function pagePolicy (html: string): string {
  return [
    "default-src 'self'",
    ["script-src 'self'", ...inlineScriptHashes(html)].join(' '),
    "style-src 'self' 'unsafe-inline'",
    "img-src 'self' data: blob:",
    "font-src 'self' data:",
    "media-src 'self' blob:",
    "connect-src 'self' blob:",
    "worker-src 'self' blob:",
    "object-src 'none'",
    "base-uri 'self'",
    "form-action 'self'",
    "frame-ancestors 'none'",
  ].join('; ')
}

/** Policy of every answer that is not a page (JSON, audio, files): nothing runs in it, nothing frames it; opened on its own, audio still plays. */
export const NON_PAGE_POLICY = "default-src 'none'; media-src 'self'; frame-ancestors 'none'"

// Text that people send and see again: cleaning it, and describing bad values in plain words.
import type { z } from 'zod'

/**
 * Bidirectional embedding, override and isolate controls (U+202A–U+202E, U+2066–U+2069). They
 * reorder how text around them is drawn, so a file name such as "take‮3pm.exe" reads as
 * another name; nothing people type needs them.
 */
const BIDI_CONTROLS = /[\u202A-\u202E\u2066-\u2069]/g

/** The text without bidirectional control characters. */
export function stripBidi (text: string): string {
  return text.replace(BIDI_CONTROLS, '')
}

/** Whether the text has bidirectional control characters. */
export function hasBidi (text: string): boolean {
  return /[\u202A-\u202E\u2066-\u2069]/.test(text)
}

/** A value as a person would call it: "C4" stays quoted text, an object is "an object", never "[object Object]". */
export function describeValue (value: unknown): string {
  if (value === undefined) return 'nothing'
  if (value === null) return 'null'
  if (typeof value === 'string') return `"${stripBidi(value).slice(0, 40)}${value.length > 40 ? '…' : ''}"`
  if (typeof value === 'number') return Number.isFinite(value) ? `the number ${value}` : 'a number that is not finite'
  if (typeof value === 'boolean') return value ? 'true' : 'false'
  if (Array.isArray(value)) return 'a list'
  if (typeof value === 'object') return 'an object'
  return 'a value of another kind'
}

const EXPECTED: Record<string, string> = {
  string: 'text', number: 'a number', int: 'a whole number', boolean: 'true or false', array: 'a list',
  object: 'an object', record: 'an object', bigint: 'a whole number', date: 'a date', null: 'null',
}

/** How big: "at least 2 characters", "at most 16 items", "above 0". */
function bound (kind: 'least' | 'most', origin: string, limit: unknown, inclusive: boolean | undefined): string {
  const n = typeof limit === 'bigint' ? limit.toString() : String(limit)
  if (origin === 'string') return `at ${kind} ${n} characters`
  if (origin === 'array' || origin === 'set') return `at ${kind} ${n} items`
  if (inclusive === false) return `${kind === 'least' ? 'above' : 'below'} ${n}`
  return `at ${kind} ${n}`
}

/**
 * Zod issue messages in plain words, for messages people read (zod's own name the input's
 * JavaScript type, "received undefined"). Pass as `{ error: plainIssueMessage }` to a parse.
 */
export function plainIssueMessage (issue: z.core.$ZodRawIssue): string | undefined {
  const i = issue as z.core.$ZodRawIssue & Record<string, unknown>
  switch (i.code) {
    case 'invalid_type':
      if (i.input === undefined) return 'required'
      return `expected ${EXPECTED[String(i.expected)] ?? String(i.expected)}, found ${describeValue(i.input)}`
    case 'too_small': return `must be ${bound('least', String(i.origin), i.minimum, i.inclusive as boolean | undefined)}`
    case 'too_big': return `must be ${bound('most', String(i.origin), i.maximum, i.inclusive as boolean | undefined)}`
    case 'invalid_value': return `must be one of ${(i.values as unknown[]).map(v => describeValue(v)).join(', ')}`
    case 'invalid_format': return i.format === 'email' ? 'not an e-mail address' : `not in the expected form (${String(i.format)})`
    case 'not_multiple_of': return `must be a multiple of ${String(i.divisor)}`
    case 'unrecognized_keys': return `unknown field${(i.keys as string[]).length > 1 ? 's' : ''} ${(i.keys as string[]).map(k => `"${k}"`).join(', ')}`
    case 'invalid_union': return 'not one of the accepted forms'
    default: return undefined
  }
}

/**
 * Offset of the first character where a text stops being JSON (RFC 8259), or null when it is
 * JSON. The engine's own error wording differs between versions and quotes the text back, so
 * the place is found here.
 */
export function jsonErrorOffset (text: string): number | null {
  let i = 0
  const ws = () => { while (i < text.length && ' \t\n\r'.includes(text[i]!)) i++ }
  const fail = (): never => { throw i }
  const literal = (word: string) => { if (text.startsWith(word, i)) i += word.length; else fail() }
  const string = () => {
    i++ // opening quote
    while (i < text.length) {
      const c = text.charCodeAt(i)
      if (c === 0x22) { i++; return }
      if (c < 0x20) fail()
      if (c === 0x5c) {
        const e = text[i + 1]
        if (e === 'u') { if (!/^[0-9a-fA-F]{4}$/.test(text.slice(i + 2, i + 6))) { i++; fail() } i += 6 } else if (e && '"\\/bfnrt'.includes(e)) i += 2
        else { i++; fail() }
      } else i++
    }
    fail()
  }
  const number = () => {
    const m = /^-?(0|[1-9]\d*)(\.\d+)?([eE][+-]?\d+)?/.exec(text.slice(i))
    if (!m || !m[0] || m[0] === '-') fail()
    i += m![0].length
  }
  const value = (depth: number): void => {
    if (depth > 1000) fail()
    ws()
    const c = text[i]
    if (c === '{') {
      i++; ws()
      if (text[i] === '}') { i++; return }
      for (;;) {
        ws(); if (text[i] !== '"') fail(); string(); ws()
        if (text[i] !== ':') fail(); i++
        value(depth + 1); ws()
        if (text[i] === ',') { i++; continue }
        if (text[i] === '}') { i++; return }
        fail()
      }
    }
    if (c === '[') {
      i++; ws()
      if (text[i] === ']') { i++; return }
      for (;;) {
        value(depth + 1); ws()
        if (text[i] === ',') { i++; continue }
        if (text[i] === ']') { i++; return }
        fail()
      }
    }
    if (c === '"') return string()
    if (c === 't') return literal('true')
    if (c === 'f') return literal('false')
    if (c === 'n') return literal('null')
    if (c === '-' || (c !== undefined && c >= '0' && c <= '9')) return number()
    fail()
  }
  try {
    value(0); ws()
    return i < text.length ? i : null
  } catch (at) {
    return typeof at === 'number' ? Math.min(at, text.length) : 0
  }
}

/** Where a JSON text stops being JSON, as "line 3, column 14", or null when it is JSON. */
export function jsonErrorPlace (text: string): string | null {
  const at = jsonErrorOffset(text)
  if (at === null) return null
  const before = text.slice(0, at)
  const line = before.split('\n').length
  const column = at - before.lastIndexOf('\n')
  return `line ${line}, column ${column}`
}

/**
 * A file name as sent, for display only: folders, control and bidirectional control characters
 * dropped, length capped; null when nothing is left.
 */
export function cleanFileName (name: string | null | undefined): string | null {
  if (!name) return null
  const base = stripBidi(String(name)).split(/[\\/]/).pop()!.replace(/[\u0000-\u001f\u007f]/g, '').trim().slice(0, 255)
  return base || null
}
